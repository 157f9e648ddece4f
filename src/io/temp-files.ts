/**
 * Temporary files and folders that must not outlive the run: tracked while
 * they exist, removed on SIGINT, SIGTERM and SIGHUP (then the process exits
 * with 128 + the signal number, as shells expect) and at exit. The signal
 * handlers are installed only while something is tracked, so a run that
 * writes nothing keeps the default signal behaviour.
 */
import { rmSync } from 'node:fs';

const tracked = new Set<string>();
const SIGNALS = { SIGINT: 2, SIGTERM: 15, SIGHUP: 1 } as const;
type SignalName = keyof typeof SIGNALS;

function removeAll(): void {
  for (const p of tracked) {
    try {
      rmSync(p, { recursive: true, force: true });
    } catch {
      // best effort: the signal or exit is already under way
    }
  }
  tracked.clear();
}

function onSignal(signal: SignalName): void {
  removeAll();
  process.exit(128 + SIGNALS[signal]);
}

const handlers = new Map<SignalName, () => void>();

function install(): void {
  if (handlers.size > 0) return;
  for (const s of Object.keys(SIGNALS) as SignalName[]) {
    const h = () => onSignal(s);
    handlers.set(s, h);
    process.on(s, h);
  }
  process.on('exit', removeAll);
}

function uninstall(): void {
  for (const [s, h] of handlers) process.off(s, h);
  handlers.clear();
  process.off('exit', removeAll);
}

/** Track a temporary path (file or folder) until `releaseTemp`. */
export function trackTemp(path: string): void {
  tracked.add(path);
  install();
}

/** Stop tracking a temporary path: it was renamed into place or removed. */
export function releaseTemp(path: string): void {
  tracked.delete(path);
  if (tracked.size === 0) uninstall();
}

/** Remove a tracked temporary path now. */
export function discardTemp(path: string): void {
  rmSync(path, { recursive: true, force: true });
  releaseTemp(path);
}

/** Paths tracked right now (for tests). */
export function trackedTemps(): string[] {
  return [...tracked];
}

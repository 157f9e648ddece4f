/**
 * Find a Chromium for the browser tests, on any machine with Node and npm.
 *
 * Order: `GAPSTACK_CHROMIUM` (an explicit path), then a `chromium` (or
 * `chromium-browser`) found by walking PATH — so hiding it from PATH hides it —
 * then the binary the npm package `@sparticuz/chromium` carries inside it
 * (brotli-compressed; nothing is downloaded). The packaged binary is unpacked
 * once per version into a private folder under the system temp folder: each
 * process unpacks into its own staging folder and renames it into place, so
 * two test runs side by side never see a half-written browser.
 */
import { accessSync, constants, existsSync, mkdirSync, mkdtempSync, readFileSync, renameSync, rmSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { delimiter, dirname, join } from 'node:path';
import type { BrowserContext } from 'playwright-core';

export interface FoundChromium {
  /** Absolute path of the browser binary. */
  executablePath: string;
  /** Where it came from: an explicit path, the system PATH, or the npm package. */
  source: 'env' | 'path' | 'npm';
  /** Extra environment for the browser process (fonts for the packaged binary on a machine without any). */
  env: Record<string, string>;
}

/** Seconds-long browser work on a loaded 2-core machine: every browser hook and test passes this explicitly. */
export const BROWSER_TIMEOUT_MS = 180_000;

const SYSTEM_NAMES = ['chromium', 'chromium-browser'];

/** The first executable `chromium` on PATH, or undefined. */
export function chromiumOnPath(pathVar: string | undefined = process.env.PATH): string | undefined {
  for (const dir of (pathVar ?? '').split(delimiter)) {
    if (!dir) continue;
    for (const name of SYSTEM_NAMES) {
      const candidate = join(dir, name);
      try {
        if (!statSync(candidate).isFile()) continue;
        accessSync(candidate, constants.X_OK);
        return candidate;
      } catch {
        // not here; keep walking PATH
      }
    }
  }
  return undefined;
}

let packaged: Promise<FoundChromium> | undefined;

/** Unpack (once) and return the Chromium shipped inside the `@sparticuz/chromium` npm package. */
export function packagedChromium(): Promise<FoundChromium> {
  packaged ??= unpackPackagedChromium();
  return packaged;
}

async function unpackPackagedChromium(): Promise<FoundChromium> {
  const require = createRequire(import.meta.url);
  // The package's exports hide package.json: walk up from its entry point to its root.
  let root = dirname(require.resolve('@sparticuz/chromium'));
  while (!existsSync(join(root, 'package.json')) || JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).name !== '@sparticuz/chromium') {
    if (dirname(root) === root) throw new Error('cannot find the @sparticuz/chromium package root');
    root = dirname(root);
  }
  const pkgJson = join(root, 'package.json');
  const version = JSON.parse(readFileSync(pkgJson, 'utf8')).version as string;
  const uid = typeof process.getuid === 'function' ? process.getuid() : 0;
  const home = join(tmpdir(), `gapstack-chromium-${version}-${uid}`);
  const binary = join(home, 'chromium');
  if (!existsSync(binary)) {
    // Unpack into a private staging folder, then publish it with one rename.
    const staging = mkdtempSync(join(tmpdir(), `gapstack-chromium-unpack-`));
    const savedTmp = process.env.TMPDIR;
    try {
      // The package unpacks beside os.tmpdir(); point that at the staging folder for the duration.
      process.env.TMPDIR = staging;
      const { default: Chromium } = await import('@sparticuz/chromium');
      const unpacked = await Chromium.executablePath(join(dirname(pkgJson), 'bin'));
      if (unpacked !== join(staging, 'chromium')) throw new Error(`@sparticuz/chromium unpacked to ${unpacked}, expected ${staging}`);
    } finally {
      if (savedTmp === undefined) delete process.env.TMPDIR;
      else process.env.TMPDIR = savedTmp;
    }
    try {
      renameSync(staging, home);
    } catch {
      // Another run published it first; theirs is complete, drop ours.
      rmSync(staging, { recursive: true, force: true });
      if (!existsSync(binary)) throw new Error(`could not publish the unpacked Chromium at ${home}`);
    }
  }
  const env: Record<string, string> = {};
  // The package carries a font set; use it only where the machine has no fontconfig of its own.
  if (!existsSync('/etc/fonts/fonts.conf') && existsSync(join(home, 'fonts', 'fonts.conf'))) env.FONTCONFIG_PATH = join(home, 'fonts');
  return { executablePath: binary, source: 'npm', env };
}

/** The Chromium the browser tests use: explicit, then system (PATH), then the npm package's. */
export async function findChromium(): Promise<FoundChromium> {
  const explicit = process.env.GAPSTACK_CHROMIUM;
  if (explicit) {
    if (!existsSync(explicit)) throw new Error(`GAPSTACK_CHROMIUM=${explicit} does not exist`);
    return { executablePath: explicit, source: 'env', env: {} };
  }
  const system = chromiumOnPath();
  if (system) return { executablePath: system, source: 'path', env: {} };
  return packagedChromium();
}

/** Flags for a quiet, offline, sandbox-free headless run (tests run as root in containers). */
export const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/** Launch a fresh headless Chromium (the one `findChromium` picks unless given) with a throw-away profile. */
export async function launchChromium(
  opts: { found?: FoundChromium; viewport?: { width: number; height: number } } = {},
): Promise<{ ctx: BrowserContext; found: FoundChromium; profile: string }> {
  const found = opts.found ?? (await findChromium());
  const viewport = opts.viewport ?? { width: 1100, height: 900 };
  const { chromium } = await import('playwright-core');
  mkdirSync(tmpdir(), { recursive: true });
  const profile = mkdtempSync(join(tmpdir(), 'gapstack-chromium-profile-'));
  const ctx = await chromium.launchPersistentContext(profile, {
    executablePath: found.executablePath,
    headless: true,
    args: CHROMIUM_ARGS,
    env: { ...process.env, ...found.env } as Record<string, string>,
    viewport,
    timeout: BROWSER_TIMEOUT_MS,
  });
  // Remove the throw-away profile once the browser has really gone (it may still be flushing files).
  const close = ctx.close.bind(ctx);
  ctx.close = async (...args: Parameters<BrowserContext['close']>) => {
    await close(...args);
    rmSync(profile, { recursive: true, force: true, maxRetries: 10, retryDelay: 100 });
  };
  return { ctx, found, profile };
}

/** A progress bar on stderr for long runs in a terminal; nothing at all otherwise (pipes, --json, CI). */
export interface Progress {
  update: (fraction: number) => void;
  stop: () => void;
}

/** Start a bar that appears only once a run has taken longer than half a second. */
export async function startProgress(label: string): Promise<Progress | null> {
  if (!process.stderr.isTTY) return null;
  const { default: cliProgress } = await import('cli-progress');
  const started = Date.now();
  let bar: InstanceType<typeof cliProgress.SingleBar> | null = null;
  return {
    update: (fraction: number) => {
      if (!bar && Date.now() - started > 500) {
        bar = new cliProgress.SingleBar({ format: `${label} [{bar}] {percentage}%`, stream: process.stderr, clearOnComplete: true }, cliProgress.Presets.shades_classic);
        bar.start(100, 0);
      }
      bar?.update(Math.round(fraction * 100));
    },
    stop: () => bar?.stop(),
  };
}

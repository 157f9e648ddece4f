/**
 * Progress on stderr for long runs in a terminal, with the stage at work and
 * an estimate of the time left; nothing at all otherwise (pipes, --json, CI).
 * A bar appears only once a run has taken longer than half a second.
 */
export interface Progress {
  update: (fraction: number) => void;
  stop: () => void;
}

/** Progress over named stages: each stage reports its own 0–1 fraction; the bar shows the whole run. */
export interface StagedProgress {
  /** Start the next stage; returns its progress callback. */
  stage: (name: string) => (fraction: number) => void;
  stop: () => void;
}

const SHOW_AFTER_MS = 500;

type Bar = { start: (total: number, value: number, payload?: object) => void; update: (value: number, payload?: object) => void; stop: () => void };

async function makeBar(format: string): Promise<() => Bar> {
  const { default: cliProgress } = await import('cli-progress');
  return () =>
    new cliProgress.SingleBar(
      { format, stream: process.stderr, clearOnComplete: true, etaBuffer: 50, fps: 5, hideCursor: false },
      cliProgress.Presets.shades_classic,
    ) as unknown as Bar;
}

/** One stage: `label [bar] 42% | about 1m05s left`. */
export async function startProgress(label: string): Promise<Progress | null> {
  const staged = await startStagedProgress(label, 1);
  if (!staged) return null;
  const update = staged.stage(label);
  return { update, stop: staged.stop };
}

/** `stages` stages, shown as `stage k/n: name [bar] 42% | about 1m05s left` over the whole run. */
export async function startStagedProgress(label: string, stages: number, stream: { isTTY?: boolean } = process.stderr): Promise<StagedProgress | null> {
  if (!stream.isTTY) return null;
  const newBar = await makeBar(`${label}: {stage} [{bar}] {percentage}% | about {eta_formatted} left`);
  const started = Date.now();
  let bar: Bar | null = null;
  let index = -1;
  let name = '';
  const show = (fraction: number) => {
    const whole = Math.min(1, (index + Math.max(0, Math.min(1, fraction))) / stages);
    const stage = stages > 1 ? `stage ${index + 1}/${stages} ${name}` : name;
    if (!bar && Date.now() - started > SHOW_AFTER_MS) {
      bar = newBar();
      bar.start(1000, 0, { stage });
    }
    bar?.update(Math.round(whole * 1000), { stage });
  };
  return {
    stage: (stageName: string) => {
      index = Math.min(index + 1, stages - 1);
      name = stageName;
      show(0);
      return show;
    },
    stop: () => bar?.stop(),
  };
}

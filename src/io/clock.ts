/**
 * A monotonic clock [s] for the run times commands report. `performance.now()`
 * builds Node's performance object on its first call, about 1 ms of a quick
 * command's start; the process's high-resolution time is already there.
 */
export const clockSeconds = (): number => Number(process.hrtime.bigint()) / 1e9;

/**
 * The list of enumeration leaves kept within a relative margin of the best.
 * The threshold rises as better leaves appear, so entries go stale; they are
 * dropped in batches, only when the list has doubled since the last sweep.
 * Each sweep costs at most twice the number of entries added since the one
 * before, so keeping N offered leaves costs O(N) in all (a fixed cap with a
 * sweep on every insertion beyond it costs O(N²) once more leaves than the
 * cap sit within the margin).
 */
export interface Candidate {
  /** Gaps [eV], top first. */
  gapsEv: number[];
  value: number;
}

export class CandidateKeeper {
  private kept: Candidate[] = [];
  private sweepAt: number;
  /** Best value offered so far [-]. */
  bestValue: number;
  /** Best leaf offered so far (no gaps while nothing beat the initial value). */
  best: Candidate;
  /** Entries examined by sweeps, for checking the cost stays linear. */
  swept = 0;
  sweeps = 0;
  offered = 0;

  /**
   * @param margin relative loss below the best that is kept [-]
   * @param initialBest a known achievable value to start the threshold from [-]
   * @param firstSweep list length that triggers the first sweep
   */
  constructor(
    readonly margin: number,
    initialBest = 0,
    private readonly firstSweep = 4096,
  ) {
    this.bestValue = initialBest;
    this.best = { gapsEv: [], value: initialBest };
    this.sweepAt = firstSweep;
  }

  /** Current admission threshold [-]. */
  threshold(): number {
    return this.bestValue * (1 - this.margin);
  }

  /** Offer a leaf (its gaps built only when kept); kept when within the margin of the best so far. */
  offer(gapsEv: () => number[], value: number): boolean {
    if (!(value >= this.threshold())) return false;
    this.offered++;
    const c = { gapsEv: gapsEv(), value };
    if (value > this.bestValue) {
      this.bestValue = value;
      this.best = c;
    }
    this.kept.push(c);
    if (this.kept.length >= this.sweepAt) this.sweep();
    return true;
  }

  private sweep(): void {
    const cut = this.threshold();
    this.swept += this.kept.length;
    this.sweeps++;
    this.kept = this.kept.filter((c) => c.value >= cut);
    this.sweepAt = Math.max(this.firstSweep, 2 * this.kept.length);
  }

  /** Kept leaves within the margin of the final best, best first. */
  result(): Candidate[] {
    const cut = this.threshold();
    return this.kept.filter((c) => c.value >= cut).sort((a, b) => b.value - a.value);
  }

  /** Entries currently held (stale ones included). */
  get size(): number {
    return this.kept.length;
  }
}

/**
 * Write-failure injection for the contract tests on machines where a small
 * full filesystem cannot be mounted (see DEVELOPERS.md). Only tests set
 * `GAPSTACK_FAULT_INJECTION=enospc[:k]`: the k-th file write of the run
 * (default the first) fails as a full disk would. Nothing else reads it.
 */
let writes = 0;

/** Throw an ENOSPC error when the injection asks this write to fail. */
export function injectedWriteFault(path: string): void {
  const spec = process.env.GAPSTACK_FAULT_INJECTION;
  if (!spec?.startsWith('enospc')) return;
  const k = Number(spec.split(':')[1] ?? '1');
  writes++;
  if (writes === k) {
    const err = new Error(`ENOSPC: no space left on device, write '${path}'`) as NodeJS.ErrnoException;
    err.code = 'ENOSPC';
    throw err;
  }
}

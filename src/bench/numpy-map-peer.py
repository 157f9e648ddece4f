"""Vectorised numpy peer for the bench row "2T map 0.5-2.5 eV at 5 meV with --out".

The same work as `gapstack map --x 0.5:2.5 --y 0.5:2.5 --step 0.005 --out map.csv`
done the way a careful numpy user would: photons above every gap from the
cumulative table of the built-in AM1.5G file (exact integral of the linear
interpolant), radiative J0 per gap by the Bose-Einstein series, then the
series maximum power of all ordered pairs at once by vectorised bisection on
dP/dJ, and the CSV written with numpy.

Source: written for this project's bench; the photon integral and the
vectorised series solver follow the independent reference implementation in
test/fixtures/reference/runner.py (TabulatedSpectrum.photons_below_wavelength,
series_pmax_vec), with J0 from the Bose-Einstein series
sum_k e^{-kx}(x^2/k + 2x/k^2 + 2/k^3) instead of quadrature (the same integral,
Shockley and Queisser 1961; series form from memory, common practice).

Usage: python3 numpy-map-peer.py <spectrum.tsv> <out.csv> [step_ev]
"""
import sys

import numpy as np

H = 6.62607015e-34
C = 299792458.0
Q = 1.602176634e-19
KB = 1.380649e-23
HC_EV_NM = 1239.841984
PREF = 2.0 * np.pi / (H ** 3 * C ** 2)


def main():
    spectrum, out = sys.argv[1], sys.argv[2]
    step = float(sys.argv[3]) if len(sys.argv) > 3 else 0.005
    with open(spectrum) as fh:
        data = np.loadtxt((l for l in fh if l[:1].isdigit()), usecols=(0, 1))
    lam, irr = data[:, 0], data[:, 1]
    phi = irr * (lam * 1e-9) / (H * C)
    cum = np.concatenate([[0.0], np.cumsum(0.5 * (phi[1:] + phi[:-1]) * np.diff(lam))])

    g = 0.5 + step * np.arange(int(round((2.5 - 0.5) / step)) + 1)
    lg = HC_EV_NM / g
    i = np.clip(np.searchsorted(lam, lg, side="right") - 1, 0, len(lam) - 2)
    t = np.clip(lg - lam[i], 0.0, None)
    phig = phi[i] + (phi[i + 1] - phi[i]) * (t / (lam[i + 1] - lam[i]))
    n_above = np.where(lg >= lam[-1], cum[-1], np.where(lg <= lam[0], 0.0, cum[i] + 0.5 * (phi[i] + phig) * t))

    temp = 300.0
    kt = KB * temp
    x = g * Q / kt
    k = np.arange(1, 60)[:, None]
    series = (np.exp(-k * x) * (x ** 2 / k + 2 * x / k ** 2 + 2 / k ** 3)).sum(axis=0)
    j0 = Q * PREF * kt ** 3 * series
    vt = kt / Q

    # All ordered pairs: top gap x (index ix) above bottom gap y (index iy).
    iy, ix = np.nonzero(g[None, :] > g[:, None])
    top = Q * n_above[ix]
    jph = np.stack([top, Q * n_above[iy] - top], axis=1)
    j0s = np.stack([j0[ix], j0[iy]], axis=1)
    lo = np.zeros(len(ix))
    hi = np.maximum(jph.min(axis=1), 0.0)
    for _ in range(55):
        mid = 0.5 * (lo + hi)
        xx = np.maximum(jph - mid[:, None], 0.0)
        s = vt * np.log1p(xx / j0s).sum(axis=1)
        ds = (vt / (xx + j0s)).sum(axis=1)
        pos = s - mid * ds > 0
        lo = np.where(pos, mid, lo)
        hi = np.where(pos, hi, mid)
    J = 0.5 * (lo + hi)
    p = J * (vt * np.log1p(np.maximum(jph - J[:, None], 0.0) / j0s)).sum(axis=1)
    pin = float(np.sum(0.5 * (irr[1:] + irr[:-1]) * np.diff(lam)))
    eff = p / pin
    np.savetxt(out, np.column_stack([g[ix], g[iy], eff]), fmt=("%.5f", "%.5f", "%.8f"), delimiter=",",
               header="gap1_ev,gap2_ev,efficiency", comments="")
    print(f"{len(eff)} pairs, best {eff.max():.6f}")


if __name__ == "__main__":
    main()

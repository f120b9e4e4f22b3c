"""Reference vectors for libs/waves (science.md 4), from scipy/numpy as outside references.

Usage: python generate.py OUT.json

Writes:
- welch: deterministic bursts (made here from a 64-bit LCG, not numpy's RNG, so the samples do not depend on
  the numpy version; rounded to 1e-9) and their scipy.signal.welch PSDs (window 'hann' periodic, noverlap =
  nperseg/2, detrend 'constant', scaling 'density', one-sided);
- chi2: scipy.stats.chi2.ppf quantiles;
- dispersion: kh solving omega^2 h/g = kh tanh(kh) by scipy.optimize.brentq (xtol 1e-15);
- dft: numpy.fft.fft of a burst of non-power-of-two length (for the Bluestein transform).
Outputs are rounded to 13 significant digits so that last-ulp differences between library builds do not
show up as drift; the tests compare at 1e-9 relative or looser. Tested with scipy 1.17.1 and numpy 2.4.6.
"""

import json
import math
import sys

import numpy as np
from scipy import optimize, signal, stats

G = 9.80665  # m s-2, standard gravity


def r13(v):
    return float(f"{float(v):.12e}")


class Lcg:
    """Knuth's MMIX 64-bit LCG; uniform in (0, 1) from the top 53 bits."""

    def __init__(self, seed):
        self.s = seed & 0xFFFFFFFFFFFFFFFF

    def uniform(self):
        self.s = (6364136223846793005 * self.s + 1442695040888963407) & 0xFFFFFFFFFFFFFFFF
        return ((self.s >> 11) + 0.5) / 2.0**53

    def normal(self):
        u1, u2 = self.uniform(), self.uniform()
        return math.sqrt(-2.0 * math.log(u1)) * math.cos(2.0 * math.pi * u2)


def burst(seed, n, fs, comps, noise):
    rng = Lcg(seed)
    phases = [2.0 * math.pi * rng.uniform() for _ in comps]
    out = []
    for i in range(n):
        t = i / fs
        v = 10.1325 + 2.0
        for (a, f), ph in zip(comps, phases):
            v += a * math.cos(2.0 * math.pi * f * t + ph)
        v += noise * rng.normal()
        out.append(round(v, 9))
    return out


def main(path):
    cases = [
        {"name": "swell-2Hz", "seed": 11, "n": 2048, "fs": 2.0, "nperseg": 512,
         "comps": [(0.3, 0.0625), (0.1, 0.11), (0.02, 0.013)], "noise": 0.01},
        {"name": "odd-length-4Hz", "seed": 23, "n": 1500, "fs": 4.0, "nperseg": 256,
         "comps": [(0.15, 0.2), (0.05, 0.31)], "noise": 0.02},
        {"name": "noise-1Hz", "seed": 37, "n": 4096, "fs": 1.0, "nperseg": 256,
         "comps": [], "noise": 0.05},
    ]
    welch = []
    for c in cases:
        x = burst(c["seed"], c["n"], c["fs"], c["comps"], c["noise"])
        ns = c["nperseg"]
        f, pxx = signal.welch(np.array(x), fs=c["fs"], window="hann", nperseg=ns, noverlap=ns // 2,
                              detrend="constant", scaling="density", return_onesided=True)
        welch.append({"name": c["name"], "fs": c["fs"], "nperseg": ns, "x": x,
                      "f": [r13(v) for v in f], "psd": [r13(v) for v in pxx]})

    chi2 = []
    for nu in [1.0, 2.0, 3.5, 5.8, 10.0, 13.363636363636363, 25.0, 50.0, 100.0, 500.0, 2000.0]:
        for p in [0.025, 0.1, 0.5, 0.9, 0.975]:
            chi2.append({"nu": nu, "p": p, "x": r13(stats.chi2.ppf(p, nu))})

    dispersion = []
    for h in [0.3, 1.0, 2.0, 5.0, 10.0, 50.0]:
        for period in [1.0, 2.5, 5.0, 8.0, 12.0, 20.0, 60.0, 300.0]:
            omega = 2.0 * math.pi / period
            y = omega * omega * h / G  # = k0 h
            kh = optimize.brentq(lambda q: q * math.tanh(q) - y, 1e-12, y + 10.0, xtol=1e-15, rtol=1e-15,
                                 maxiter=500)
            dispersion.append({"h": h, "period": period, "k0h": r13(y), "kh": r13(kh)})

    rng = Lcg(101)
    xd = [round(rng.normal(), 9) for _ in range(1500)]
    spec = np.fft.fft(np.array(xd))
    dft = {"x": xd, "re": [r13(v) for v in spec.real], "im": [r13(v) for v in spec.imag]}

    out = {"g": G, "welch": welch, "chi2": chi2, "dispersion": dispersion, "dft": dft}
    with open(path, "w") as fh:
        json.dump(out, fh)
        fh.write("\n")


if __name__ == "__main__":
    main(sys.argv[1])

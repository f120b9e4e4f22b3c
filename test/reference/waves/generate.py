"""Reference vectors for libs/waves (docs/methods/waves.md), from scipy/numpy as outside references.

Usage: python generate.py OUT.json

Writes:
- welch: deterministic bursts (made here from a 64-bit LCG, not numpy's RNG, so the samples do not depend on
  the numpy version; rounded to 1e-9) and their scipy.signal.welch PSDs (window 'hann' periodic, noverlap =
  nperseg/2, detrend 'constant', scaling 'density', one-sided);
- chi2: scipy.stats.chi2.ppf quantiles;
- dispersion: kh solving omega^2 h/g = kh tanh(kh) by scipy.optimize.brentq (xtol 1e-15);
- dft: numpy.fft.fft of a burst of non-power-of-two length (for the Bluestein transform);
- pipeline: two synthetic pressure bursts and their wave statistics from an independent numpy/scipy
  implementation of docs/methods/waves.md 4.1-4.5 (scipy.signal.detrend and welch, brentq roots, numpy.fft.rfft/irfft).
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


def kp_of(k, z, h):
    return math.cosh(k * z) / math.cosh(k * h)


def wavenumber(omega, h):
    if omega == 0.0:
        return 0.0
    y = omega * omega * h / G
    return optimize.brentq(lambda q: q * math.tanh(q) - y, 1e-14, y + 10.0, xtol=1e-15, rtol=1e-15,
                           maxiter=500) / h


def pipeline_case(name, seed, n, fs, depth, zs, rho, patm, hm0, tp):
    """An independent numpy/scipy implementation of docs/methods/waves.md 4.1-4.5 on one synthetic burst."""
    rng = Lcg(seed)
    df_n = fs / n
    fp = 1.0 / tp
    comps = []
    for j in range(1, n // 2):
        f = j * df_n
        if f < 0.5 * fp or f > 4.0 * fp:
            continue
        sig = 0.07 if f <= fp else 0.09
        s = f ** -5 * math.exp(-1.25 * (fp / f) ** 4) * 3.3 ** math.exp(-((f - fp) ** 2) / (2 * sig * sig * fp * fp))
        comps.append((f, s))
    m0 = sum(s for _, s in comps) * df_n
    scale = hm0 * hm0 / 16.0 / m0
    waves = []
    for f, s in comps:
        a = math.sqrt(2.0 * s * scale * df_n)
        k = wavenumber(2 * math.pi * f, depth)
        waves.append((f, a * kp_of(k, zs, depth), 2 * math.pi * rng.uniform()))
    t = np.arange(n) / fs
    head = np.full(n, depth - zs)
    for f, a, ph in waves:
        head = head + a * np.cos(2 * math.pi * f * t + ph)
    p = [round(float(v), 9) for v in patm + rho * G * head / 1e4]

    x = 1e4 * (np.array(p) - patm) / (rho * G)
    h = float(np.mean(x)) + zs
    x = signal.detrend(x, type="linear")
    med = float(np.median(x))
    mad = float(np.median(np.abs(x - med)))
    assert int(np.sum(np.abs(x - med) > 5 * max(1.4826 * mad, 0.002))) == 0
    ns = 2 ** round(math.log2(256 * fs))
    while ns > 8 and (n - ns) // (ns // 2) + 1 < 3:
        ns //= 2
    nseg = (n - ns) // (ns // 2) + 1
    f, pxx = signal.welch(x, fs=fs, window="hann", nperseg=ns, noverlap=ns // 2, detrend="constant",
                          scaling="density")
    nu = 36.0 * nseg * nseg / (19.0 * nseg - 1.0)
    r = math.sqrt(0.1)
    kstar = optimize.brentq(lambda k: kp_of(k, zs, h) - r, 1e-9, 60.0, xtol=1e-15, rtol=1e-15, maxiter=500)
    fstar = math.sqrt(G * kstar * math.tanh(kstar * h)) / (2 * math.pi)
    fmax = min(1.0, fs / 2, fstar)
    df = fs / ns
    band = [m for m in range(1, len(f)) if 0.005 - 1e-9 * df <= f[m] <= fmax + 1e-9 * df]
    seta = {m: pxx[m] / kp_of(wavenumber(2 * math.pi * f[m], h), zs, h) ** 2 for m in band}
    m0 = sum(seta[m] for m in band) * df
    m1 = sum(f[m] * seta[m] for m in band) * df
    m2 = sum(f[m] ** 2 * seta[m] for m in band) * df
    mig = sum(seta[m] for m in band if f[m] < 0.04 - 1e-9 * df) * df
    pk = max(band, key=lambda m: seta[m])
    fpk = f[pk]
    if band[0] < pk < band[-1]:
        a_, b_, c_ = seta[pk - 1], seta[pk], seta[pk + 1]
        fpk += df * 0.5 * (a_ - c_) / (a_ - 2 * b_ + c_)
    nu_eff = nu * sum(seta.values()) ** 2 / sum(v * v for v in seta.values())
    spec = np.fft.rfft(x)
    fn = np.arange(len(spec)) * fs / n
    gain = np.zeros(len(spec))
    for m in range(1, len(spec)):
        if 0.005 - 1e-9 * df_n <= fn[m] <= fmax + 1e-9 * df_n:
            gain[m] = 1.0 / kp_of(wavenumber(2 * math.pi * fn[m], h), zs, h)
    eta = np.fft.irfft(spec * gain, n=n)
    ups = [i for i in range(n - 1) if eta[i] < 0 <= eta[i + 1]]
    times = [i + eta[i] / (eta[i] - eta[i + 1]) for i in ups]
    heights = sorted(float(np.max(eta[a + 1:b + 1]) - np.min(eta[a + 1:b + 1])) for a, b in zip(ups, ups[1:]))
    nw = len(heights)
    top = lambda c: sum(heights[nw - c:]) / c  # noqa: E731
    hm0_ = 4 * math.sqrt(m0)
    out = {"hm0M": hm0_, "tpS": 1 / fpk, "tm01S": m0 / m1, "tm02S": math.sqrt(m0 / m2), "hrmsM": math.sqrt(8 * m0),
           "hm0SsM": 4 * math.sqrt(m0 - mig), "hm0IgM": 4 * math.sqrt(mig), "depthM": h, "cutoffHz": fmax,
           "dof": nu, "hm0SigmaM": hm0_ / math.sqrt(2 * nu_eff), "h13M": top(nw // 3), "h110M": top(nw // 10),
           "hmaxM": heights[-1], "tzS": (times[-1] - times[0]) / nw / fs, "nWaves": nw}
    return {"name": name, "fs": fs, "sensorHeightM": zs, "rhoKgM3": rho, "patmDbar": patm, "p": p,
            "nperseg": ns, "expected": {k: (v if k == "nWaves" else r13(v)) for k, v in out.items()}}


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

    pipeline = [
        pipeline_case("reef-flat-2048", 211, 2048, 2.0, 2.5, 0.3, 1023.3, 10.1325, 0.6, 9.0),
        pipeline_case("lagoon-1800", 223, 1800, 2.0, 1.2, 0.15, 1022.1, 10.095, 0.25, 5.5),
    ]

    out = {"g": G, "welch": welch, "chi2": chi2, "dispersion": dispersion, "dft": dft, "pipeline": pipeline}
    with open(path, "w") as fh:
        json.dump(out, fh)
        fh.write("\n")


if __name__ == "__main__":
    main(sys.argv[1])

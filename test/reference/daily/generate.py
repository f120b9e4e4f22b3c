"""Reference vectors for libs/daily and libs/forecast fits: scipy's curve_fit and least_squares on the same windows.

Usage: python generate.py OUT.json

- Light responses: NCP = Pmax tanh(I/Ik) - R and NEC = Gmax tanh(I/Ik) + G0 (Jassby & Platt 1976), fitted by
  scipy.optimize.curve_fit (sigma = each window's sigma, absolute_sigma=False, analytic Jacobian) to
  (a) synthetic days with known parameters and normal noise, and (b) the fictional reef's flux windows of one day
  (test/reference/daily/windows.json, written by make-windows.ts from the simulator and the processor).
- Robust fits: Huber's M-estimate with the scale the normalised MAD of the standardised residuals, by
  scipy.optimize.least_squares(loss='huber', f_scale=1.345 s) iterated until the scale and the parameters settle,
  on synthetic days with a few wild windows.
- NEC against Omega_ar: curve_fit of a straight line.
- Harmonic tide: numpy.linalg.lstsq on mean + M2, S2, K1 cos/sin pairs (t in hours from 2000-01-01T00Z).
Deterministic: numpy's PCG64 generator with fixed seeds; floats written by json.dump.
"""

import json
import sys

import numpy as np
from scipy.optimize import curve_fit, least_squares

HUBER_K = 1.345


def tanh_model(sign):
    def f(x, amp, ik, c):
        return amp * np.tanh(x / ik) + sign * c

    def jac(x, amp, ik, c):
        th = np.tanh(x / ik)
        return np.column_stack([th, -amp * x / ik**2 * (1 - th**2), np.full_like(x, sign)])

    return f, jac


def start(x, y, s, sign):
    """Best (amp, ik, c) on a log grid of Ik with the linear parameters by weighted least squares."""
    best = None
    w = 1 / s
    for ik in np.exp(np.linspace(np.log(10), np.log(5 * x.max()), 200)):
        a = np.column_stack([np.tanh(x / ik), np.full_like(x, sign)]) * w[:, None]
        coef, *_ = np.linalg.lstsq(a, y * w, rcond=None)
        chi2 = np.sum((a @ coef - y * w) ** 2)
        if best is None or chi2 < best[0]:
            best = (chi2, [coef[0], ik, coef[1]])
    return best[1]


def fit_curve(x, y, s, sign):
    f, jac = tanh_model(sign)
    p, cov = curve_fit(f, x, y, p0=start(x, y, s, sign), sigma=s, absolute_sigma=False, jac=jac,
                       xtol=1e-15, ftol=1e-15, gtol=1e-15, maxfev=100000)
    return [float(v) for v in p], [float(v) for v in np.sqrt(np.diag(cov))]


def mad(z):
    return 1.4826 * np.median(np.abs(z - np.median(z)))


def fit_huber(x, y, s, sign):
    f, jac = tanh_model(sign)
    p = np.array(fit_curve(x, y, s, sign)[0])
    for _ in range(200):
        scale = mad((y - f(x, *p)) / s)
        r = least_squares(lambda q: (y - f(x, *q)) / s, p, jac=lambda q: -jac(x, *q) / s[:, None],
                          loss="huber", f_scale=HUBER_K * scale, xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=10000)
        done = np.allclose(r.x, p, rtol=1e-13, atol=0)
        p = r.x
        if done:
            break
    return [float(v) for v in p], float(mad((y - f(x, *p)) / s))


def day_par(peak, n=72):
    i = np.arange(n)
    light = np.sin(np.pi * (np.maximum(i, 24) - 24 + 0.5) / (n - 24))
    return np.where(i < 24, 0.0, peak * light**1.2)


def synthetic(rng):
    cases = []
    for name, sign, truth, peak, noise in [
        ("ncp_bright", -1, (58.0, 380.0, 19.0), 2000.0, 3.0),
        ("ncp_cloudy", -1, (45.0, 250.0, 15.0), 700.0, 2.0),
        ("nec_day", 1, (9.0, 300.0, 1.5), 1800.0, 0.8),
        ("nec_dissolving", 1, (6.0, 200.0, -1.2), 1500.0, 0.5),
    ]:
        x = day_par(peak)
        s = noise * (0.8 + 0.4 * rng.random(x.size))
        y = truth[0] * np.tanh(x / truth[1]) + sign * truth[2] + s * rng.standard_normal(x.size)
        p, se = fit_curve(x, y, s, sign)
        cases.append({"name": name, "sign": sign, "par": x.tolist(), "rate": y.tolist(), "sigma": s.tolist(),
                      "params": p, "se": se})
    return cases


def robust_cases(rng):
    cases = []
    for name, sign, truth, wild in [
        ("ncp_two_wild", -1, (58.0, 380.0, 19.0), {28: 30.0, 30: 30.0}),
        ("nec_three_wild", 1, (9.0, 300.0, 1.5), {10: -6.0, 40: 8.0, 55: 5.0}),
    ]:
        x = day_par(1800.0)
        s = np.full(x.size, 1.0 if sign < 0 else 0.3)
        y = truth[0] * np.tanh(x / truth[1]) + sign * truth[2] + s * rng.standard_normal(x.size)
        for k, v in wild.items():
            y[k] += v
        p, scale = fit_huber(x, y, s, sign)
        cases.append({"name": name, "sign": sign, "par": x.tolist(), "rate": y.tolist(), "sigma": s.tolist(),
                      "params": p, "scale": scale})
    return cases


def reef_windows():
    with open("test/reference/daily/windows.json") as fh:
        doc = json.load(fh)
    out = []
    for transect in ("outer", "inner"):
        for kind, sign in (("ncp", -1), ("nec", 1)):
            w = [r for r in doc["windows"] if r["transect"] == transect and r["valid"] and r[kind] is not None
                 and r[kind + "_sigma"] is not None and r["par"] is not None]
            x = np.array([max(0.0, r["par"]) for r in w])
            y = np.array([r[kind] for r in w])
            s = np.array([r[kind + "_sigma"] for r in w])
            p, se = fit_curve(x, y, s, sign)
            out.append({"transect": transect, "kind": kind, "n": len(w), "params": p, "se": se})
    return {"source": doc["source"], "fits": out}


def omega_case(rng):
    om = np.linspace(2.8, 4.4, 40)
    s = np.full(om.size, 1.5)
    y = -20 + 8 * om + s * rng.standard_normal(om.size)
    p, cov = curve_fit(lambda x, a, b: a + b * x, om, y, sigma=s, absolute_sigma=False)
    return {"omega": om.tolist(), "rate": y.tolist(), "sigma": s.tolist(), "params": p.tolist(),
            "se": np.sqrt(np.diag(cov)).tolist()}


FREQ = {"M2": 0.0805114007, "S2": 0.0833333333, "K1": 0.0417807462}


def tide_case(rng):
    epoch = np.datetime64("2000-01-01T00:00:00", "ms").astype("int64")
    t_ms = np.datetime64("2026-03-01T00:00:00", "ms").astype("int64") + np.arange(0, 20 * 86400000, 1800000)
    h = (t_ms - epoch) / 3.6e6
    z = (1.3 + 0.37 * np.cos(2 * np.pi * FREQ["M2"] * h - np.radians(40))
         + 0.13 * np.cos(2 * np.pi * FREQ["S2"] * h - np.radians(300))
         + 0.06 * np.cos(2 * np.pi * FREQ["K1"] * h - np.radians(120)) + 0.02 * rng.standard_normal(h.size))
    cols = [np.ones_like(h)]
    for name in ("M2", "K1", "S2"):
        cols += [np.cos(2 * np.pi * FREQ[name] * h), np.sin(2 * np.pi * FREQ[name] * h)]
    coef, *_ = np.linalg.lstsq(np.column_stack(cols), z, rcond=None)
    cons = {}
    for k, name in enumerate(("M2", "K1", "S2")):
        a, b = coef[1 + 2 * k], coef[2 + 2 * k]
        cons[name] = {"amplitude": float(np.hypot(a, b)), "phase_deg": float(np.degrees(np.arctan2(b, a)) % 360)}
    return {"t_ms": t_ms.tolist(), "level": z.tolist(), "mean": float(coef[0]), "constituents": cons}


def main(path):
    rng = np.random.default_rng(20261205)
    doc = {
        "source": "scipy 1.18.1 curve_fit / least_squares and numpy 2.5.5 lstsq via test/reference/daily/generate.py",
        "synthetic": synthetic(rng),
        "robust": robust_cases(rng),
        "reef": reef_windows(),
        "omega": omega_case(rng),
        "tide": tide_case(rng),
    }
    with open(path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    np.seterr(all="raise")
    main(sys.argv[1])

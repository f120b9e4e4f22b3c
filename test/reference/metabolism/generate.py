"""Reference vectors for libs/metabolism: steady reef-flat slabs through an outside carbonate library.

Usage: python generate.py OUT.json

For known NCP and NEC (mmol m-2 h-1), PQ, upstream state (t, S, TA, pCO2, O2), U, h and L, the downstream
state follows the steady control-volume budget (docs/methods/metabolism.md 6.4, no air-sea exchange):
  X_B = X_A + F_X tau / (rho h),  tau = L/U,
  F_O2 = NCP, F_TA = -2 NEC, F_DIC = -(NCP/PQ + NEC)   (umol m-2 s-1 = mmol m-2 h-1 / 3.6),
with rho from TEOS-10 (gsw 3.6, rho(SA, CT, 0); the library itself uses EOS-80, which differs by < 1e-4
relative at reef conditions) and DIC_A, pCO2_B from PyCO2SYS 1.8.3.4 (outside references, test env only).
PyCO2SYS options: Lueker et al. 2000 K1 K2 (opt_k_carbonic 10), Lee et al. 2010 boron (opt_total_borate 2),
total pH scale, Dickson 1990 KSO4 (opt_k_bisulfate 1), Perez & Fraga 1987 KF (opt_k_fluoride 2), CODATA 2018
gas constant (opt_gas_constant 3); KW and the fugacity factor are PyCO2SYS's own (they differ slightly from
libs/carbonate's defaults; the test's tolerances allow for it).
Deterministic: fixed grid, no random numbers; floats written by json.dump.
"""

import itertools
import json
import sys

import gsw
import numpy as np
import PyCO2SYS as pyco2

OPTS = dict(
    opt_pH_scale=1,
    opt_k_carbonic=10,
    opt_total_borate=2,
    opt_k_bisulfate=1,
    opt_k_fluoride=2,
    opt_gas_constant=3,
    opt_pressured_kCO2=0,
)


def main(path):
    temps = [24.0, 28.5]
    sals = [34.6, 35.8]
    flows = [(0.03, 0.7), (0.06, 1.3), (0.15, 2.0)]  # (U m/s, h m)
    rates = [(-8.0, 1.5, 1.0), (-6.0, -1.0, 1.0), (12.0, 4.0, 1.1), (28.0, 9.0, 1.0)]  # NCP, NEC, PQ
    uppers = [(2250.0, 390.0, 198.0), (2330.0, 460.0, 185.0)]  # TA_A, pCO2_A, O2_A
    length_m = 350.0
    cases = []
    for temp, sal, (u, h), (ncp, nec, pq), (ta_a, pco2_a, o2_a) in itertools.product(
        temps, sals, flows, rates, uppers
    ):
        sa = float(gsw.SA_from_SP(sal, 0.0, 0.0, 0.0))
        ct = float(gsw.CT_from_t(sa, temp, 0.0))
        rho = float(gsw.rho(sa, ct, 0.0))
        up = pyco2.sys(par1=ta_a, par2=pco2_a, par1_type=1, par2_type=4, salinity=sal, temperature=temp, **OPTS)
        dic_a = float(up["dic"])
        k = length_m / u / (rho * h) / 3.6  # (mmol m-2 h-1) -> umol/kg change along the transect
        o2_b = o2_a + ncp * k
        ta_b = ta_a - 2.0 * nec * k
        dic_b = dic_a - (ncp / pq + nec) * k
        down = pyco2.sys(par1=ta_b, par2=dic_b, par1_type=1, par2_type=2, salinity=sal, temperature=temp, **OPTS)
        cases.append(
            {
                "temp": temp,
                "sal": sal,
                "u": u,
                "h": h,
                "length_m": length_m,
                "ncp": ncp,
                "nec": nec,
                "pq": pq,
                "rho_teos10": rho,
                "up": {"ta": ta_a, "dic": dic_a, "pco2": pco2_a, "o2": o2_a},
                "down": {"ta": ta_b, "dic": dic_b, "pco2": float(down["pCO2"]), "o2": o2_b},
            }
        )
    doc = {
        "source": "PyCO2SYS 1.8.3.4 and gsw 3.6 via test/reference/metabolism/generate.py",
        "cases": cases,
    }
    with open(path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    np.seterr(all="raise")
    main(sys.argv[1])

"""Reference vectors for libs/seawater (outside references, test env only).

Usage: python generate.py OUT.json

* gsw 3.6.23 (TEOS-10): density gsw.rho(SA, CT, 0) with SA = SR = gsw.SR_from_SP(SP) (no absolute-salinity
  anomaly: the site has no position in this check) and CT = gsw.CT_from_t(SA, t, 0); compared with our EOS-80
  within the documented EOS-80 vs TEOS-10 difference. Also gsw.O2sol_SP_pt (Garcia & Gordon 1992, Benson &
  Krause fit, umol/kg) at p = 0, where pt = t.
* PyCO2SYS 1.8.3.4: water vapour pressure (Weiss & Price 1980) as 1 - gas.vpfactor(t, S) at 1 atm.
Deterministic fixed grid; floats written by json.dump.
"""

import json
import sys

import gsw
import numpy as np
import PyCO2SYS as pyco2


def main(path):
    temps = np.arange(0.0, 40.0 + 1e-9, 2.5)
    sals = np.array([0.5, 5.0, 10.0, 20.0, 30.0, 33.0, 35.0, 37.0, 40.0, 42.0])
    t, s = np.meshgrid(temps, sals, indexing="ij")
    t = t.ravel()
    s = s.ravel()
    sa = gsw.SR_from_SP(s)
    ct = gsw.CT_from_t(sa, t, 0.0)
    rho = gsw.rho(sa, ct, 0.0)
    o2 = gsw.O2sol_SP_pt(s, t)
    pw = 1.0 - pyco2.gas.vpfactor(t, s)
    rows = [
        {
            "sal": float(s[i]),
            "temp": float(t[i]),
            "rho_teos10": float(rho[i]),
            "o2sol_umol_kg": float(o2[i]),
            "pw_atm": float(pw[i]),
        }
        for i in range(len(t))
    ]
    doc = {
        "source": f"gsw {gsw.__version__}; PyCO2SYS {pyco2.__version__}",
        "generator": "test/reference/seawater/generate.py",
        "rows": rows,
    }
    with open(path, "w") as f:
        json.dump(doc, f, indent=None, separators=(",", ":"))
        f.write("\n")
    print(f"wrote {len(rows)} rows to {path}")


if __name__ == "__main__":
    main(sys.argv[1])

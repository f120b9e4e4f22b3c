"""Times PyCO2SYS 1.8.3.4 on the TA + pCO2 grid of test/bench/carbonate.bench.ts (baseline of that benchmark).

Usage: python carbonate_pyco2sys_timing.py N  -> prints one JSON line {"solves", "seconds", "rate", "cpu_rate", "check_ph0"}
Same options as the reference vectors (Lueker 2000, Lee 2010, KSO4 Dickson, KF Perez & Fraga, total scale).
One vectorised call over the whole grid is PyCO2SYS's fastest mode, so this is its best case.
"""

import json
import sys
import time

import numpy as np
import PyCO2SYS as pyco2

n = int(sys.argv[1])
i = np.arange(n)
# The same deterministic grid as the TypeScript side: T 15-35, S 30-40, TA 1800-2600, pCO2 150-2000.
temp = 15 + 20 * ((i * 7919) % 1000) / 999
sal = 30 + 10 * ((i * 104729) % 1000) / 999
ta = 1800 + 800 * ((i * 1299709) % 1000) / 999
pco2 = 150 + 1850 * ((i * 15485863) % 1000) / 999
kw = dict(opt_k_carbonic=10, opt_total_borate=2, opt_k_bisulfate=1, opt_k_fluoride=2, opt_pH_scale=1)
pyco2.sys(par1=ta[:10], par2=pco2[:10], par1_type=1, par2_type=4, salinity=sal[:10], temperature=temp[:10], **kw)
best = float("inf")
best_cpu = float("inf")
for _ in range(3):
    t0 = time.perf_counter()
    c0 = time.process_time()
    r = pyco2.sys(par1=ta, par2=pco2, par1_type=1, par2_type=4, salinity=sal, temperature=temp, **kw)
    best = min(best, time.perf_counter() - t0)
    best_cpu = min(best_cpu, time.process_time() - c0)
print(
    json.dumps(
        {
            "solves": n,
            "seconds": best,
            "rate": n / best,
            "cpu_rate": n / best_cpu,
            "check_ph0": float(r["pH_total"][0]),
        }
    )
)

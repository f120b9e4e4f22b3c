"""Reference vectors for libs/carbonate from PyCO2SYS 1.8.3.4 (outside reference, test env only).

Usage: python generate.py OUT.json

PyCO2SYS's numeric option codes are mapped to our descriptive option names here and only here:
  carbonicConstants   lueker2000 -> opt_k_carbonic 10, dickson-millero1987 -> opt_k_carbonic 4
  boron  lee2010 -> opt_total_borate 2, uppstrom1974 -> opt_total_borate 1
  always total pH scale (opt_pH_scale 1), KSO4 Dickson 1990 (opt_k_bisulfate 1), KF Perez & Fraga 1987
  (opt_k_fluoride 2), CODATA 2018 gas constant (opt_gas_constant 3), no K0 pressure correction
  (opt_pressured_kCO2 0), 1 atm for the fugacity factor; phosphate, silicate, ammonia, sulfide = 0 unless a
  case sets phosphate and silicate.
Deliberate differences from PyCO2SYS's own choices, removed here so that values compare like with like:
  * KW: PyCO2SYS takes Millero (1995) on the seawater scale (our option kw = 'millero1995-sws'). Our default
    ('millero1995', the total-scale form of Dickson et al. 2007) is checked at P = 0 by passing that KW to
    PyCO2SYS as k_water / k_water_out.
  * Fugacity: PyCO2SYS drops the (1 - xCO2)^2 factor of Weiss (1974); the vectors are compared with our option
    fugacity = 'weiss1974-dilute', and the default's difference is checked against the fugacity factors.
  * Calcium: PyCO2SYS divides by 40.087 g/mol; we use 40.078, and pass our total calcium to it.
Deterministic: fixed grids, no random numbers; floats written by json.dump.
"""

import json
import sys

import numpy as np
import PyCO2SYS as pyco2

K1K2 = {"lueker2000": 10, "dickson-millero1987": 4}
BORON = {"lee2010": 2, "uppstrom1974": 1}

# PyCO2SYS par types: 1 TA, 2 DIC, 3 pH, 4 pCO2, 5 fCO2.
PAIRS = {
    "ta_dic": (1, 2),
    "ta_ph": (1, 3),
    "ta_pco2": (1, 4),
    "dic_ph": (2, 3),
    "dic_pco2": (2, 4),
    "ph_pco2": (3, 4),
    "ta_fco2": (1, 5),
    "dic_fco2": (2, 5),
}
PAR_KEY = {1: "alkalinity", 2: "dic", 3: "pH_total", 4: "pCO2", 5: "fCO2"}

OUT_KEYS = {
    "ta": "alkalinity",
    "dic": "dic",
    "ph": "pH_total",
    "ph_free": "pH_free",
    "ph_sws": "pH_sws",
    "pco2": "pCO2",
    "fco2": "fCO2",
    "co3": "carbonate",
    "hco3": "bicarbonate",
    "co2": "aqueous_CO2",
    "omega_ar": "saturation_aragonite",
    "omega_ca": "saturation_calcite",
    "revelle": "revelle_factor",
}
CONST_KEYS = {
    "k0": "k_CO2",
    "k1": "k_carbonic_1",
    "k2": "k_carbonic_2",
    "kb": "k_borate",
    "kw": "k_water",
    "ks": "k_bisulfate",
    "kf": "k_fluoride",
    "ksp_ar": "k_aragonite",
    "ksp_ca": "k_calcite",
}


def total_calcium_umol(sal):
    """Riley & Tongudai (1967) with Ca = 40.078 g/mol, umol/kg (as libs/carbonate/constants/totals.ts)."""
    return 0.02128 / 40.078 * (sal / 1.80655) * 1e6


def kw_guide_total(sal, temp_c):
    """Millero (1995) KW in the total-scale form of Dickson et al. (2007), mol2/kg2 (our default)."""
    t = temp_c + 273.15
    return np.exp(
        148.9652
        - 13847.26 / t
        - 23.6521 * np.log(t)
        + (118.67 / t - 5.977 + 1.0495 * np.log(t)) * np.sqrt(sal)
        - 0.01615 * sal
    )


def run(k1k2, boron, base, par1_type, par2_type, par1, par2, extra):
    kw = dict(
        par1=par1,
        par2=par2,
        par1_type=par1_type,
        par2_type=par2_type,
        salinity=base["sal"],
        temperature=base["temp"],
        pressure=base["pres"],
        temperature_out=base["temp_out"],
        pressure_out=base["pres_out"],
        total_phosphate=base["po4"],
        total_silicate=base["sio4"],
        total_calcium=total_calcium_umol(base["sal"]),
        opt_pH_scale=1,
        opt_k_carbonic=K1K2[k1k2],
        opt_total_borate=BORON[boron],
        opt_k_bisulfate=1,
        opt_k_fluoride=2,
        opt_gas_constant=3,
        opt_pressured_kCO2=0,
    )
    kw.update(extra)
    kw = {k: v for k, v in kw.items() if v is not None}
    return pyco2.sys(**kw)


def block(name, k1k2, boron, kw_option, grid, pairs, out_conditions):
    """One block of cases: a grid of (sal, temp, pres, ta, pco2, ...) and a list of pair names."""
    base = {k: np.array([g[k] for g in grid], dtype=float) for k in grid[0]}
    extra = {}
    if kw_option == "millero1995":
        if np.any(base["pres"] != 0) or np.any(base["pres_out"] != 0):
            raise ValueError("the total-scale KW override is exact only at P = 0")
        extra = dict(
            k_water=kw_guide_total(base["sal"], base["temp"]),
            k_water_out=kw_guide_total(base["sal"], base["temp_out"]),
        )
    seed = run(k1k2, boron, base, 1, 4, base["ta"], base["pco2"], extra)
    values = {1: seed["alkalinity"], 2: seed["dic"], 3: seed["pH_total"], 4: seed["pCO2"], 5: seed["fCO2"]}
    cases = []
    for pair in pairs:
        t1, t2 = PAIRS[pair]
        r = run(k1k2, boron, base, t1, t2, values[t1], values[t2], extra)
        for i in range(len(grid)):
            case = {
                "block": name,
                "pair": pair,
                "sal": float(base["sal"][i]),
                "temp": float(base["temp"][i]),
                "pres": float(base["pres"][i]),
                "po4": float(base["po4"][i]),
                "sio4": float(base["sio4"][i]),
                "in": {PAR_KEY[t1]: float(values[t1][i]), PAR_KEY[t2]: float(values[t2][i])},
            }
            if out_conditions:
                case["temp_out"] = float(base["temp_out"][i])
                case["pres_out"] = float(base["pres_out"][i])
            sfx = "_out" if out_conditions else ""
            case["expect"] = {
                k: float((r[v] if v in ("alkalinity", "dic") else r[v + sfx])[i]) for k, v in OUT_KEYS.items()
            }
            cases.append(case)
    constants = []
    for i in range(len(grid)):
        constants.append(
            {
                "sal": float(base["sal"][i]),
                "temp": float(base["temp"][i]),
                "pres": float(base["pres"][i]),
                **{k: float(seed[v][i]) for k, v in CONST_KEYS.items()},
                "bt": float(seed["total_borate"][i]),
                "fugacity_factor": float(seed["fugacity_factor"][i]),
            }
        )
    return {
        "name": name,
        # PyCO2SYS's fugacity factor is the dilute limit of Weiss (1974): our option fugacity 'weiss1974-dilute'.
        "options": {"carbonicConstants": k1k2, "boron": boron, "kw": kw_option, "fugacity": "weiss1974-dilute"},
        "cases": cases,
        "constants": constants,
    }


# First-order uncertainties (PyCO2SYS uncertainty_from/uncertainty_into, forward finite differences).
# Our names -> PyCO2SYS keys; pK sigmas after Orr et al. (2018) as in docs/methods/uncertainty.md 9.1.
U_CONSTANTS = {
    "pK0": ("pk_CO2", 0.002),
    "pK1": ("pk_carbonic_1", 0.0075),
    "pK2": ("pk_carbonic_2", 0.015),
    "pKB": ("pk_borate", 0.01),
    "pKW": ("pk_water", 0.01),
    "pKspAr": ("pk_aragonite", 0.02),
    "pKspCa": ("pk_calcite", 0.02),
    "btRel": ("total_borate__f", 0.02),
}
U_INPUT = {1: 5.0, 2: 2.0, 3: 0.01, 4: 2.0}
U_OUT = {
    "ta": "alkalinity",
    "dic": "dic",
    "ph": "pH_total",
    "pco2": "pCO2",
    "co3": "carbonate",
    "omega_ar": "saturation_aragonite",
    "omega_ca": "saturation_calcite",
    "revelle": "revelle_factor",
}


def uncertainty_block(g):
    base = {k: np.array([x[k] for x in g], dtype=float) for k in g[0]}
    seed = run("lueker2000", "lee2010", base, 1, 4, base["ta"], base["pco2"], {})
    values = {1: seed["alkalinity"], 2: seed["dic"], 3: seed["pH_total"], 4: seed["pCO2"]}
    cases = []
    for pair in ["ta_pco2", "ta_dic", "ph_pco2"]:
        t1, t2 = PAIRS[pair]
        u_from = {"par1": U_INPUT[t1], "par2": U_INPUT[t2], "temperature": 0.05, "salinity": 0.05}
        u_from.update({v[0]: v[1] for v in U_CONSTANTS.values()})
        extra = dict(uncertainty_into=list(U_OUT.values()), uncertainty_from=u_from)
        # PyCO2SYS holds a given total_calcium fixed when it perturbs salinity; let it scale calcium with
        # salinity (its 40.087 g/mol) here instead. Our Omega sigmas are then theirs x 40.087/40.078 exactly.
        extra["total_calcium"] = None
        r = run("lueker2000", "lee2010", base, t1, t2, values[t1], values[t2], extra)
        for i in range(len(g)):
            cases.append(
                {
                    "pair": pair,
                    "sal": float(base["sal"][i]),
                    "temp": float(base["temp"][i]),
                    "in": {PAR_KEY[t1]: float(values[t1][i]), PAR_KEY[t2]: float(values[t2][i])},
                    "sigma_in": {PAR_KEY[t1]: U_INPUT[t1], PAR_KEY[t2]: U_INPUT[t2]},
                    "sigma": {k: float(r["u_" + v][i]) for k, v in U_OUT.items()},
                }
            )
    return {
        "options": {"carbonicConstants": "lueker2000", "boron": "lee2010", "kw": "millero1995-sws", "fugacity": "weiss1974-dilute"},
        "sigma_temp": 0.05,
        "sigma_sal": 0.05,
        "omega_calcium_factor": 40.087 / 40.078,
        "constants": {k: v[1] for k, v in U_CONSTANTS.items()},
        "cases": cases,
    }


def grid(temps, sals, tas, pco2s, pres=(0.0,), temp_out=None, pres_out=None, po4=0.0, sio4=0.0):
    g = []
    for t in temps:
        for s in sals:
            for p in pres:
                for ta in tas:
                    for pc in pco2s:
                        g.append(
                            dict(
                                sal=s,
                                temp=t,
                                pres=p,
                                ta=ta,
                                pco2=pc,
                                temp_out=t if temp_out is None else temp_out,
                                pres_out=p if pres_out is None else pres_out,
                                po4=po4,
                                sio4=sio4,
                            )
                        )
    return g


def main(path):
    all_pairs = list(PAIRS)
    temps = [15.0, 20.0, 25.0, 30.0, 35.0]
    sals = [30.0, 33.0, 35.0, 37.5, 40.0]
    tas = [1800.0, 2200.0, 2600.0]
    pco2s = [150.0, 400.0, 1000.0, 2000.0]
    small = dict(temps=[15.0, 25.0, 35.0], sals=[30.0, 35.0, 40.0], tas=[1800.0, 2600.0], pco2s=[150.0, 2000.0])
    blocks = [
        # The reef grid, every pair, PyCO2SYS's own KW form.
        block("reef-lueker-lee", "lueker2000", "lee2010", "millero1995-sws", grid(temps, sals, tas, pco2s), all_pairs, False),
        # Our default KW (total-scale form) through PyCO2SYS with k_water passed in, P = 0.
        block("reef-default-kw", "lueker2000", "lee2010", "millero1995", grid(**small), all_pairs, False),
        # Alternative constants.
        block("dm87-lee", "dickson-millero1987", "lee2010", "millero1995-sws", grid(**small), all_pairs, False),
        block("lueker-uppstrom", "lueker2000", "uppstrom1974", "millero1995-sws", grid(**small), all_pairs, False),
        # Pressure corrections (deeper stations) and input/output conditions.
        block(
            "pressure",
            "lueker2000",
            "lee2010",
            "millero1995-sws",
            grid(**small, pres=(10.0, 100.0, 1000.0, 5000.0)),
            ["ta_dic", "ta_pco2", "dic_ph", "ph_pco2"],
            False,
        ),
        block(
            "in-out",
            "lueker2000",
            "lee2010",
            "millero1995-sws",
            grid(**small, temp_out=27.0, pres_out=5.0),
            ["ta_pco2", "ta_ph", "dic_pco2", "ph_pco2"],
            True,
        ),
        block(
            "in-out-default-kw",
            "lueker2000",
            "lee2010",
            "millero1995",
            grid(**small, temp_out=22.0, pres_out=0.0),
            ["ta_pco2", "ta_dic"],
            True,
        ),
        # Nutrients: phosphate and silicate (Yao & Millero 1995 constants).
        block(
            "nutrients",
            "lueker2000",
            "lee2010",
            "millero1995-sws",
            grid(**small, po4=2.0, sio4=30.0),
            ["ta_dic", "ta_pco2", "ta_ph", "dic_ph"],
            False,
        ),
    ]
    doc = {
        "source": f"PyCO2SYS {pyco2.__version__}",
        "uncertainty": uncertainty_block(grid(**small)),
        "generator": "test/reference/carbonate/generate.py",
        "units": "umol/kg, uatm, total pH scale; constants mol/kg units on the total scale (ks, kf free scale)",
        "blocks": blocks,
    }
    with open(path, "w") as f:
        json.dump(doc, f, indent=None, separators=(",", ":"))
        f.write("\n")
    n = sum(len(b["cases"]) for b in blocks)
    print(f"wrote {n} cases in {len(blocks)} blocks to {path}")


if __name__ == "__main__":
    main(sys.argv[1])

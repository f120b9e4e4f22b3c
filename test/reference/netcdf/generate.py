"""Reads reefd's NetCDF exports back with netCDF4 and xarray and runs the IOOS compliance checker.

Builds the export fixture with test/reference/netcdf/make-exports.ts (12 h of the fictional Ornen Reef,
replayed and exported by reefd), then for every NetCDF file:
  - netCDF4-python reads every expected value (file, variable, time) and it must equal the record's value;
  - xarray opens it with CF decoding (times become datetime64, fill values NaN);
  - compliance-checker 6.1.0 runs its CF 1.8 and ACDD 1.3 suites; the counts of failed checks by priority
    (high = errors, medium = warnings, low = information) are written, with the messages of high ones.
The CSV export is read with pandas and checked the same way for its row counts, and for the records marked
calibrated (the fixture's replay has a calibration file).
Writes one JSON summary to argv[1]; test/reference/netcdf.test.ts asserts zero CF errors on it.
"""
import json
import os
import subprocess
import sys
import tempfile
import warnings

import netCDF4
import numpy as np
import pandas as pd
import xarray as xr
from compliance_checker.runner import CheckSuite

REPO = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", "..", ".."))


def run_checker(suite, path):
    ds = suite.load_dataset(path)
    out = {}
    results = suite.run_all(ds, ["cf:1.8", "acdd:1.3"], skip_checks=[])
    for name, (groups, errors) in sorted(results.items()):
        counts = {"high": 0, "medium": 0, "low": 0}
        high_msgs = []
        for r in groups:
            value = r.value
            failed = (value[0] < value[1]) if isinstance(value, tuple) else (value is False)
            if not failed:
                continue
            level = {3: "high", 2: "medium", 1: "low"}.get(r.weight, "low")
            counts[level] += 1
            if level == "high":
                high_msgs.extend(str(m) for m in r.msgs)
        out[name.split(":")[0]] = {"failed": counts, "high_messages": sorted(high_msgs), "exceptions": len(errors)}
    return out


def main(out_path):
    work = tempfile.mkdtemp(prefix="reefd-nc-ref-")
    tsx = os.path.join(REPO, "node_modules", ".bin", "tsx")
    subprocess.run([tsx, os.path.join(REPO, "test/reference/netcdf/make-exports.ts"), work], check=True, cwd=REPO)
    with open(os.path.join(work, "expect.json")) as fh:
        expect = json.load(fh)
    by_file = {}
    for e in expect["values"]:
        by_file.setdefault(e["file"], []).append(e)

    suite = CheckSuite()
    suite.load_all_available_checkers()
    files = {}
    nc_dir = os.path.join(work, "nc")
    for name in sorted(os.listdir(nc_dir)):
        path = os.path.join(nc_dir, name)
        d = netCDF4.Dataset(path)
        times = netCDF4.num2date(d["time"][:], d["time"].units, only_use_cftime_datetimes=False)
        index = {t.strftime("%Y-%m-%dT%H:%M:%S.%f")[:-3] + "Z": i for i, t in enumerate(times)}
        checked = 0
        mismatches = []
        for e in by_file.get(name, []):
            i = index.get(e["t"])
            got = None if i is None else d[e["variable"]][i]
            if got is None or np.ma.is_masked(got) or not np.isclose(float(got), e["value"], rtol=0, atol=0):
                mismatches.append({"variable": e["variable"], "t": e["t"], "want": e["value"], "got": None if got is None or np.ma.is_masked(got) else float(got)})
            checked += 1
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            x = xr.open_dataset(path)
        info = {
            "format": d.file_format,
            "feature_type": d.featureType,
            "variables": sorted(d.variables.keys()),
            # counts depend on what the processor derives; the check is that every value was found
            "values_checked_over_200": checked > 200,
            "every_time_present": all(e["t"] in index for e in by_file.get(name, [])),
            "mismatches": mismatches[:10],
            "mismatch_count": len(mismatches),
            "xarray_time_dtype": str(x["time"].dtype),
            "xarray_first_time": str(x["time"].values[0])[:19],
            "checker": run_checker(suite, path),
        }
        if name.endswith("transect_" + expect["revised"]["transect"] + ".nc"):
            i = index[expect["revised"]["t"]]
            info["revised_ncp"] = float(d["ncp_mmol_m2_h"][i])
        x.close()
        d.close()
        files[name] = info

    csv = {}
    for name in sorted(os.listdir(os.path.join(work, "csv"))):
        df = pd.read_csv(os.path.join(work, "csv", name))
        csv[name] = {"has_rows": bool(len(df) > 0), "first_columns": list(df.columns)[:3]}
    rec = [json.loads(l) for l in open(os.path.join(work, "records.ndjson"))]
    flux = pd.read_csv(os.path.join(work, "csv", "flux.csv"))
    rev = flux[(flux["t"] == expect["revised"]["t"]) & (flux["transect"] == expect["revised"]["transect"])]
    summary = {
        "source": "netCDF4 %s, xarray %s, pandas %s, compliance-checker (CF 1.8, ACDD 1.3)" % (netCDF4.__version__, xr.__version__, pd.__version__),
        "records_read_back": len(rec) > 0,
        "netcdf": files,
        "csv": csv,
        "csv_revised_rows": int(len(rev)),
        "csv_revised_ncp": float(rev["ncp_mmol_m2_h"].iloc[0]),
        # records built from corrected values (calibration file): marked in the CSV, exported like the rest
        "csv_calibrated": {
            name: int((pd.read_csv(os.path.join(work, "csv", name)).get("calibrated", pd.Series(dtype=object)) == True).sum())
            for name in ("carbonate.csv", "oxygen.csv", "flux.csv")
        },
    }
    with open(out_path, "w") as fh:
        json.dump(summary, fh, indent=1, sort_keys=True)
        fh.write("\n")


if __name__ == "__main__":
    main(sys.argv[1])

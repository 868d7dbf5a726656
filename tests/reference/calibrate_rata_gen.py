#!/usr/bin/env python3
"""Independent reference values for the `annulus calibrate` and `annulus rata` end-to-end tests
(tests/calibrate_rata.rs), computed with numpy and scipy straight from the fixture files.

Run:  pip install numpy==2.4.6 scipy==1.17.1
      python3 tests/reference/calibrate_rata_gen.py > tests/reference/calibrate_rata.json

The script reads the fixtures itself (Python's tomllib and csv), converts units with its own
exact factors (1 ft = 0.3048 m; 1 cfm = 0.3048**3/60 m3/s; 1 inH2O = 249.08891 Pa, which cancels
in the coefficient ratio), and evaluates:

  calibration (EPA Method 2 §10.1 as in calculations.md §6):
    Cp(s) = Cp(std) * sqrt(dp_std / dp_s), Cp(std) = 0.99 when not given;
    per leg mean and sigma = mean(|Cp - mean|); |mean_A - mean_B|; accept when all <= 0.01.
  RATA (40 CFR 75 App. A §7 as in calculations.md §7, from memory there):
    d = RM - CEM over the runs not rejected; dbar = mean(d); sd = std(d, ddof=1);
    t = scipy.stats.t.ppf(0.975, n - 1); cc = t * sd / sqrt(n); RA = (|dbar| + |cc|) / mean(RM) * 100;
    bias fails when dbar > |cc|, then BAF = 1 + |dbar| / mean(CEM), else 1;
    low-velocity alternative |mean(RM) - mean(CEM)| when mean(RM) <= 10 ft/s.

Values are SI (m/s or m3/s) and printed with 17 significant digits.
"""

import csv
import json
import math
import pathlib
import sys
import tomllib
import importlib.metadata

import numpy as np
from scipy import stats

ROOT = pathlib.Path(__file__).resolve().parents[2]
FT = 0.3048
UNITS = {
    "m/s": ("velocity", 1.0),
    "ft/s": ("velocity", FT),
    "fpm": ("velocity", FT / 60.0),
    "m3/s": ("flow", 1.0),
    "m3/h": ("flow", 1.0 / 3600.0),
    "cfm": ("flow", FT**3 / 60.0),
}
PRESSURE = {"Pa": 1.0, "inH2O": 249.08891}


def quantity(text):
    number, unit = text.split()
    return float(number) * UNITS[unit][1]


def calibration(name):
    spec = tomllib.loads((ROOT / "tests/data/calibration" / f"{name}.toml").read_text())
    cp_std = spec.get("standard", {}).get("coefficient", 0.99)
    rows = []
    with open(ROOT / "tests/data/calibration" / spec["calibration"]["readings"], newline="") as f:
        reader = csv.reader(line for line in f if not line.startswith("#"))
        header = next(reader)
        std_unit = header[1].split("[")[1].rstrip("]")
        s_unit = header[2].split("[")[1].rstrip("]")
        for r in reader:
            rows.append((r[0], float(r[1]) * PRESSURE[std_unit], float(r[2]) * PRESSURE[s_unit]))
    legs = {}
    for leg in "AB":
        cp = np.array([cp_std * math.sqrt(s / t) for (l, s, t) in rows if l == leg])
        mean = cp.mean()
        legs[leg] = {"coefficients": cp.tolist(), "mean": mean, "deviation": np.abs(cp - mean).mean()}
    diff = abs(legs["A"]["mean"] - legs["B"]["mean"])
    return {
        "standard_coefficient": cp_std,
        "legs": legs,
        "leg_difference": diff,
        "assigned_coefficient": (legs["A"]["mean"] + legs["B"]["mean"]) / 2.0,
        "accepted": bool(legs["A"]["deviation"] <= 0.01 and legs["B"]["deviation"] <= 0.01 and diff <= 0.01),
    }


def rata(name):
    spec = tomllib.loads((ROOT / "tests/data/rata" / f"{name}.toml").read_text())
    used = [r for r in spec["run"] if "rejected" not in r]
    rm = np.array([quantity(r["reference"]) for r in used])
    cem = np.array([quantity(r["monitor"]) for r in used])
    d = rm - cem
    n = len(d)
    dbar = d.mean()
    sd = d.std(ddof=1)
    t = stats.t.ppf(0.975, n - 1)
    cc = t * sd / math.sqrt(n)
    ra = (abs(dbar) + abs(cc)) / rm.mean() * 100.0
    bias_passed = bool(dbar <= abs(cc))
    out = {
        "used_runs": n,
        "rejected_runs": len(spec["run"]) - n,
        "mean_difference": dbar,
        "std_dev_difference": sd,
        "t_value": t,
        "confidence_coefficient": cc,
        "reference_mean": rm.mean(),
        "monitor_mean": cem.mean(),
        "relative_accuracy_percent": ra,
        "bias_passed": bias_passed,
        "adjustment_factor": 1.0 if bias_passed else 1.0 + abs(dbar) / cem.mean(),
    }
    if spec["rata"]["quantity"] == "velocity" and rm.mean() <= 10 * FT:
        out["abs_mean_difference_m_s"] = abs(rm.mean() - cem.mean())
    return out


def main():
    doc = {
        "generator": "tests/reference/calibrate_rata_gen.py",
        "numpy": importlib.metadata.version("numpy"),
        "scipy": importlib.metadata.version("scipy"),
        "calibration": {n: calibration(n) for n in ["method2-example", "rejected"]},
        "rata": {n: rata(n) for n in ["passing", "bias-fail", "low-velocity", "failing"]},
    }

    def floats(o):
        if isinstance(o, dict):
            return {k: floats(v) for k, v in o.items()}
        if isinstance(o, list):
            return [floats(v) for v in o]
        if isinstance(o, (float, np.floating)):
            return float(f"{float(o):.17g}")
        if isinstance(o, np.integer):
            return int(o)
        return o

    json.dump(floats(doc), sys.stdout, indent=2)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()

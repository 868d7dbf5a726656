#!/usr/bin/env python3
"""A plain Python reviewer of the generated benchmark archive, for side-by-side timing with
`annulus review` (see benches/timing.py, which runs both on the same archive and reports ratios).

It does the Method 2 velocity and flow work of a review and nothing else: for every
`survey.toml` under the folder it reads the survey (tomllib), reads each run's readings CSV,
computes per run the stack velocity from (sqrt dp)avg and the mean stack temperature (EPA
Method 2, 40 CFR 60 Appendix A, eq. 2-7: vs = Kp Cp (sqrt dp)avg sqrt(Ts / (Ps Ms)), with
Ps = Pbar + Pg/13.6 (eq. 2-6), Ms = Md (1 - Bws) + 18.0 Bws and Md = 0.440 %CO2 + 0.320 %O2
+ 0.280 (%N2 + %CO) (Method 3 eq. 3-1 as Method 2 section 12.5 uses it)) and the dry standard
flow (eq. 2-10: Qsd = 3600 (1 - Bws) vs A (Tstd / Ts) (Ps / Pstd), Tstd = 528 R,
Pstd = 29.92 inHg), then the average of the runs in dscfm. It runs none of annulus's acceptance
checks, uncertainty budgets, data-integrity tests or reported-figure forensics, and reads only the
units the generated archive uses (in, inHg, inH2O, %, F): a lean script, so a ratio against it is
a floor on what the extra work costs.

Variants (the arithmetic is the same; what differs is how the CSV is read and summed):
  stdlib  csv module and plain floats
  numpy   numpy.loadtxt and array arithmetic
  pandas  pandas.read_csv and column arithmetic

numpy and pandas are not part of the project: install them with `pip install numpy pandas`.

Usage:
  python3 benches/reviewer.py [--variant stdlib|numpy|pandas] ARCHIVE_DIR > figures.csv

Prints `file,dscfm` per survey (paths relative to ARCHIVE_DIR, sorted), so the figures can be
compared with `annulus review --format json` (benches/timing.py does, to 0.01 %).
"""

import argparse
import math
import os
import sys
import tomllib

KP = 85.49  # ft/s [(lb/lb-mole)(inHg)/((R)(inH2O))]^0.5, Method 2 eq. 2-7
TSTD_R = 528.0  # Method 2 section 12.1
PSTD_INHG = 29.92
RANKINE = 460.0  # Method 2 uses 460 (eq. 2-7 nomenclature)


def quantity(text, unit):
    """'29.40 inHg' -> 29.4; refuses any other unit (the archive uses one unit per key)."""
    value, _, got = text.strip().partition(" ")
    if got.strip() != unit:
        raise ValueError(f"expected {unit}, got {text!r}")
    return float(value)


def readings_stdlib(path):
    import csv

    n = 0
    sum_sqrt = 0.0
    sum_t = 0.0
    with open(path, newline="") as f:
        rows = csv.reader(f)
        header = next(rows)
        dp_col = header.index("dp[inH2O]")
        t_col = header.index("temperature[F]")
        for row in rows:
            dp = float(row[dp_col])
            sum_sqrt += math.sqrt(dp) if dp > 0 else 0.0
            sum_t += float(row[t_col])
            n += 1
    return sum_sqrt / n, sum_t / n


def readings_numpy(path):
    import numpy as np

    data = np.loadtxt(path, delimiter=",", skiprows=1, usecols=(2, 3), ndmin=2)
    dp = np.clip(data[:, 0], 0.0, None)
    return float(np.sqrt(dp).mean()), float(data[:, 1].mean())


def readings_pandas(path):
    import numpy as np
    import pandas as pd

    frame = pd.read_csv(path, usecols=["dp[inH2O]", "temperature[F]"])
    dp = frame["dp[inH2O]"].clip(lower=0.0)
    return float(np.sqrt(dp).mean()), float(frame["temperature[F]"].mean())


READERS = {"stdlib": readings_stdlib, "numpy": readings_numpy, "pandas": readings_pandas}


def review_survey(path, readings):
    with open(path, "rb") as f:
        s = tomllib.load(f)
    folder = os.path.dirname(path)
    diameter_ft = quantity(s["duct"]["diameter"], "in") / 12.0
    area_ft2 = math.pi * diameter_ft * diameter_ft / 4.0
    cp = float(s["probe"]["coefficient"])
    gas = s["gas"]
    ps = quantity(gas["barometric"], "inHg") + quantity(gas["static"], "inH2O") / 13.6
    o2 = quantity(gas["o2"], "%")
    co2 = quantity(gas["co2"], "%")
    co = quantity(gas["co"], "%")
    bws = quantity(gas["moisture"], "%") / 100.0
    n2 = 100.0 - co2 - o2 - co
    md = 0.440 * co2 + 0.320 * o2 + 0.280 * (n2 + co)
    ms = md * (1.0 - bws) + 18.0 * bws
    flows = []
    for run in s["run"]:
        sqrt_dp, t_f = readings(os.path.join(folder, run["readings"]))
        ts = t_f + RANKINE
        vs = KP * cp * sqrt_dp * math.sqrt(ts / (ps * ms))
        qsd = 3600.0 * (1.0 - bws) * vs * area_ft2 * (TSTD_R / ts) * (ps / PSTD_INHG)
        flows.append(qsd / 60.0)
    return sum(flows) / len(flows)


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--variant", choices=sorted(READERS), default="stdlib")
    parser.add_argument("archive")
    args = parser.parse_args()
    readings = READERS[args.variant]
    surveys = []
    for folder, dirs, files in os.walk(args.archive):
        dirs[:] = [d for d in dirs if not d.startswith(".")]
        surveys += [os.path.join(folder, f) for f in files if f == "survey.toml"]
    out = ["file,dscfm"]
    for path in sorted(surveys):
        out.append(f"{os.path.relpath(path, args.archive)},{review_survey(path, readings):.6g}")
    sys.stdout.write("\n".join(out) + "\n")


if __name__ == "__main__":
    main()

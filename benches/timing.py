#!/usr/bin/env python3
"""Whole-command timings of annulus, medians of interleaved runs, with peak memory, and the
plain Python reviewers side by side (ratios). The figures of the README's speed table.

What it runs (in a temporary folder; it writes nothing in the repository):
  review         `annulus review ARCHIVE --format json` over the generated archive: 10 000 stack
                 surveys (3 runs x 2 lines x 12 points, invented data, benches/common/archive.rs,
                 written by `cargo run --release --example review_archive`)
  review-ndjson  the same, `--format ndjson` (streamed)
  review-calib   the same archive generated with `--calibration`: every survey takes its pitot
                 coefficient from one shared calibration record
  report         `annulus report` of sample-data/stack/survey.toml (unsigned)
  report-1600    `annulus report` of the sample stack as a 40 x 40 rectangular grid: 1 600 points
                 per run, 3 runs (invented readings)
  verify         `annulus verify` of the sample report, signed by a key given with --key
  verify-1600    `annulus verify` of the 1 600-point report (about 10 MB), signed the same way
  py-stdlib, py-numpy, py-pandas
                 benches/reviewer.py over the same archive (Method 2 velocity and flow only); each
                 one's figures are first checked against annulus's to 0.01 %

Every round runs every case once, in the same order, so slow spells of a shared machine fall on
all of them; the medians of the rounds are reported, with the range, the peak resident memory
(GNU time's maximum resident set size of the command, the largest of the rounds) and, for the
review cases, surveys per second.

Requirements: a release build (`cargo build --release --locked`), Python 3.11 or later, GNU time
(/usr/bin/time) for the memory figures;
for the numpy and pandas reviewers `pip install numpy pandas` (skipped, and said so, without them).

Usage:
  python3 benches/timing.py [--annulus BIN] [--baseline OLD_BIN] [--rounds N] [--surveys N]
                            [--only CASE,CASE...] [--archive DIR] [--archive-calib DIR]

With --baseline, every annulus case is also run with OLD_BIN in the same rounds, and the table
gives old / new ratios: a before/after measured in one go.
"""

import argparse
import csv
import json
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
MIB = 1024 * 1024


TIME = "/usr/bin/time"  # GNU time: measures the peak memory of the command alone


def run(cmd, cwd=None, stdout=subprocess.DEVNULL):
    """Runs cmd; returns (wall seconds, peak RSS bytes, exit code).

    The peak comes from GNU time when it is installed: the rusage of a child forked from this
    script counts this script's own resident memory (Linux keeps the larger of the forked copy's
    and the command's peak), which would put a floor of tens of MiB under every figure. Without
    GNU time that floor is there, and said so in the output."""
    peak_file = None
    if os.access(TIME, os.X_OK):
        fd, peak_file = tempfile.mkstemp(prefix="annulus-peak-")
        os.close(fd)
        cmd = [TIME, "-f", "%M", "-o", peak_file] + cmd
    start = time.perf_counter()
    proc = subprocess.Popen(cmd, cwd=cwd, stdout=stdout, stderr=subprocess.DEVNULL)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - start
    peak = usage.ru_maxrss * 1024
    if peak_file:
        with open(peak_file) as f:
            lines = f.read().split()
        os.unlink(peak_file)
        if lines and lines[-1].isdigit():
            peak = int(lines[-1]) * 1024
    return wall, peak, os.waitstatus_to_exitcode(status)


def grid_survey(stack_dir, out_dir, n):
    """The sample stack survey as an n x n rectangular grid with invented readings."""
    import random

    os.makedirs(out_dir, exist_ok=True)
    with open(os.path.join(stack_dir, "survey.toml")) as f:
        text = f.read()
    replaced = (
        text.replace('shape = "round"\ndiameter = "96 in"',
                     'shape = "rectangular"\nwidth = "200 in"\nheight = "200 in"')
        .replace("\nlines = 2\n", f"\nlines = {n}\n")
        .replace("\npoints_per_line = 12\n", f"\npoints_per_line = {n}\n")
    )
    lines = []
    for line in replaced.split("\n"):
        if line.startswith('calibration = "../calibration/ts-0417.toml"'):
            line = "coefficient = 0.84"
        lines.append(line)
    replaced = "\n".join(lines)
    if replaced.count(f"= {n}\n") < 2 or "rectangular" not in replaced:
        sys.exit("the sample stack survey changed: update grid_survey in benches/timing.py")
    with open(os.path.join(out_dir, "survey.toml"), "w") as f:
        f.write(replaced)
    rng = random.Random(1600)
    for r in (1, 2, 3):
        rows = ["line,point,dp[inH2O],temperature[F],yaw[deg]"]
        for l in range(n):
            name = chr(65 + l) if l < 26 else "A" + chr(65 + l - 26)
            for p in range(1, n + 1):
                shape = __import__("math").sin(p / n * 3.14159)
                dp = 0.4 + 0.3 * shape + rng.random() * 0.02
                rows.append(f"{name},{p},{dp:.3f},{300 + rng.randrange(3)},{rng.randrange(7)}")
        with open(os.path.join(out_dir, f"run{r}.csv"), "w") as f:
            f.write("\n".join(rows) + "\n")


def check_python_figures(annulus, archive, variant, work):
    """The reviewer's dscfm per survey against annulus review's key figure, to 0.01 %."""
    out = os.path.join(work, "review.json")
    with open(out, "w") as f:
        subprocess.run([annulus, "review", archive, "--format", "json"], stdout=f, check=False)
    with open(out) as f:
        doc = json.load(f)
    ours = {}
    for entry in doc["files"]:
        if entry["kind"] == "survey":
            ours[os.path.relpath(entry["file"], archive)] = entry["key_figure"]
    res = subprocess.run([sys.executable, os.path.join(HERE, "reviewer.py"), "--variant", variant,
                          archive], capture_output=True, text=True, check=True)
    worst = 0.0
    rows = list(csv.DictReader(res.stdout.splitlines()))
    for row in rows:
        a = ours[row["file"]]
        worst = max(worst, abs(float(row["dscfm"]) - a) / a)
    if len(rows) != len(ours) or worst > 1e-4:
        sys.exit(f"reviewer.py --variant {variant} disagrees with annulus: {len(rows)} vs "
                 f"{len(ours)} surveys, worst relative difference {worst:.2e}")
    return worst


def has_module(name):
    return subprocess.run([sys.executable, "-c", f"import {name}"],
                          capture_output=True).returncode == 0


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--annulus", default=os.path.join(ROOT, "target", "release", "annulus"))
    parser.add_argument("--baseline", help="another annulus binary, run in the same rounds")
    parser.add_argument("--rounds", type=int, default=5)
    parser.add_argument("--surveys", type=int, default=10_000)
    parser.add_argument("--only", help="comma-separated cases (default: all)")
    parser.add_argument("--archive", help="review this folder instead of generating one")
    parser.add_argument("--archive-calib", help="the same for review-calib (`--calibration`)")
    parser.add_argument("--keep", action="store_true", help="keep the temporary folder")
    args = parser.parse_args()
    new = os.path.abspath(args.annulus)
    base = os.path.abspath(args.baseline) if args.baseline else None
    only = set(args.only.split(",")) if args.only else None
    want = lambda case: only is None or case in only  # noqa: E731

    work = tempfile.mkdtemp(prefix="annulus-timing-")
    env_config = os.environ.pop("ANNULUS_CONFIG", None)  # no user configuration
    os.environ["ANNULUS_CONFIG"] = ""
    try:
        archive = os.path.abspath(args.archive or os.path.join(work, "archive"))
        archive_calib = os.path.abspath(args.archive_calib or os.path.join(work, "archive-calib"))
        gen = ["cargo", "run", "--quiet", "--release", "--locked", "--example", "review_archive",
               "--"]
        if not args.archive and any(
                want(c) for c in ("review", "review-ndjson", "py-stdlib", "py-numpy", "py-pandas")):
            subprocess.run(gen + [archive, str(args.surveys)], cwd=ROOT, check=True,
                           stdout=subprocess.DEVNULL)
        if not args.archive_calib and want("review-calib"):
            subprocess.run(gen + [archive_calib, str(args.surveys), "--calibration"], cwd=ROOT,
                           check=True, stdout=subprocess.DEVNULL)
        shutil.copytree(os.path.join(ROOT, "sample-data", "stack"), os.path.join(work, "stack"))
        shutil.copytree(os.path.join(ROOT, "sample-data", "calibration"),
                        os.path.join(work, "calibration"))
        grid_survey(os.path.join(work, "stack"), os.path.join(work, "grid"), 40)

        bins = [("new", new)] + ([("old", base)] if base else [])
        notes = []
        unable = set()  # (case, tag) a binary cannot run on today's sample data
        # signed reports to verify, one set per binary (each verifies its own)
        for tag, binary in bins:
            d = os.path.join(work, tag)
            os.makedirs(d)
            if not (want("verify") or want("verify-1600")):
                continue
            subprocess.run([binary, "--quiet", "keygen", "key"], cwd=d, check=True,
                           stdout=subprocess.DEVNULL)
            for name, folder in (("sample", "stack"), ("grid", "grid")):
                made = subprocess.run([binary, "report", "survey.toml", "-o",
                                       os.path.join(d, f"{name}.pdf"), "--sign",
                                       os.path.join(d, "key.key")],
                                      cwd=os.path.join(work, folder), stdout=subprocess.DEVNULL,
                                      stderr=subprocess.DEVNULL)
                if made.returncode != 0:
                    case = "verify" if name == "sample" else "verify-1600"
                    unable.add((case, tag))
                    notes.append(f"{case} ({tag}): this binary cannot report today's sample survey")

        def annulus_cases(tag, binary):
            d = os.path.join(work, tag)
            out = os.path.join(d, "out.pdf")
            return [
                ("review", [binary, "review", archive, "--format", "json"], None, args.surveys),
                ("review-ndjson", [binary, "review", archive, "--format", "ndjson"], None,
                 args.surveys),
                ("review-calib", [binary, "review", archive_calib, "--format", "json"], None,
                 args.surveys),
                ("report", [binary, "report", "survey.toml", "-o", out],
                 os.path.join(work, "stack"), None),
                ("report-1600", [binary, "report", "survey.toml", "-o", out],
                 os.path.join(work, "grid"), None),
                ("verify", [binary, "verify", os.path.join(d, "sample.pdf"), "--key",
                            os.path.join(d, "key.pub")], None, None),
                ("verify-1600", [binary, "verify", os.path.join(d, "grid.pdf"), "--key",
                                 os.path.join(d, "key.pub")], None, None),
            ]

        cases = []  # (name, tag, cmd, cwd, surveys)
        for tag, binary in bins:
            for name, cmd, cwd, n in annulus_cases(tag, binary):
                if want(name) and (name, tag) not in unable:
                    cases.append((name, tag, cmd, cwd, n))
        for variant, modules in (("stdlib", []), ("numpy", ["numpy"]), ("pandas", ["pandas"])):
            name = f"py-{variant}"
            if not want(name):
                continue
            if not all(has_module(m) for m in modules):
                notes.append(f"{name}: skipped ({', '.join(modules)} not installed: "
                             "pip install numpy pandas)")
                continue
            worst = check_python_figures(new, archive, variant, work)
            notes.append(f"{name}: dscfm of every survey within {worst:.1e} of annulus's")
            cases.append((name, "py", [sys.executable, os.path.join(HERE, "reviewer.py"),
                                       "--variant", variant, archive], None, args.surveys))

        # one unmeasured pass: warm file cache, and every command must work
        for name, tag, cmd, cwd, _ in cases:
            _, _, code = run(cmd, cwd)
            # review exits 3 when a file fails its checks, which the generated archive may
            if code not in (0, 3):
                sys.exit(f"{name} ({tag}) exited with {code}: {' '.join(cmd)}")
        times = {(c[0], c[1]): [] for c in cases}
        peaks = {(c[0], c[1]): 0 for c in cases}
        for r in range(args.rounds):
            for name, tag, cmd, cwd, _ in cases:
                wall, rss, _ = run(cmd, cwd)
                times[(name, tag)].append(wall)
                peaks[(name, tag)] = max(peaks[(name, tag)], rss)
            print(f"round {r + 1} of {args.rounds} done", file=sys.stderr)

        med = {k: statistics.median(v) for k, v in times.items()}
        review_new = med.get(("review", "new"))
        if not os.access(TIME, os.X_OK):
            notes.append("peak memory from wait4: includes this script's own (install GNU time)")
        print(f"\n{args.rounds} interleaved rounds, {os.cpu_count()} CPUs, {args.surveys} surveys; "
              f"annulus = {new}" + (f", baseline = {base}" if base else ""))
        head = "| case | binary | median | range | peak memory | surveys/s | ratio |"
        print(head)
        print("|---|---|---|---|---|---|---|")
        for name, tag, _, _, n in cases:
            m = med[(name, tag)]
            lo, hi = min(times[(name, tag)]), max(times[(name, tag)])
            rate = f"{n / m:,.0f}" if n else ""
            ratio = ""
            if tag == "py" and review_new:
                ratio = f"{m / review_new:.1f}x annulus review's time"
            elif tag == "old":
                ratio = f"old/new {m / med[(name, 'new')]:.2f}x"
            print(f"| {name} | {tag} | {m:.3f} s | {lo:.3f}–{hi:.3f} s | "
                  f"{peaks[(name, tag)] / MIB:.0f} MiB | {rate} | {ratio} |")
        for n in notes:
            print(f"- {n}")
        if args.keep:
            print(f"kept {work}", file=sys.stderr)
    finally:
        if env_config is not None:
            os.environ["ANNULUS_CONFIG"] = env_config
        if not args.keep:
            shutil.rmtree(work, ignore_errors=True)


if __name__ == "__main__":
    main()

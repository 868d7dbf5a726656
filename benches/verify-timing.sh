#!/usr/bin/env bash
# Whole-command timing of `annulus verify`: the sample stack report, and reports of about 4 MB and
# 10 MB (the sample stack as a 25 × 25 and a 40 × 40 rectangular grid, invented readings), all
# signed by a key given as trusted. Prints the median and range of N runs of each.
#
#   benches/verify-timing.sh [ANNULUS] [N] [BASELINE]
#
# ANNULUS defaults to target/release/annulus (build it with `cargo build --release --locked`), N to
# 5. With BASELINE (another annulus binary), the same surveys are reported and verified by it too,
# runs interleaved, for a ratio measured in one go. Works in a temporary folder; writes nothing here.
set -euo pipefail
here="$(cd "$(dirname "$0")/.." && pwd)"
new="$(realpath "${1:-$here/target/release/annulus}")"
runs="${2:-5}"
base="${3:+$(realpath "$3")}"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
export ANNULUS_CONFIG=

cp -r "$here/sample-data/stack" "$here/sample-data/calibration" "$work/"
grid() { # grid DIR N: the stack sample as an N × N rectangular grid
  mkdir -p "$work/$1"
  sed -e 's/shape = "round"/shape = "rectangular"/' -e 's/diameter = "96 in"/width = "200 in"\nheight = "200 in"/' \
      -e "s/^lines = 2/lines = $2/" -e "s/^points_per_line = 12/points_per_line = $2/" \
      -e 's|calibration = "../calibration/ts-0417.toml".*|coefficient = 0.84|' \
      "$work/stack/survey.toml" > "$work/$1/survey.toml"
  for r in 1 2 3; do
    awk -v n="$2" -v seed="$r" 'BEGIN {
      srand(seed); print "line,point,dp[inH2O],temperature[F],yaw[deg]"
      for (l = 0; l < n; l++) {
        name = (l < 26) ? sprintf("%c", 65 + l) : sprintf("A%c", 65 + l - 26)
        for (p = 1; p <= n; p++)
          printf "%s,%d,%.3f,%d,%d\n", name, p, 0.4 + 0.3 * sin(p / n * 3.14159) + rand() * 0.02, 300 + int(rand() * 3), int(rand() * 7)
      } }' > "$work/$1/run$r.csv"
  done
}
grid mid 25
grid big 40

median() { # median COMMAND...: median, min and max wall seconds of $runs runs
  local ts=()
  for _ in $(seq "$runs"); do
    local s e
    s=$(date +%s.%N); "$@" > /dev/null 2>&1 || true; e=$(date +%s.%N)
    ts+=("$(echo "$e - $s" | bc)")
  done
  printf '%s\n' "${ts[@]}" | sort -n | awk '{a[NR] = $1} END {printf "median %.3f s (%.3f–%.3f)", a[int((NR + 1) / 2)], a[1], a[NR]}'
}

for bin in "$new" ${base:+"$base"}; do
  tag=$([ "$bin" = "$new" ] && echo new || echo baseline)
  mkdir -p "$work/$tag"
  (cd "$work/$tag" && "$bin" --quiet keygen key > /dev/null)
  for doc in stack mid big; do
    dir="$work/$doc"; [ "$doc" = stack ] && dir="$work/stack"
    (cd "$dir" && "$bin" report survey.toml -o "$work/$tag/$doc.pdf" --sign "$work/$tag/key.key" > /dev/null 2>&1)
  done
done

for doc in stack mid big; do
  size=$(stat -c %s "$work/new/$doc.pdf")
  echo "$doc ($size bytes)"
  echo "  this:     $(median "$new" verify "$work/new/$doc.pdf" --key "$work/new/key.pub")"
  if [ -n "$base" ]; then
    echo "  baseline: $(median "$base" verify "$work/baseline/$doc.pdf" --key "$work/baseline/key.pub")"
  fi
done

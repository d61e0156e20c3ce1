#!/usr/bin/env bash
# Time the whole `tessera analyse` as a process on simulated assemblages of several sizes
# (default model, typical fragmentation, three groups, default sensitivity set), recording wall
# time and peak memory with /usr/bin/time, and `tessera check` on the same file (reading and
# validating it: the floor for any command) with the ratio of the two.
# Usage: bash benches/process.sh [SIZES...]
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet
bin=target/release/tessera
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
sizes=("$@")
[ ${#sizes[@]} -eq 0 ] && sizes=(100 1000 10000)
missing="cranium=0.35,pelvis=0.5,postcranial=0.3,dental=0.4,trait=0.15,range=0.05,subadult=0.08,dna=0.1"
echo "| individuals | analyse wall time (s) | peak memory (MB) | check wall time (s) | check peak memory (MB) | analyse / check (time) |"
echo "|---|---|---|---|---|---|"
for n in "${sizes[@]}"; do
  a=$((n * 4 / 10)); b=$((n * 3 / 10)); c=$((n - a - b))
  "$bin" simulate --groups "north:$a:0.5,south:$b:0.4,chapel:$c:0.3" --missing "$missing" --seed 7 --out "$work/sim.csv" >/dev/null
  /usr/bin/time -f "%e %M" -o "$work/t" "$bin" analyse "$work/sim.csv" --out "$work/out" >/dev/null 2>&1
  read -r secs kb < "$work/t"
  /usr/bin/time -f "%e %M" -o "$work/c" "$bin" check "$work/sim.csv" >/dev/null 2>&1
  read -r csecs ckb < "$work/c"
  ratio=$(awk -v a="$secs" -v c="$csecs" 'BEGIN { if (c > 0) printf "%.1f", a / c; else print "—" }')
  echo "| $n | $secs | $((kb / 1024)) | $csecs | $((ckb / 1024)) | $ratio |"
done

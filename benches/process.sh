#!/usr/bin/env bash
# Time the whole `tessera analyse` as a process on simulated assemblages of several sizes
# (default model, typical fragmentation, three groups, default sensitivity set), recording wall
# time and peak memory with /usr/bin/time. Usage: bash benches/process.sh [SIZES...]
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet
bin=target/release/tessera
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
sizes=("$@")
[ ${#sizes[@]} -eq 0 ] && sizes=(100 1000 10000)
missing="cranium=0.35,pelvis=0.5,postcranial=0.3,dental=0.4,trait=0.15,range=0.05,subadult=0.08,dna=0.1"
echo "| individuals | analyse wall time (s) | peak memory (MB) |"
echo "|---|---|---|"
for n in "${sizes[@]}"; do
  a=$((n * 4 / 10)); b=$((n * 3 / 10)); c=$((n - a - b))
  "$bin" simulate --groups "north:$a:0.5,south:$b:0.4,chapel:$c:0.3" --missing "$missing" --seed 7 --out "$work/sim.csv" >/dev/null
  /usr/bin/time -f "%e %M" -o "$work/t" "$bin" analyse "$work/sim.csv" --out "$work/out" >/dev/null 2>&1
  read -r secs kb < "$work/t"
  echo "| $n | $secs | $((kb / 1024)) |"
done

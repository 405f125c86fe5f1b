#!/usr/bin/env bash
# Tables larger than memory: a ROWS × COLUMNS CSV (default 20,000,000 × 20,
# about 3.6 GB; it is deleted afterwards) through
#   pcqc run --stream --bootstrap B (every format)
# against one plain read of the same file by pcqc's streaming reader
# (bench/streamread: the same parser, no sums). Each is run RUNS times,
# alternating, with GNU time; the medians are printed, with the peak RSS
# of the streamed audit against 1 GB and its time against 4 × the read.
#
#   bench/stream.sh [ROWS] [COLUMNS] [BOOTSTRAP] [RUNS]
# Needs about 4 GB free where mktemp puts files (set TMPDIR to choose).
set -euo pipefail
cd "$(dirname "$0")/.."
n=${1:-20000000}
p=${2:-20}
b=${3:-0}
runs=${4:-3}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/pcqc" ./cmd/pcqc
go build -o "$work/streamread" ./bench/streamread
go run ./bench/gencsv -n "$n" -p "$p" -o "$work/big.csv"
size=$(stat -c %s "$work/big.csv")
echo "CSV: $n × $p, $((size / 1000000)) MB (float64 matrix would be $((8 * n * p / 1000000)) MB)"
median() { sort -g | awk '{a[NR] = $1} END {print a[int((NR + 1) / 2)]}'; }
: >"$work/read" >"$work/stream" >"$work/rss"
for i in $(seq "$runs"); do
  /usr/bin/time -f "%e %M" -o "$work/t" "$work/streamread" "$work/big.csv" >/dev/null
  read -r secs _ <"$work/t"; echo "$secs" >>"$work/read"
  rm -rf "$work/out"
  /usr/bin/time -f "%e %M" -o "$work/t" "$work/pcqc" run "$work/big.csv" --stream --bootstrap "$b" \
    --out "$work/out" --quiet --fail-on never >/dev/null
  read -r secs rss_kb <"$work/t"; echo "$secs" >>"$work/stream"; echo "$rss_kb" >>"$work/rss"
  echo "run $i: read $(tail -1 "$work/read") s, stream $secs s, peak RSS $((rss_kb / 1024)) MiB"
done
read_s=$(median <"$work/read")
stream_s=$(median <"$work/stream")
rss_mb=$(( $(median <"$work/rss") / 1024 ))
ratio=$(awk -v a="$stream_s" -v b="$read_s" 'BEGIN {printf "%.2f", a / b}')
echo "median of $runs: plain read $read_s s; --stream --bootstrap $b $stream_s s (${ratio}× the read, target ≤ 4); peak RSS $rss_mb MiB (target ≤ 1024)"

#!/usr/bin/env bash
# Large input: a 1,000,000 × 20 CSV (about 180 MB) through
#   pcqc run --format none --bootstrap 0
# measuring the peak resident memory of the whole process (GNU time) against
# 2.5 × the float64 matrix + 100 MB, and the CSV read throughput (the
# ReadTableFile benchmark) against 100 MB/s.
#
#   bench/large.sh [ROWS] [COLUMNS]
set -euo pipefail
cd "$(dirname "$0")/.."
n=${1:-1000000}
p=${2:-20}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/pcqc" ./cmd/pcqc
go run ./bench/gencsv -n "$n" -p "$p" -o "$work/big.csv"
size=$(stat -c %s "$work/big.csv")
matrix=$((8 * n * p))
budget=$((matrix * 5 / 2 + 100 * 1000 * 1000))

echo "CSV: $n × $p, $((size / 1000000)) MB; float64 matrix $((matrix / 1000000)) MB; memory budget $((budget / 1000000)) MB"
if [ -x /usr/bin/time ]; then
  /usr/bin/time -f "%e %M" -o "$work/time" "$work/pcqc" run "$work/big.csv" --format none --bootstrap 0 --out "$work/out" --quiet --fail-on never >/dev/null
  read -r secs rss_kb <"$work/time"
  rss=$((rss_kb * 1024))
  verdict=$([ "$rss" -le "$budget" ] && echo "within" || echo "OVER")
  echo "pcqc run: ${secs} s, peak RSS $((rss / 1000000)) MB ($verdict the budget)"
else
  echo "pcqc run: /usr/bin/time not installed (Debian package time); peak memory not measured"
fi
PCQC_BENCH_CSV="$work/big.csv" go test -run x -bench 'ReadTableFile$' -benchtime 3x ./analysis | awk '/MB\/s/ {for (i = 1; i <= NF; i++) if ($(i+1) == "MB/s") print "CSV read:", $i, "MB/s (target ≥ 100)"}'

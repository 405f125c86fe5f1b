#!/usr/bin/env bash
# Big tables: time and peak memory of whole pcqc runs at the sizes issue 16
# names, each against the matrix it holds and against the bare run on the
# same file.
#
#   bench/scale.sh [--sizes "100000x20 300000x20 1000000x20 200x20000"]
#                  [--stream-rows N]   # also the --stream case on N × 20 (e.g. 20000000)
#                  [--keep DIR]        # keep the generated tables in DIR
#
# For every size it generates a planted CSV (go run ./bench/gencsv: three
# latent factors plus unit noise, six significant digits) and runs, under
# GNU time (/usr/bin/time -v, Debian package "time"):
#   bare     --bootstrap 0 --permutations 0 --format none --components 3 (the
#            planted count: without permutations the default rule cannot run)
#   nobs     --bootstrap 0 --format none         (memory bound: 2.5× matrix + 100 MB;
#                                                  3× + 100 MB when p ≥ 10,000)
#   default  the default audit, every format       (3× matrix + 150 MB; time ≤ 6× bare)
# and prints, per run: wall seconds, peak RSS in MB, RSS / matrix, the bound,
# and wall / bare. The matrix is 8·n·p bytes (float64).
#
# With --stream-rows N it also runs bench/stream.sh N 20 (N = 20,000,000
# makes a file of about 3.6 GB: check `df -h` first), which times
# `pcqc run --stream` against one plain read of the file by the same
# streaming reader, against the targets: peak RSS ≤ 1 GB, time ≤ 4× the read.
set -euo pipefail
cd "$(dirname "$0")/.."

sizes="100000x20 300000x20 1000000x20 200x20000"
stream_rows=0
keep=""
while [ $# -gt 0 ]; do
  case "$1" in
    --sizes) sizes="$2"; shift ;;
    --stream-rows) stream_rows="$2"; shift ;;
    --keep) keep="$2"; shift ;;
    *) echo "usage: bench/scale.sh [--sizes \"NxP ...\"] [--stream-rows N] [--keep DIR]" >&2; exit 2 ;;
  esac
  shift
done
if [ ! -x /usr/bin/time ]; then
  echo "bench/scale.sh: needs GNU time (apt-get install time)" >&2
  exit 2
fi

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
data=${keep:-$work}
mkdir -p "$data"
go build -o "$work/pcqc" ./cmd/pcqc
go build -o "$work/gencsv" ./bench/gencsv

# run NAME FILE ARGS... : runs pcqc under GNU time; sets secs and rss_mb.
run() {
  local name=$1 file=$2
  shift 2
  rm -rf "$work/out"
  /usr/bin/time -v -o "$work/time.txt" "$work/pcqc" run "$file" --out "$work/out" --quiet --fail-on never "$@" >/dev/null
  secs=$(awk -F': ' '/Elapsed \(wall clock\)/ {n = split($2, t, ":"); s = 0; for (i = 1; i <= n; i++) s = s * 60 + t[i]; print s}' "$work/time.txt")
  # GNU time reports KiB; MB here is 10^6 bytes, like the bound.
  rss_mb=$(awk -F': ' '/Maximum resident set size/ {printf "%.0f", $2 * 1024 / 1e6}' "$work/time.txt")
}

printf '%-14s %-8s %9s %9s %8s %10s %8s\n' size case seconds "RSS MB" "×matrix" "bound MB" "×bare"
for size in $sizes; do
  n=${size%x*}
  p=${size#*x}
  file="$data/scale-$size.csv"
  [ -f "$file" ] || "$work/gencsv" -n "$n" -p "$p" -o "$file"
  matrix_mb=$(awk -v n="$n" -v p="$p" 'BEGIN {printf "%.1f", 8 * n * p / 1e6}')
  bare=""
  for case in bare nobs default; do
    case $case in
      bare) run "$case" "$file" --bootstrap 0 --permutations 0 --components 3 --format none ;;
      nobs) run "$case" "$file" --bootstrap 0 --format none ;;
      default) run "$case" "$file" ;;
    esac
    [ -z "$bare" ] && bare=$secs
    bound=$(awk -v m="$matrix_mb" -v c="$case" -v p="$p" 'BEGIN {
      if (c == "default") print int(3 * m + 150);
      else if (p >= 10000) print int(3 * m + 100);
      else print int(2.5 * m + 100) }')
    printf '%-14s %-8s %9.1f %9d %8.1f %10d %8.1f\n' "$size" "$case" "$secs" "$rss_mb" \
      "$(awk -v r="$rss_mb" -v m="$matrix_mb" 'BEGIN {print r / m}')" "$bound" \
      "$(awk -v s="$secs" -v b="$bare" 'BEGIN {print (b > 0 ? s / b : 0)}')"
  done
done

if [ "$stream_rows" -gt 0 ]; then
  bench/stream.sh "$stream_rows" 20 0 1
fi

#!/usr/bin/env bash
# Times the whole pcqc audit against the hand-written numpy reference
# (../shared/bench/ref_numpy.py) on the same planted CSV, alternating the two
# programs, and prints the median ratio pcqc / numpy per workload.
#
#   bench/compare.sh [--full] [--runs N]
#
# pcqc is timed twice: as a whole process (reading the CSV, the
# decomposition, parallel analysis, the bootstrap, leave-one-out influence,
# cross-validation, the robust fit, every check, the tables), and on the
# same workload as numpy (BenchmarkReferenceWorkload in analysis/: the
# decomposition, T² and Q, B resamples, P permutations, CSV load excluded).
# numpy is timed twice: the computation it reports itself (seconds=, CSV
# load excluded: the stricter baseline) and its whole process. Workloads
# (k = 3 throughout):
#   tall  10,000 × 50,   B = 200,  P = 50
#   wide     100 × 5,000, B = 200,  P = 50
# and with --full:
#   tall-full 20,000 × 50,    B = 1,000, P = 200
#   wide-full    100 × 20,000, B = 200,   P = 50
#
# Needs Debian's python3-numpy (/usr/bin/python3). REF overrides the path of
# ref_numpy.py.
#
# The issue's targets compare against numpy on OpenBLAS. For that measurement
# only (CI needs neither), install Debian's libopenblas0-pthread and select it
# for libblas.so.3 / liblapack.so.3:
#   apt-get install libopenblas0-pthread
#   update-alternatives --set libblas.so.3-x86_64-linux-gnu \
#     /usr/lib/x86_64-linux-gnu/openblas-pthread/libblas.so.3
#   (and likewise liblapack.so.3-x86_64-linux-gnu)
# The last line of the output names the BLAS numpy loaded.
set -euo pipefail
cd "$(dirname "$0")/.."
runs=3
full=0
while [ $# -gt 0 ]; do
  case "$1" in
    --full) full=1 ;;
    --runs) runs="$2"; shift ;;
    *) echo "usage: bench/compare.sh [--full] [--runs N]" >&2; exit 2 ;;
  esac
  shift
done
ref="${REF:-../shared/bench/ref_numpy.py}"
py=/usr/bin/python3
[ -f "$ref" ] || { echo "bench: $ref not found (set REF)" >&2; exit 2; }
"$py" -c 'import numpy' 2>/dev/null || { echo "bench: needs python3-numpy (apt-get install python3-numpy)" >&2; exit 2; }

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/pcqc" ./cmd/pcqc
go test -c -o "$work/analysis.test" ./analysis/
pcqc_help=$("$work/pcqc" help run)
format_flag=()
if grep -q -- '--format' <<<"$pcqc_help"; then format_flag=(--format none); fi

now() { date +%s.%N; }
median() { sort -g | awk '{a[NR]=$1} END {if (NR%2) print a[(NR+1)/2]; else print (a[NR/2]+a[NR/2+1])/2}'; }

workloads=("tall 10000 50 200 50" "wide 100 5000 200 50")
if [ "$full" = 1 ]; then
  workloads+=("tall-full 20000 50 1000 200" "wide-full 100 20000 200 50")
fi

timer=()
if [ -x /usr/bin/time ]; then timer=(/usr/bin/time -f %M -o "$work/rss"); fi

printf '%-10s %-12s %5s %5s %10s %10s %12s %12s %10s %10s %10s %12s\n' workload size B P pcqc_s same_s numpy_comp_s numpy_proc_s ratio_comp ratio_proc ratio_same pcqc_rss_MB
for w in "${workloads[@]}"; do
  read -r name n p b perm <<<"$w"
  csv="$work/$name.csv"
  "$py" "$ref" gen "$n" "$p" 3 42 "$csv"
  : >"$work/r_comp"; : >"$work/r_proc"; : >"$work/t_pcqc"; : >"$work/t_np"; : >"$work/t_npp"; : >"$work/t_same"; : >"$work/r_same"
  for ((r = 1; r <= runs; r++)); do
    t0=$(now)
    "${timer[@]}" "$work/pcqc" run "$csv" --components 3 --bootstrap "$b" --permutations "$perm" "${format_flag[@]}" \
      --out "$work/out-$name" --force --quiet --fail-on never >/dev/null
    t1=$(now)
    line=$("$py" "$ref" run "$csv" 3 "$b" "$perm")
    t2=$(now)
    tp=$(awk -v a="$t0" -v b="$t1" 'BEGIN {print b - a}')
    tn=${line##*seconds=}
    tnp=$(awk -v a="$t1" -v b="$t2" 'BEGIN {print b - a}')
    echo "$tp" >>"$work/t_pcqc"; echo "$tn" >>"$work/t_np"; echo "$tnp" >>"$work/t_npp"
    awk -v a="$tp" -v b="$tn" 'BEGIN {print a / b}' >>"$work/r_comp"
    awk -v a="$tp" -v b="$tnp" 'BEGIN {print a / b}' >>"$work/r_proc"
    ts=$(PCQC_REF_CSV="$csv" PCQC_REF_B="$b" PCQC_REF_P="$perm" "$work/analysis.test" -test.run '^$' \
      -test.bench 'ReferenceWorkload$' -test.benchtime 1x | awk '/^BenchmarkReferenceWorkload/ {print $3 / 1e9}')
    echo "$ts" >>"$work/t_same"
    awk -v a="$ts" -v b="$tn" 'BEGIN {print a / b}' >>"$work/r_same"
  done
  rss="n/a"
  if [ -s "$work/rss" ]; then rss=$(awk '{printf "%.0f", $1 * 1024 / 1e6}' "$work/rss"); fi
  printf '%-10s %-12s %5s %5s %10.2f %10.2f %12.2f %12.2f %10.3f %10.3f %10.3f %12s\n' "$name" "${n}x${p}" "$b" "$perm" \
    "$(median <"$work/t_pcqc")" "$(median <"$work/t_same")" "$(median <"$work/t_np")" "$(median <"$work/t_npp")" \
    "$(median <"$work/r_comp")" "$(median <"$work/r_proc")" "$(median <"$work/r_same")" "$rss"
done
echo "ratio_comp = median of pcqc whole-process time / numpy computation time"
echo "ratio_same = median of pcqc's time on numpy's workload (same_s, in-process) / numpy computation time (issue 16's target: ≤ 0.10)"
echo "pcqc_rss_MB = peak resident memory of the last pcqc run (GNU time; MB = 10^6 bytes), data matrix = 8·n·p bytes"
echo "numpy BLAS: $("$py" -c 'import numpy, numpy.__config__ as c; print(numpy.__version__)') with $(readlink -f /usr/lib/x86_64-linux-gnu/libblas.so.3 2>/dev/null || echo unknown)"

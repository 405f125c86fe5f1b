#!/bin/sh
# False alarms of pcqc compare on two halves of clean tables: four designs
# (gen.py), 15 seeds each; every table is split by row parity, each half
# audited with --bootstrap 200, and the halves compared. Prints one line of
# check statuses per pair. Run from the repository root:
#   sh bench/compare-halves/run.sh /tmp/halves
# Needs /usr/bin/python3 with numpy. Seen at the commit that added it: no
# warning in 60 pairs (one skip of compare-subspace, where the halves' counts
# differed within their bootstrap intervals).
set -e
work=${1:-/tmp/pcqc-compare-halves}
mkdir -p "$work"
go build -o "$work/pcqc" ./cmd/pcqc
cp bench/compare-halves/gen.py "$work/"
cd "$work"
for d in a b c d; do for s in $(seq 1 15); do
  /usr/bin/python3 gen.py $d $s
  for h in odd even; do ./pcqc run $d$s-$h.csv --out A-$d$s-$h --format none --quiet --force --bootstrap 200 >/dev/null || true; done
  ./pcqc compare A-$d$s-odd A-$d$s-even --format none --out C-$d$s --force --fail-on never >/dev/null
  /usr/bin/python3 -c "
import json;d=json.load(open('C-$d$s/summary.json'));print('$d$s', ' '.join(c['id'][8:]+'='+c['status'] for c in d['checks']))"
done; done

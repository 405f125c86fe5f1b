#!/usr/bin/env bash
# Calibration harness: audits clean tables over the whole grid
# (n 100…5000, p 5…50, planted k 1…4, Gaussian and t10) and tables with one
# planted defect each, with the default options of `pcqc run`, and prints
# per check the false-alarm rate on clean tables and the detection rate on
# its defect, the verdict pass rate and how often the retained count equals
# the planted k, against the targets of the README. Exit status 1 when a
# target is missed. The full run (30 clean tables per cell, 100 per defect)
# takes about 20 minutes on 2 cores; the figures in the README come from it.
#
#   bench/calibrate.sh [TABLES_PER_CELL] [TABLES_PER_DEFECT] [SEED]
set -euo pipefail
cd "$(dirname "$0")/.."
tables=${1:-30}
defects=${2:-100}
seed=${3:-20240612}
go run ./bench/calibrate -tables "$tables" -defects "$defects" -seed "$seed"

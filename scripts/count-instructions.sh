#!/bin/sh
# Instructions executed by one whole `vigil run` (valgrind's callgrind), one worker thread.
# Unlike wall-clock medians, the count is the same on a loaded machine, so two builds can be
# compared on a shared 2-core box. Usage: scripts/count-instructions.sh VIGIL PLAN [EXPERIMENTS]
set -eu
bin=$1; plan=$2; experiments=${3:-2000}
RAYON_NUM_THREADS=1 valgrind --tool=callgrind --callgrind-out-file=/dev/null \
  "$bin" run "$plan" --experiments "$experiments" -q 2>&1 >/dev/null |
  awk '/Collected/ {print $4}'

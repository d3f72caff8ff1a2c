#!/usr/bin/env bash
# Run the tmux end-to-end UI tests RUNS times in a row, optionally beside a CPU load,
# and keep each failed run's output in a log. By hand only (not part of the suite).
#
#   bench/tmux_soak.sh [RUNS] [LOGDIR]        RUNS defaults to 20
#   LOAD=0 bench/tmux_soak.sh                 no stress-ng beside the runs
#
# Prints "N of RUNS passed" at the end; the log directory holds run-K.log for each
# failed run and summary.txt with one line per run.
set -u
cd "$(dirname "$0")/.."
RUNS=${1:-20}
LOGDIR=${2:-${TMPDIR:-/tmp}/picker-tmux-soak/$(date +%Y%m%d-%H%M%S)}
LOAD=${LOAD:-1}
PY=${PY:-.venv/bin/python}
mkdir -p "$LOGDIR"
load_pid=""
if [ "$LOAD" = 1 ]; then
    if ! command -v stress-ng >/dev/null; then
        echo "stress-ng is not installed (LOAD=0 runs without load)" >&2
        exit 2
    fi
    stress-ng --cpu 2 --timeout 0 >/dev/null 2>&1 &
    load_pid=$!
fi
stop_load() { [ -n "$load_pid" ] && kill "$load_pid" 2>/dev/null && wait "$load_pid" 2>/dev/null; }
trap stop_load EXIT
# seconds in which every task waited for memory (Linux PSI, "full"): a stall of the
# whole machine, not of picker; shown beside each run to tell the two apart
mem_stall() { awk '/^full/ { sub("total=", "", $5); print $5 }' /proc/pressure/memory 2>/dev/null || echo 0; }
passed=0
for k in $(seq 1 "$RUNS"); do
    start=$(date +%s)
    stall0=$(mem_stall)
    if "$PY" -m pytest -q -m tmux tests/ui -p no:cacheprovider >"$LOGDIR/run-$k.log" 2>&1; then
        passed=$((passed + 1))
        result=pass
        rm -f "$LOGDIR/run-$k.log"
    else
        result=FAIL
    fi
    stall=$(( ($(mem_stall) - stall0) / 1000000 ))
    line="run $k: $result ($(($(date +%s) - start)) s; machine stalled on memory $stall s)"
    echo "$line" | tee -a "$LOGDIR/summary.txt"
done
echo "$passed of $RUNS passed (load: $([ "$LOAD" = 1 ] && echo 'stress-ng --cpu 2' || echo none))" \
    | tee -a "$LOGDIR/summary.txt"
[ "$passed" = "$RUNS" ]

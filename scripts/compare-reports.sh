#!/usr/bin/env bash
# Writes every kind of HTML page with two boreflux binaries from the same inputs and
# compares them byte for byte: a change in how pages are built (templates, escaping) must
# leave the pages as they were unless it fixes a bug on purpose.
#
#   bash scripts/compare-reports.sh OLD_BINARY NEW_BINARY [WORK_DIR]
#
# The inputs (run files, sweep tables) are simulated once with OLD_BINARY, so both binaries
# report from the very same files (a run file records when it was written, and the run page
# shows it). Pages: the demo's run page; one run page per shipped case (one per drive);
# two runs side by side with a `--title` that needs escaping; the step-test page (Jacob,
# Hantush–Bierschenk with the power law, and with the case's model beside it); the
# calibration page of cases/calibration; a grid sweep; a sampled sweep; a comparison of two
# grid sweeps. Exit 0 when every pair is identical, 1 otherwise (the differing pages are
# named); 2 on bad arguments. With KEEP_OLD=1 and a WORK_DIR of an earlier call, the pages
# OLD_BINARY wrote there are reused (the calibration alone takes minutes on a busy machine).
set -euo pipefail

if [ $# -lt 2 ] || [ $# -gt 3 ]; then
    echo "usage: $0 OLD_BINARY NEW_BINARY [WORK_DIR]" >&2
    exit 2
fi
OLD=$(realpath "$1")
NEW=$(realpath "$2")
cd "$(dirname "$0")/.."
ROOT=$PWD
WORK=${3:-$(mktemp -d)}
mkdir -p "$WORK/in" "$WORK/old" "$WORK/new"
IN=$WORK/in
say() { printf 'compare-reports: %s\n' "$*" >&2; }

# --- inputs, from OLD ---------------------------------------------------------------------
say "simulating the inputs with $OLD in $IN"
for case in "$ROOT"/cases/*.json; do
    name=$(basename "$case" .json)
    [ -f "$IN/$name.h5" ] || "$OLD" run "$case" -o "$IN/$name.h5" --force -q >/dev/null
done
CASE=$ROOT/cases/domestic-fine-sand-pvc.json
[ -f "$IN/grid.h5" ] || "$OLD" sweep "$CASE" -q --force -o "$IN/grid" \
    --vary "drive.frequency=10 strokes/min,20 strokes/min,30 strokes/min" --vary "drive.stroke=0.3 m,0.6 m" >/dev/null
[ -f "$IN/grid2.h5" ] || "$OLD" sweep "$CASE" -q --force -o "$IN/grid2" \
    --vary "drive.frequency=15 strokes/min,25 strokes/min,35 strokes/min" >/dev/null
[ -f "$IN/mc.h5" ] || "$OLD" sweep "$CASE" -q --force -o "$IN/mc" --samples 12 --seed 7 \
    --sample "pack.conductivity=lognormal(8e-3 m/s, 0.7)" >/dev/null

# --- pages, from both ---------------------------------------------------------------------
pages() {
    local bin=$1 out=$2
    local title='Well 7 <script>alert("x")</script> & O'"'"'Brien'
    for h5 in "$IN"/*.h5; do
        name=$(basename "$h5" .h5)
        case $name in grid | grid2 | mc) continue ;; esac
        "$bin" report "$h5" -o "$out/run-$name.html" --force
    done
    "$bin" report "$IN/municipal-sand-gravel.h5" "$IN/swab-deep.h5" -o "$out/run-two.html" \
        --title "$title" --force
    "$bin" report "$IN/grid.h5" -o "$out/sweep-grid.html" --force
    "$bin" report "$IN/grid.h5" -o "$out/sweep-grid-titled.html" --title "$title" --force
    "$bin" report "$IN/mc.h5" -o "$out/sweep-sampled.html" --force
    "$bin" report "$IN/grid.h5" "$IN/grid2.h5" -o "$out/sweep-compare.html" --force
    "$bin" report "$IN/grid.h5" "$IN/grid2.h5" -o "$out/sweep-compare-titled.html" \
        --title "$title" --force
    local st=$ROOT/cases/step-tests
    "$bin" steptest "$st/demo-steps.csv" -o "$out/steptest-jacob.html" --force >/dev/null
    "$bin" steptest "$st/demo-series.csv" --power -o "$out/steptest-series.html" --force >/dev/null
    "$bin" steptest "$st/demo-steps.csv" --case "$ROOT/cases/municipal-sand-gravel.json" \
        -o "$out/steptest-model.html" --force >/dev/null
    local cal=$ROOT/cases/calibration
    "$bin" calibrate "$cal/pilot-well.json" "$cal/pilot-log.csv" \
        --free "formation.conductivity=1e-5 m/s..1e-2 m/s" \
        --free "cake.conductivity=1e-9 m/s..1e-4 m/s" \
        -o "$out/calibration.html" --force >/dev/null
}
if [ "${KEEP_OLD:-0}" = 1 ] && [ -f "$WORK/old/calibration.html" ]; then
    say "reusing the pages of $OLD in $WORK/old"
else
    say "writing the pages with $OLD"
    pages "$OLD" "$WORK/old" 2>"$WORK/old.log"
fi
say "writing the pages with $NEW"
pages "$NEW" "$WORK/new" 2>"$WORK/new.log"

status=0
count=0
for a in "$WORK"/old/*.html; do
    b=$WORK/new/$(basename "$a")
    count=$((count + 1))
    if cmp -s "$a" "$b"; then
        say "same      $(basename "$a") ($(wc -c <"$a") bytes)"
    else
        say "DIFFERENT $(basename "$a")"
        status=1
    fi
done
say "$count pages compared in $WORK"
exit $status

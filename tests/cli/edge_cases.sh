#!/bin/sh
# Shell test: numerical edge cases and output robustness of the program.
#   - a system with every uncertainty zero: TVU95 = THU95 = 0 (printed as
#     zero, never NaN) from 0.1 m to 11 000 m, the swath ends at the
#     maximum beam angle, width 2 d tan(max);
#   - a system that fails at nadir (heave alone, 1000 m sd): TVU95 =
#     1.959964 x 1000 m at every depth (heave is vertical one to one), the
#     side is "nadir";
#   - a figure whose square overflows a double (1e200 m): a clear one-line
#     error and exit 1, no output;
#   - turning rays: a linear profile 1450 -> 1600 m/s over 100 m; by Snell's
#     law (sin(theta) / c constant along a ray) rays flatter than
#     asin(1450 / 1600) = 64.99 deg at 100 m, asin(1450 / 1525) = 71.96 deg
#     at 50 m, turn above the seafloor: the side ends there ("ray_turns"),
#     the grid says "ray turns" instead of a number;
#   - no "nan" or "inf" in any output (table, csv, json);
#   - writing to a full device (/dev/full) as stdout or as -o: a clear
#     one-line error and exit 1;
#   - atomic output: a failing or interrupted `report -o FILE` leaves the
#     old FILE untouched (or no FILE), never half a file.
# Check values: the closed forms named above (flat seafloor, straight rays
# for the constant column; first-order model after Hare, Godin & Mayer
# 1995, docs/model.md), 1.959964 = the 0.975 normal quantile (JCGM 100:2008
# G.3), Snell's law for the turning angle.
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget), SB_SRCDIR = the source tree (default: two levels above
# this script).  Prints 'N passed, N failed'; exit 0 when all pass.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
LAUNCH="$SRC/profiles/systems/kestrel-launch.yaml"

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_edges.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

run() {
    "$SB" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
}
# no NaN or infinity anywhere in the output just made
finite_out() {
    if grep -qiw -e nan -e '-nan' -e inf -e '-inf' -e infinity "$TMP/out"
    then bad "$1: non-finite number in the output"; else ok; fi
}
# field N (1-based) of the CSV line starting with PREFIX
csv_field() {
    grep "^$1" "$TMP/out" | head -n 1 | cut -d, -f"$2"
}
# |a - b| <= tol
near() {
    awk -v a="$1" -v b="$2" -v t="$3" 'BEGIN { d = a - b; if (d < 0) d = -d; exit !(a != "" && d <= t) }'
}

# ---- a perfect system ----------------------------------------------------
cat >"$TMP/zero.yaml" <<'EOF'
name: zero
title: "A perfect system: every uncertainty zero (test input)"
lever_arms:
  antenna:       {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m sd}
  transducer:    {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m sd}
  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m sd}
positioning:
  horizontal: 0 m sd
  vertical: 0 m sd
  latency: 0 s sd
motion:
  roll: 0 deg sd
  pitch: 0 deg sd
  heading: 0 deg sd
  heave: 0 m sd
  heave_fraction: 0 %
  latency: 0 s sd
  alignment:
    roll: 0 deg sd
    pitch: 0 deg sd
    heading: 0 deg sd
sound_speed:
  transducer:
    nominal: 1500 m/s
    uncertainty: 0 m/s sd
  water_column:
    model: constant
    nominal: 1500 m/s
    uncertainty: 0 m/s sd
echosounder:
  frequency: 300 kHz
  beam_width_across: 1 deg
  beam_width_along: 1 deg
  array: flat
  range_resolution: 0 m sd
  pointing: 0 %
  max_beam_angle: 75 deg
vertical_reference:
  method: tide_gauge
  draft:   {nominal: 0 m, uncertainty: 0 m sd}
  squat:   {nominal: 0 m, uncertainty: 0 m sd}
  loading: {nominal: 0 m, uncertainty: 0 m sd}
  water_level: 0 m sd
  zoning: 0 m sd
conditions:
  speed: 0 kn
  roll_amplitude: 0 deg
  roll_period: 4 s
  pitch_amplitude: 0 deg
  pitch_period: 3 s
  heave_amplitude: 0 m
  heave_period: 4 s
EOF

DEPTHS=0.1,0.5,10,1000,11000
for fmt in table csv json; do
    run plan "$TMP/zero.yaml" --depth "$DEPTHS" --angles -75:75:15 --format "$fmt"
    if [ "$rc" -eq 0 ]; then ok; else bad "zero system, $fmt: status $rc $(cat "$TMP/err")"; fi
    finite_out "zero system, $fmt"
done
run plan "$TMP/zero.yaml" --depth "$DEPTHS" --order 1a --format csv
# order,depth_m,port_deg,starboard_deg,swath_width_m,limited_by,...,tvu_edge_m(11),thu_edge_m(12)
for d in 0.1 0.5 10.0 1000.0 11000.0; do
    line="1a,$d,"
    if [ "$(csv_field "$line" 6)" = max_angle ]; then ok; else bad "zero system $d m: not max_angle"; fi
    if [ "$(csv_field "$line" 3)" = 75.00 ] && [ "$(csv_field "$line" 4)" = 75.00 ]
    then ok; else bad "zero system $d m: sides not at 75 deg"; fi
    if [ "$(csv_field "$line" 11)" = 0.000 ] && [ "$(csv_field "$line" 12)" = 0.000 ]
    then ok; else bad "zero system $d m: TVU/THU at the edge not 0"; fi
    # width 2 d tan(75 deg) = 7.4641016 d, printed to 0.1 m
    w=$(awk -v d="$d" 'BEGIN { printf "%.1f", 2 * d * 3.7320508075688772 }')
    if near "$(csv_field "$line" 5)" "$w" 0.051; then ok
    else bad "zero system $d m: width $(csv_field "$line" 5) (expected $w)"; fi
done
# the grid: every figure zero
run plan "$TMP/zero.yaml" --depth 0.1,11000 --order 1a --angles -75:75:75 --format csv
n=$(awk -F, '/^[0-9.]+,-?[0-9.]+,/ { print }' "$TMP/out" | wc -l)
z=$(awk -F, '/^[0-9.]+,-?[0-9.]+,/ && $3 == "0.000" && $4 == "0.000" { print }' "$TMP/out" | wc -l)
if [ "$n" -eq 6 ] && [ "$z" -eq 6 ]; then ok; else bad "zero grid: $z of $n rows zero (expected 6 of 6)"; fi

# ---- fails at nadir: heave 1000 m sd --------------------------------------
sed 's/^  heave: 0 m sd/  heave: 1000 m sd/' "$TMP/zero.yaml" >"$TMP/nadir.yaml"
run plan "$TMP/nadir.yaml" --depth "$DEPTHS" --order 1a --format csv
if [ "$rc" -eq 0 ]; then ok; else bad "nadir system: status $rc $(cat "$TMP/err")"; fi
finite_out "nadir system"
for d in 0.1 10.0 11000.0; do
    line="1a,$d,"
    if [ "$(csv_field "$line" 6)" = nadir ]; then ok; else bad "nadir system $d m: $(csv_field "$line" 6) (expected nadir)"; fi
    if near "$(csv_field "$line" 11)" 1959.964 0.0011; then ok
    else bad "nadir system $d m: TVU95 $(csv_field "$line" 11) (expected 1959.964)"; fi
done
run plan "$TMP/nadir.yaml" --depth 10 --format json
finite_out "nadir system, json"

# ---- enormous figures: a clear error, no output -----------------------------
sed 's/^  heave: 0 m sd/  heave: 1e200 m sd/' "$TMP/zero.yaml" >"$TMP/absurd.yaml"
for fmt in table json; do
    run plan "$TMP/absurd.yaml" --depth 10 --format "$fmt"
    if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ] && [ ! -s "$TMP/out" ]
    then ok; else bad "absurd figure, $fmt: status $rc, $(cat "$TMP/err")"; fi
done

# ---- turning rays in a strong gradient -------------------------------------
{
    echo "depth_m,speed_m_s"
    for i in 0 1 2 3 4 5 6 7 8 9 10; do echo "$((i * 10)),$((1450 + i * 15))"; done
} >"$TMP/steep.csv"
awk '
    /^  water_column:/ { wc = 1; print; print "    model: profile"; print "    file: steep.csv"; next }
    wc && /^    (model|nominal):/ { next }
    /^echosounder:/ { wc = 0 }
    /^    nominal: 1500 m\/s/ { print "    nominal: 1450 m/s"; next }
    /^  roll: 0 deg sd/ { print "  roll: 0.01 deg sd"; next }
    { print }
' "$TMP/zero.yaml" >"$TMP/steep.yaml"
run plan "$TMP/steep.yaml" --depth 50,100 --order 1a --format csv
if [ "$rc" -eq 0 ]; then ok; else bad "steep profile: status $rc $(cat "$TMP/err")"; fi
finite_out "steep profile"
# Snell: asin(1450/1525) = 71.96 deg at 50 m, asin(1450/1600) = 64.99 deg at 100 m
for pair in "50.0 71.96" "100.0 64.99"; do
    set -- $pair
    line="1a,$1,"
    if [ "$(csv_field "$line" 6)" = ray_turns ]; then ok; else bad "steep $1 m: $(csv_field "$line" 6) (expected ray_turns)"; fi
    if near "$(csv_field "$line" 4)" "$2" 0.0101 && near "$(csv_field "$line" 3)" "$2" 0.0101
    then ok; else bad "steep $1 m: sides $(csv_field "$line" 3) $(csv_field "$line" 4) (expected $2)"; fi
done
for fmt in table csv json; do
    run plan "$TMP/steep.yaml" --depth 100 --angles -75:75:5 --format "$fmt"
    if [ "$rc" -eq 0 ]; then ok; else bad "steep grid, $fmt: status $rc"; fi
    finite_out "steep grid, $fmt"
done
if grep -q 'ray turns' "$TMP/out" || grep -q '"ray_turns"' "$TMP/out"; then ok
else bad "steep grid: turned rays not marked"; fi

# ---- no NaN/Inf from the demo systems at extreme depths ---------------------
for sys in kestrel-launch kestrel-surveyor kestrel-deep; do
    run plan "$SRC/profiles/systems/$sys.yaml" --depth 11000 --angles -60:60:30 --format json
    if [ "$rc" -eq 0 ]; then ok; else bad "$sys at 11000 m: status $rc $(cat "$TMP/err")"; fi
    finite_out "$sys at 11000 m"
done

# ---- a full device -----------------------------------------------------------
if [ -w /dev/full ]; then
    for args in "limits --depth 10,20" "plan $LAUNCH --depth 10" \
        "plan $LAUNCH --depth 10 --format json" "breakdown $LAUNCH --depth 20 --angle 45" \
        "soundspeed $SRC/profiles/casts/kestrel_channel_svp.csv" \
        "--version" "help plan"; do
        # shellcheck disable=SC2086
        "$SB" $args >/dev/full 2>"$TMP/err"
        rc=$?
        if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
        else bad "'$args' > /dev/full: status $rc, $(cat "$TMP/err")"; fi
    done
    run report "$LAUNCH" -o /dev/full
    if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
    else bad "report -o /dev/full: status $rc, $(cat "$TMP/err")"; fi
    run report "$LAUNCH" --plot tvu-angle --depth 20 --format svg -o /dev/full
    if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
    else bad "report --plot -o /dev/full: status $rc, $(cat "$TMP/err")"; fi
    DEEP="$SRC/profiles/systems/kestrel-deep.yaml"
    if "$SB" help audit >/dev/null 2>&1; then
        head -n 200 "$SRC/profiles/surveys/kestrel-anchorage-demo.csv" >"$TMP/s200.csv"
        run audit "$DEEP" "$TMP/s200.csv" --quiet --failures /dev/full \
            --columns line=line,x=easting_m,y=northing_m,z=depth_m,angle=beam_angle_deg
        if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
        else bad "audit --failures /dev/full: status $rc, $(cat "$TMP/err")"; fi
    fi
    if "$SB" help simulate >/dev/null 2>&1; then
        run simulate "$DEEP" --area "$SRC/profiles/surveys/kestrel-anchorage-demo-area.yaml" -o /dev/full
        if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
        else bad "simulate -o /dev/full: status $rc, $(cat "$TMP/err")"; fi
    fi
fi

# ---- atomic output files -----------------------------------------------------
mkdir "$TMP/o"
echo "the old report" >"$TMP/o/r.html"
# a failing run (bad area) leaves the old file and no temporary
run report "$LAUNCH" --area "$SRC/tests/bad/area/negative-depth.yaml" -o "$TMP/o/r.html"
if [ "$rc" -eq 2 ] && [ "$(cat "$TMP/o/r.html")" = "the old report" ]; then ok
else bad "failing report: status $rc, old file changed"; fi
if [ "$(ls "$TMP/o" | wc -l)" -eq 1 ]; then ok; else bad "failing report left: $(ls "$TMP/o")"; fi
# a directory that does not exist: exit 1, nothing created
run report "$LAUNCH" -o "$TMP/o/missing/r.html"
if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ] && [ ! -e "$TMP/o/missing" ]; then ok
else bad "report into a missing directory: status $rc, $(cat "$TMP/err")"; fi
# a run killed part way: the old file is still whole
"$SB" report "$LAUNCH" --mc 200000 -o "$TMP/o/r.html" >/dev/null 2>&1 &
pid=$!
sleep 1
kill -9 "$pid" 2>/dev/null
wait "$pid" 2>/dev/null
if [ "$(cat "$TMP/o/r.html")" = "the old report" ] || grep -q '</html>' "$TMP/o/r.html"
then ok; else bad "interrupted report: the file is neither the old one nor a whole new one"; fi
# a successful run replaces it with a whole document
run report "$LAUNCH" -o "$TMP/o/r.html"
if [ "$rc" -eq 0 ] && grep -q '</html>' "$TMP/o/r.html"; then ok
else bad "report: status $rc"; fi
if grep -qiw -e nan -e inf "$TMP/o/r.html"; then bad "report: non-finite number in the page"; else ok; fi

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

#!/bin/sh
# Shell test of `swathbudget verify` (Monte Carlo check of the linear budget).
#
# Check values are closed forms, not the program's own output:
#   - roll error u only (DESIGN closed forms, derived in docs/model.md):
#     vertical sigma = d tan(theta) u, across-track sigma = d u; the 95 %
#     points of |dZ| and of the radius are 1.959964 sigma (normal);
#   - GNSS error u per axis only: 95 % radius sqrt(-2 ln 0.05) u =
#     2.447747 u (Rayleigh distribution; IHO S-44 ed. 6 section 2 rounds the
#     factor to 2.45);
#   - pitch error u_p only, at nadir: dZ = d (cos p - 1), whose mean is
#     -d u_p^2 / 2 to second order (hand expansion); the linear TVU is 0,
#     so the validation (JCGM 101:2008 clause 8) must say "not valid".
# Tolerances are the numerical tolerance of JCGM 101:2008 7.9.2 (half a
# unit in the last of 2 significant digits of the standard uncertainty).
# The test systems are written below: every uncertainty zero but one.
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget).  Prints 'N passed, N failed'; exit 0 when all pass.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_verify.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

# run ARGS...: stdout to $TMP/out, stderr to $TMP/err, status in $rc
run() {
    "$SB" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
}

# system NAME ROLL PITCH GNSS: a test system, every other uncertainty zero
system() {
    cat >"$TMP/$1.yaml" <<EOF
name: $1
lever_arms:
  antenna:       {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
  transducer:    {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
positioning:
  horizontal: $4
  vertical: 0 m
motion:
  roll: $2
  pitch: $3
  heading: 0 deg
  heave: 0 m
  alignment: {roll: 0 deg, pitch: 0 deg, heading: 0 deg}
sound_speed:
  transducer: {nominal: 1500 m/s, uncertainty: 0 m/s}
  water_column: {model: constant, nominal: 1500 m/s, uncertainty: 0 m/s}
echosounder:
  frequency: 300 kHz
  beam_width_across: 1 deg
  beam_width_along: 1 deg
  array: curved
  range_resolution: 0 m
  pointing: 0 deg
  max_beam_angle: 75 deg
vertical_reference:
  method: tide_gauge
  draft: {nominal: 0 m, uncertainty: 0 m}
  water_level: 0 m
  zoning: 0 m
conditions:
  speed: 0 m/s
  roll_amplitude: 0 deg
  roll_period: 8 s
  pitch_amplitude: 0 deg
  pitch_period: 6 s
  heave_amplitude: 0 m
EOF
}

# pycheck FILE 'python expressions using doc / p (first point)' WHAT
pycheck() {
    if python3 - "$1" "$2" <<'EOF'
import json, math, sys
doc = json.load(open(sys.argv[1]))
p = doc["points"][0]
def tol(u, ndig=2):
    # JCGM 101:2008 7.9.2: u = c x 10^l, c with ndig digits; delta = 10^l / 2
    l = math.floor(math.log10(u)) - (ndig - 1)
    if round(u / 10 ** l) >= 10 ** ndig:
        l += 1
    return 0.5 * 10 ** l
ok = eval("(" + sys.argv[2] + ")")
if not ok:
    print("point:", p)
sys.exit(0 if ok else 1)
EOF
    then ok; else bad "$3"; fi
}

K1=1.959963985
DEG=0.017453292519943295

# ---- JSON shape ---------------------------------------------------------
system roll 0.05deg 0deg 0m
run verify "$TMP/roll.yaml" --depth 40 --angles 50 --trials 1000000 \
    --seed 3 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "roll run exited $rc: $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/roll.json"
pycheck "$TMP/roll.json" \
    'sorted(doc) == ["points", "system"] and doc["system"] == "roll" and
     len(doc["points"]) == 1 and sorted(p) == sorted(["depth_m",
     "angle_deg", "tvu_linear_m", "tvu_mc_m", "thu_linear_m", "thu_mc_m",
     "bias_z_m", "d_low_m", "d_high_m", "linear_valid", "trials"]) and
     p["linear_valid"] in (True, False) and p["trials"] == 1000000 and
     p["depth_m"] == 40 and abs(p["angle_deg"] - 50) < 1e-9' \
    "JSON keys and shape"

# ---- roll only: closed form --------------------------------------------
# sigma_z = 40 tan(50 deg) 0.05 deg = 0.041600 m; sigma_h = 40 x 0.05 deg
# = 0.034907 m
pycheck "$TMP/roll.json" \
    "abs(p['tvu_mc_m'] - $K1 * 40 * math.tan(50 * $DEG) * 0.05 * $DEG)
         <= tol(40 * math.tan(50 * $DEG) * 0.05 * $DEG)" \
    "roll only: MC TVU = 1.96 d tan(theta) u"
pycheck "$TMP/roll.json" \
    "abs(p['thu_mc_m'] - $K1 * 40 * 0.05 * $DEG) <= tol(40 * 0.05 * $DEG)" \
    "roll only: MC THU = 1.96 d u"
pycheck "$TMP/roll.json" \
    "abs(p['tvu_linear_m'] - $K1 * 40 * math.tan(50 * $DEG) * 0.05 * $DEG)
         < 1e-6 and p['linear_valid'] is True" \
    "roll only: linear TVU closed form and verdict valid"

# ---- GNSS only: Rayleigh 95 % radius -----------------------------------
system gnss 0deg 0deg 0.2m
run verify "$TMP/gnss.yaml" --depth 25 --angles 30 --trials 1000000 \
    --format json
if [ "$rc" -eq 0 ]; then ok; else bad "gnss run exited $rc: $(cat "$TMP/err")"; fi
pycheck "$TMP/out" \
    "abs(p['thu_mc_m'] - math.sqrt(-2 * math.log(0.05)) * 0.2) <= tol(0.2)
     and p['tvu_mc_m'] == 0 and p['linear_valid'] is True" \
    "GNSS only: MC THU = 2.4477 u"

# ---- pitch 5 deg at nadir: second order, linear not valid ---------------
# bias = -d u_p^2 / 2 = -100 x 0.0872665^2 / 2 = -0.3808 m
system pitch 0deg 5deg 0m
run verify "$TMP/pitch.yaml" --depth 100 --angles 0 --trials 200000 \
    --format json
if [ "$rc" -eq 0 ]; then ok; else bad "pitch run exited $rc: $(cat "$TMP/err")"; fi
pycheck "$TMP/out" \
    "abs(p['bias_z_m'] + 0.3808) < 0.01 and p['linear_valid'] is False and
     p['d_low_m'] > 1.4" \
    "pitch 5 deg: bias -d u^2/2 and 'linear not valid'"
run verify "$TMP/pitch.yaml" --depth 100 --angles 0 --trials 200000
if [ "$rc" -eq 0 ] && grep -q "linear not valid" "$TMP/out" &&
    grep -q "0 of 1 points linear valid" "$TMP/out"; then ok
else bad "table verdict 'linear not valid' for the pitch case"; fi

# ---- reproducibility: same seed, any thread count -----------------------
run verify "$TMP/roll.yaml" --depth 10,40 --angles -60,0,30 --digits 1 \
    --seed 11 --threads 1 --format json
cp "$TMP/out" "$TMP/t1.json"
run verify "$TMP/roll.yaml" --depth 10,40 --angles -60,0,30 --digits 1 \
    --seed 11 --threads 3 --format json
if [ "$rc" -eq 0 ] && cmp -s "$TMP/out" "$TMP/t1.json"; then ok
else bad "same seed, 1 vs 3 threads: outputs differ"; fi
run verify "$TMP/roll.yaml" --depth 10,40 --angles -60,0,30 --digits 1 \
    --seed 12 --threads 2 --format json
if [ "$rc" -eq 0 ] && ! cmp -s "$TMP/out" "$TMP/t1.json"; then ok
else bad "a different seed gave the same output"; fi
pycheck "$TMP/t1.json" \
    'len(doc["points"]) == 6 and all(q["trials"] % 10000 == 0 and
     q["trials"] >= 20000 for q in doc["points"])' \
    "adaptive: whole batches of 10^4 trials, at least two"

# ---- CSV and table ------------------------------------------------------
run verify "$TMP/roll.yaml" --depth 40 --angles 0,50 --trials 20000 \
    --format csv
if [ "$rc" -eq 0 ] && head -n 1 "$TMP/out" | grep -q '^depth_m,angle_deg,tvu_linear_m,tvu_mc_m'; then ok
else bad "csv header"; fi
run verify "$TMP/roll.yaml" --depth 40 --angles 0,50 --trials 20000
if [ "$rc" -eq 0 ] && grep -q "not proof" "$TMP/out"; then ok
else bad "table carries the a-priori caution"; fi

# ---- input errors: one line on stderr, exit 2, nothing on stdout --------
err_case() { # WHAT ARGS...
    what=$1
    shift
    run "$@"
    if [ "$rc" -eq 2 ] && [ ! -s "$TMP/out" ] &&
        [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
    else bad "$what: rc=$rc, stderr: $(cat "$TMP/err")"; fi
}
err_case "too few trials" verify "$TMP/roll.yaml" --trials 10
err_case "trials and digits together" verify "$TMP/roll.yaml" --trials 20000 --digits 2
err_case "digits out of range" verify "$TMP/roll.yaml" --digits 9
err_case "angle beyond the maximum" verify "$TMP/roll.yaml" --angles 80
err_case "negative depth" verify "$TMP/roll.yaml" --depth -5
err_case "threads 0" verify "$TMP/roll.yaml" --threads 0
err_case "bad seed" verify "$TMP/roll.yaml" --seed abc
err_case "missing file" verify "$TMP/none.yaml"
err_case "unknown option" verify "$TMP/roll.yaml" --frobnicate
err_case "bad format" verify "$TMP/roll.yaml" --format xml
printf 'name: broken\nmotion: [\n' >"$TMP/broken.yaml"
err_case "malformed YAML" verify "$TMP/broken.yaml"
if grep -q "^$TMP/broken.yaml:[0-9]*:[0-9]*: " "$TMP/err"; then ok
else bad "malformed YAML message is not FILE:LINE:COL: $(cat "$TMP/err")"; fi
sed 's/roll: 0.05deg/roll: 0.05 m/' "$TMP/roll.yaml" >"$TMP/unit.yaml"
err_case "bad unit" verify "$TMP/unit.yaml"

# ---- help ---------------------------------------------------------------
run verify --help
if [ "$rc" -eq 0 ] && grep -q "usage: swathbudget verify" "$TMP/out"; then ok
else bad "--help"; fi

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

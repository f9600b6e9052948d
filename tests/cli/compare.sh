#!/bin/sh
# Shell test of `swathbudget compare`.
#
# Check values (worked by hand here, never taken from the program):
# A roll-only system (every other uncertainty 0, draft 0, curved array):
# straight rays over a flat seafloor give sigma_z = d tan(theta) u_roll
# (Hare, Godin & Mayer 1995, the roll term; re-derived in docs/model.md),
# TVU95 = 1.959964 sigma_z (JCGM 100:2008 G.1.3).  With the Order 1a limit
# TVU(20 m) = sqrt(0.5^2 + (0.013 x 20)^2) = 0.563560 m (IHO S-44 ed. 6.0.0
# (2020) Table 1) and u_roll = 0.5 deg = 0.00872665 rad, the fail angle
# solves tan(theta) = 0.563560 / (1.959964 x 20 x 0.00872665) = 1.647460:
# theta = 58.742 deg, usable half-width h = 20 x 1.647460 = 32.949 m.
#
# Area: 500 m across, 2000 m along, 20 m deep, 10 % overlap (docs/area.md):
# line 1 at h, spacing 0.9 x 2h = 59.308 m; the last line is the first
# whose outer edge reaches 500 m: (500 - 2h) / 59.308 = 7.32 -> 8 more
# lines, 9 lines x 2 km = 18 km (line 9 would fall at h + 8 x 59.308 =
# 507.4 m, outside: it is pulled in to the edge, 500 - (h + 7 x 59.308) =
# 51.891 m from line 8); 18000 m / 5 m/s = 1 h on line, 8 turns x
# 4 min = 0.5333 h, 1.5333 h in all, / 8 h = 0.19167 days.
#
# What-if roll 0.25 deg: h doubles to 65.898 m (theta = atan(3.29492) =
# 73.117 deg, inside the 75 deg sector); (500 - 2h) / (1.8 h) = 3.10 ->
# 5 lines, 10 km.
#
# Sounding density (density.h), 301 equiangular beams over +/-75 deg, no
# overhead, 1500 m/s, 2 m/s, Special Order (1 m cube, S-44 ed. 6 Table 1),
# N = 3 (common practice): dtheta = 0.5 deg; T = 2 x 20 / cos 75 / 1500 =
# 0.103032 s; dx = 0.206064 m; dy may be 1 / (3 dx) = 1.617619 m;
# cos 2 theta = 2 x 20 sin(0.5 deg) / 1.617619 - cos(0.5 deg) gives
# theta = 70.822 deg.
#
# Environment: SWATHBUDGET = the program, SB_SRCDIR = the source tree.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
LAUNCH="$SRC/profiles/systems/kestrel-launch.yaml"
SURVEYOR="$SRC/profiles/systems/kestrel-surveyor.yaml"

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_compare.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

run() {
    "$SB" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
}

# python3 check: name, json file, script on stdin
pycheck() {
    name=$1
    shift
    if python3 - "$@" >"$TMP/py" 2>&1; then ok; else bad "$name: $(cat "$TMP/py")"; fi
}

cat >"$TMP/roll.yaml" <<'YAML'
name: roll-only
lever_arms:
  antenna: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
  transducer: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
positioning: {horizontal: 0 m, vertical: 0 m}
motion:
  roll: 0.5 deg
  pitch: 0 deg
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
  pointing: 0 %
  max_beam_angle: 75 deg
  beams: 301
  beam_spacing: equiangular
  ping_overhead: 0 s
vertical_reference:
  method: tide_gauge
  draft: {nominal: 0 m, uncertainty: 0 m}
  water_level: 0 m
  zoning: 0 m
conditions: {speed: 2 m/s, roll_amplitude: 0 deg, roll_period: 8 s,
             pitch_amplitude: 0 deg, pitch_period: 6 s, heave_amplitude: 0 m}
YAML

cat >"$TMP/area.yaml" <<'YAML'
name: test-box
order: 1a
outline:
  rectangle: {centre: [0 m, 0 m], length: 2000 m, width: 500 m, azimuth: 0 deg}
depth: 20 m
survey:
  overlap: 10 %
  speed: 5 m/s
  turn_time: 4 min
  working_day: 8 h
YAML

# ---- 1. usable angle, density and effort against the hand values --------
run compare "$TMP/roll.yaml" --area "$TMP/area.yaml" --order 1a,special \
    --depths 20 --upgrade motion.roll="0.25 deg sd" --format json
if [ "$rc" -eq 0 ]; then ok; else bad "compare json exited $rc: $(cat "$TMP/err")"; fi
pycheck "hand values" "$TMP/out" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
base, up = doc["systems"]
assert base["system"] == "roll-only" and base["upgrade"] is None, base["system"]
assert up["upgrade"] == "motion.roll=0.25 deg sd", up["upgrade"]
r = {u["order"]: u for u in base["usable"]}
a = r["1a"]
assert abs(a["starboard_deg"] - 58.742) < 0.01, a
assert abs(a["port_deg"] - 58.742) < 0.01, a
assert a["limited_by"] == "tvu" and a["dominant"] == "roll", a
assert abs(r["special"]["density_deg"] - 70.822) < 0.01, r["special"]
e = base["effort"]
assert e["lines"] == 9, e
assert abs(e["spacing_max_m"] - 59.308) < 0.01, e
assert abs(e["spacing_min_m"] - 51.891) < 0.01, e
assert abs(e["line_km"] - 18.0) < 1e-6, e
assert abs(e["hours_h"] - 1.53333) < 1e-4, e
assert abs(e["days_d"] - 0.191667) < 1e-5, e
assert e["speed_set_by"] == "planned", e
ru = {u["order"]: u for u in up["usable"]}
assert abs(ru["1a"]["usable_deg"] - 73.117) < 0.01, ru["1a"]
assert up["effort"]["lines"] == 5 and abs(up["effort"]["line_km"] - 10) < 1e-6
PY

# ---- 2. same fail angles as plan for real profiles ----------------------
run compare "$LAUNCH" "$SURVEYOR" --order 1a,special --depths 10,40,80 --format json
cp "$TMP/out" "$TMP/cmp.json"
if [ "$rc" -eq 0 ]; then ok; else bad "compare exited $rc: $(cat "$TMP/err")"; fi
run plan "$SURVEYOR" --order 1a,special --depth 10,40,80 --format json
cp "$TMP/out" "$TMP/plan.json"
pycheck "agrees with plan" "$TMP/cmp.json" "$TMP/plan.json" <<'PY'
import json, sys
cmp = json.load(open(sys.argv[1]))
plan = json.load(open(sys.argv[2]))
assert [s["system"] for s in cmp["systems"]] == ["kestrel-launch", "kestrel-surveyor"]
rows = {(u["order"], u["depth_m"]): u for u in cmp["systems"][1]["usable"]}
assert len(rows) == 6
for p in plan["usable"]:
    c = rows[(p["order"], p["depth_m"])]
    for k in ("port_deg", "starboard_deg", "swath_width_m", "limited_by"):
        assert c[k] == p[k] or abs(c[k] - p[k]) < 1e-9, (k, c[k], p[k])
    # the usable angle never exceeds the TVU/THU one
    assert c["usable_deg"] <= min(c["port_deg"] or 0, c["starboard_deg"] or 0) + 1e-9
PY

# ---- 3. table and csv forms ---------------------------------------------
run compare "$LAUNCH" --order 1a --depths 20 --area "$TMP/area.yaml"
if [ "$rc" -eq 0 ] && grep -q "Survey effort" "$TMP/out" && grep -q "a-priori" "$TMP/out"; then ok; else bad "table output"; fi
run compare "$LAUNCH" --order 1a --depths 20 --format csv
if [ "$rc" -eq 0 ] && head -1 "$TMP/out" | grep -q "^system,order,depth_m,port_deg"; then ok; else bad "csv header: $(head -1 "$TMP/out")"; fi

# ---- 4. errors: one line, exit 2 ----------------------------------------
expect2() {
    name=$1
    shift
    run "$@"
    if [ "$rc" -eq 2 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok; else bad "$name: exit $rc, $(cat "$TMP/err")"; fi
}
expect2 "no systems" compare
expect2 "unknown upgrade field" compare "$LAUNCH" --upgrade motion.colour="1 deg"
expect2 "upgrade in wrong unit" compare "$LAUNCH" --upgrade motion.roll="1 m"
expect2 "upgrade not an assignment" compare "$LAUNCH" --upgrade roll
expect2 "missing area" compare "$LAUNCH" --area "$TMP/nope.yaml"
sed 's/^order: 1a/order: 9z/' "$TMP/area.yaml" >"$TMP/badorder.yaml"
expect2 "unknown area order" compare "$LAUNCH" --area "$TMP/badorder.yaml"
if grep -q "badorder.yaml:2:8:" "$TMP/err"; then ok; else bad "order position: $(cat "$TMP/err")"; fi
sed 's/speed: 5 m\/s/speed: 5 m/' "$TMP/area.yaml" >"$TMP/badspeed.yaml"
expect2 "area speed unit" compare "$LAUNCH" --area "$TMP/badspeed.yaml"
if grep -q "badspeed.yaml:8:10:" "$TMP/err"; then ok; else bad "speed position: $(cat "$TMP/err")"; fi
expect2 "depth above transducer" compare "$SRC/profiles/systems/kestrel-deep.yaml" --depths 2

# An upgrade of a system that traces casts: the upgraded copy shares the
# casts with the original and must not free them a second time (a double
# free here once aborted the run; the sanitizer build makes it loud).
if "$SWATHBUDGET" compare "$SRC/profiles/systems/kestrel-deep.yaml" --order 1a \
        --depths 100 --upgrade echosounder.pointing="3 %" --format json \
        >"$TMP/up.json" 2>"$TMP/err" &&
   grep -q '"upgrade": "echosounder.pointing=3 %"' "$TMP/up.json"; then ok
else bad "upgrade of a system with casts: $(cat "$TMP/err")"; fi

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

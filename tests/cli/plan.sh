#!/bin/sh
# Shell test of `swathbudget plan` and `swathbudget breakdown`.
#
# 1. JSON structure of plan (the keys pinned by the issue).
# 2. Symmetry: kestrel-launch has every sensor on the centreline (y = 0), so
#    port and starboard must agree (common practice: a system symmetric
#    about the centreline gives a symmetric swath).
# 3. Closed forms (analytic, independent of the program), on small systems
#    written below where a single component is non-zero:
#    - roll only, u_phi: straight rays over a flat seafloor at depth d below
#      the transducer, z = R cos(theta), so dz/dtheta = -R sin(theta) = -y and
#      sigma_z = d tan(theta) u_phi (Hare, Godin & Mayer 1995, the roll term
#      of the a-priori multibeam model; re-derived in docs/model.md).  TVU95
#      = 1.959964 sigma_z (JCGM 100:2008 G.1.3) reaches the order's TVU
#      sqrt(a^2 + (b d)^2) (IHO S-44 ed. 6.0.0 (2020), 3.2, Table 1) at
#      theta = atan(TVU / (1.959964 d u_phi)).
#    - GNSS only, u per axis: circular 2-D normal, the 95 % radius is
#      sqrt(-2 ln 0.05) u = 2.447747 u (Rayleigh distribution), the S-44
#      style figure 2.45 u (IHO S-44 ed. 6, section 2); THU limit of
#      Order 1a = 5 m + 5 % of depth (S-44 ed. 6 Table 1).
# 4. Exit statuses of bad options (2) and of a good run (0).
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

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_plan.XXXXXX") || exit 1
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

# pycheck NAME FILE: run the Python checks on stdin against JSON FILE
pycheck() {
    name=$1
    shift
    if python3 - "$@" >"$TMP/py" 2>&1; then ok; else bad "$name: $(cat "$TMP/py")"; fi
}

# A system with every uncertainty zero except the ones given in $1 (YAML
# lines replacing the defaults below).
write_system() {
    cat >"$2" <<YAML
name: $3
lever_arms:
  antenna: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
  transducer: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}
positioning: {horizontal: $(echo "$1" | sed -n 's/^gnss=//p') , vertical: 0 m}
motion:
  roll: $(echo "$1" | sed -n 's/^roll=//p')
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
vertical_reference:
  method: tide_gauge
  draft: {nominal: 0 m, uncertainty: 0 m}
  water_level: 0 m
  zoning: 0 m
conditions: {speed: 0 m/s, roll_amplitude: 0 deg, roll_period: 8 s,
             pitch_amplitude: 0 deg, pitch_period: 6 s, heave_amplitude: 0 m}
YAML
}

# ---- 1. JSON structure ---------------------------------------------------
run plan "$LAUNCH" --depths 10:60:10 --angles -60:60:15 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "launch json exited $rc: $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/launch.json"
pycheck "json structure" "$TMP/launch.json" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
assert sorted(doc) == ["grid", "standard", "system", "usable"], sorted(doc)
assert doc["system"] == "kestrel-launch", doc["system"]
assert doc["standard"] == "s44-6", doc["standard"]
need = {"order", "depth_m", "port_deg", "starboard_deg", "swath_width_m",
        "limited_by", "dominant"}
extra = {"limited_by_port", "limited_by_starboard", "density_deg"}
reasons = {"tvu", "thu", "max_angle", "nadir"}
# S-44 ed. 6 has five orders; six depths 10..60
assert len(doc["usable"]) == 5 * 6, len(doc["usable"])
for r in doc["usable"]:
    keys = set(r)
    assert need <= keys and keys <= need | extra, sorted(keys)
    assert isinstance(r["order"], str)
    for k in ("port_deg", "starboard_deg"):
        v = r[k]
        assert v is None or (isinstance(v, (int, float)) and 0 <= v < 90), (k, v)
    assert r["limited_by"] in reasons, r["limited_by"]
    assert r["dominant"] is None or isinstance(r["dominant"], str)
    assert r["swath_width_m"] >= 0
    if r["limited_by"] == "nadir":
        assert r["port_deg"] is None or r["starboard_deg"] is None
grid_keys = ["angle_deg", "depth_m", "sigma_z_m", "thu_m", "thu_s44_m", "tvu_m"]
assert len(doc["grid"]) == 6 * 9, len(doc["grid"])
for g in doc["grid"]:
    assert sorted(g) == grid_keys, sorted(g)
    # TVU95 = 1.959964 sigma_z (JCGM 100:2008 G.1.3)
    assert abs(g["tvu_m"] - 1.959964 * g["sigma_z_m"]) <= 1e-6 * g["tvu_m"] + 1e-12
    # 2.45 sigma_max is never below the exact radius (S-44 figure is
    # conservative: the exact factor lies between 1.96 and 2.4477)
    assert g["thu_s44_m"] >= g["thu_m"] * (1 - 1e-9), g
PY

# ---- 2. symmetry of the centred demo ------------------------------------
pycheck "symmetry" "$TMP/launch.json" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
for r in doc["usable"]:
    p, s = r["port_deg"], r["starboard_deg"]
    assert (p is None) == (s is None), r
    if p is not None:
        assert abs(p - s) <= 0.01, r
    assert "limited_by_port" not in r, r
grid = {(g["depth_m"], g["angle_deg"]): g for g in doc["grid"]}
for (d, a), g in grid.items():
    m = grid[(d, -a)]
    for k in ("tvu_m", "thu_m", "thu_s44_m"):
        assert abs(g[k] - m[k]) <= 1e-6 * max(g[k], 1e-9), (d, a, k, g[k], m[k])
PY

# table and csv of a good run
run plan "$LAUNCH" --depth 20,40 --order 1a
if [ "$rc" -eq 0 ] && grep -q "not proof of a survey's quality" "$TMP/out"; then ok; else bad "table run: $rc $(cat "$TMP/err")"; fi
run plan "$LAUNCH" --depth 20,40 --order 1a --format csv
if [ "$rc" -eq 0 ] && head -1 "$TMP/out" | grep -q '^order,depth_m,port_deg,starboard_deg,swath_width_m,limited_by' \
    && [ "$(wc -l <"$TMP/out")" -eq 3 ]; then ok; else bad "csv run: $rc $(cat "$TMP/out" "$TMP/err")"; fi

# ---- 3a. closed form: roll only -----------------------------------------
write_system "roll=0.5 deg sd
gnss=0 m" "$TMP/roll.yaml" roll-only
run plan "$TMP/roll.yaml" --order 1a,special --depths 10:50:10 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "roll-only exited $rc: $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/roll.json"
pycheck "roll closed form" "$TMP/roll.json" <<'PY'
import json, math, sys
doc = json.load(open(sys.argv[1]))
# IHO S-44 ed. 6.0.0 (2020) Table 1: (a, b) of TVU
ab = {"1a": (0.5, 0.013), "special": (0.25, 0.0075)}
u = math.radians(0.5)
k = 1.959963984540054
assert len(doc["usable"]) == 10
for r in doc["usable"]:
    a, b = ab[r["order"]]
    d = r["depth_m"]
    tvu = math.sqrt(a * a + (b * d) ** 2)
    theta = math.degrees(math.atan(tvu / (k * d * u)))
    if theta < 75:
        want, why = theta, "tvu"
    else:
        want, why = 75.0, "max_angle"
    for side in ("port_deg", "starboard_deg"):
        assert abs(r[side] - want) <= 0.01, (r, want)
    assert r["limited_by"] == why, (r, why)
    if why == "tvu":
        assert r["dominant"] == "roll", r
        # swath width on the flat seafloor: 2 d tan(theta)
        assert abs(r["swath_width_m"] - 2 * d * math.tan(math.radians(want))) <= 0.01, r
PY

# breakdown of the same: sigma_z = d tan(theta) u, all of it from roll
run breakdown "$TMP/roll.yaml" --depth 20 --angle 30 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "breakdown exited $rc: $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/bd.json"
pycheck "breakdown closed form" "$TMP/bd.json" <<'PY'
import json, math, sys
doc = json.load(open(sys.argv[1]))
u = math.radians(0.5)
sz = 20 * math.tan(math.radians(30)) * u
assert [c["component"] for c in doc["components"]] == ["roll"], doc["components"]
c = doc["components"][0]
assert abs(c["vertical_m"] - sz) <= 1e-6 * sz, (c, sz)
assert abs(c["vertical_share"] - 1) <= 1e-9
# horizontal: dy/dtheta = R cos(theta) = d
assert abs(c["horizontal_m"] - 20 * u) <= 1e-6 * 20 * u, c
t = doc["totals"]
assert abs(t["sigma_z_m"] - sz) <= 1e-6 * sz
assert abs(t["tvu_m"] - 1.959964 * sz) <= 1e-5 * sz
# one horizontal axis only: the exact 95 % radius is 1.96 sigma
assert abs(t["thu_m"] - 1.959964 * 20 * u) <= 1e-4 * 20 * u, t
PY

# ---- 3b. closed form: GNSS only -----------------------------------------
write_system "roll=0 deg
gnss=2.3 m sd" "$TMP/gnss.yaml" gnss-only
run plan "$TMP/gnss.yaml" --order 1a --depth 10,20 --angles -60:60:30 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "gnss-only exited $rc: $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/gnss.json"
pycheck "gnss closed form" "$TMP/gnss.json" <<'PY'
import json, math, sys
doc = json.load(open(sys.argv[1]))
u = 2.3
r95 = math.sqrt(-2 * math.log(0.05)) * u     # 5.62982 m
for g in doc["grid"]:
    assert abs(g["thu_m"] - r95) <= 1e-6 * r95, g
    assert abs(g["thu_s44_m"] - 2.45 * u) <= 1e-9 * u, g
    assert abs(g["tvu_m"]) <= 1e-12, g
rows = {r["depth_m"]: r for r in doc["usable"]}
# 10 m: THU limit 5 + 0.5 = 5.5 m < 5.63 m, nadir fails
r = rows[10]
assert r["port_deg"] is None and r["starboard_deg"] is None, r
assert r["limited_by"] == "nadir" and r["swath_width_m"] == 0, r
# 20 m: limit 6 m > 5.63 m, passes out to the maximum angle
r = rows[20]
assert r["port_deg"] == 75 and r["starboard_deg"] == 75, r
assert r["limited_by"] == "max_angle", r
PY

# ---- 4. exit statuses -----------------------------------------------------
expect_status() {
    want=$1
    shift
    run "$@"
    if [ "$rc" -eq "$want" ]; then ok; else bad "'$*' exited $rc (expected $want): $(cat "$TMP/err")"; fi
    if [ "$want" -eq 2 ]; then
        if [ "$(wc -l <"$TMP/err")" -eq 1 ] && [ ! -s "$TMP/out" ]; then ok; else bad "'$*': not one line on stderr / output on stdout"; fi
    fi
}
expect_status 0 plan "$LAUNCH" --order 1a --depth 20
expect_status 2 plan
expect_status 2 plan "$LAUNCH" "$LAUNCH"
expect_status 2 plan "$LAUNCH" --bogus
expect_status 2 plan "$LAUNCH" --format xml
expect_status 2 plan "$LAUNCH" --thu-rule median
expect_status 2 plan "$LAUNCH" --depths 50:10:10
expect_status 2 plan "$LAUNCH" --depth 20,,30
expect_status 2 plan "$LAUNCH" --depth -5
expect_status 2 plan "$LAUNCH" --depth 0.3
expect_status 2 plan "$LAUNCH" --depth 20 --depths 10:20:5
expect_status 2 plan "$LAUNCH" --order 9z
expect_status 2 plan "$LAUNCH" --standard no-such-standard
expect_status 2 plan "$LAUNCH" --angles -80:80:10
expect_status 2 plan "$LAUNCH" --angles 10:0:5
expect_status 2 plan "$TMP/no-such-file.yaml"
expect_status 2 plan "$LAUNCH" --depth
expect_status 0 breakdown "$LAUNCH" --depth 20 --angle -45
expect_status 2 breakdown "$LAUNCH" --depth 20
expect_status 2 breakdown "$LAUNCH" --angle 10
expect_status 2 breakdown "$LAUNCH" --depth 20 --angle 80
expect_status 2 breakdown "$LAUNCH" --depth abc --angle 10
expect_status 2 breakdown "$SRC/tests/bad/spec/wrong-dimension.yaml" --depth 20 --angle 10

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

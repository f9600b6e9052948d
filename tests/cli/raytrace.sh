#!/bin/sh
# Shell test of `swathbudget raytrace`.
#
# Check values: the textbook circular-arc closed forms of a constant-gradient
# layer, recomputed here in Python (an independent evaluation, not the
# program's output pasted back):
#   dx = (cos a - cos b) / (p g),  dt = (1/g) ln[tan(b/2) / tan(a/2)],
#   sin(theta) = p c (Snell's law);  turning where p c = 1:
#   x = cos(a) / (p g),  t = -(1/g) ln tan(a/2)
# (Medwin & Clay 1998, Fundamentals of Acoustical Oceanography, ch. 3 --
# chapter from memory), and the figures quoted in the project issue for
# c1 = 1500 m/s, g = 0.05 1/s, h = 200 m, theta1 = 30 deg:
# dx = 115.9844 m, dt = 0.1536202 s.  The test profiles are linear
# c = c1 + g z written out as samples (test input, not check values).
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget).  Prints 'N passed, N failed'; exit 0 when all pass.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_raytrace.XXXXXX") || exit 1
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

# expect_input_error WHAT ARGS...: exit 2, one stderr line, no stdout
expect_input_error() {
    what=$1
    shift
    run "$@"
    if [ "$rc" -eq 2 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ] &&
        [ ! -s "$TMP/out" ]; then
        ok
    else
        bad "$what: exit $rc, stderr: $(cat "$TMP/err")"
    fi
}

# Linear profiles c = C1 + G z sampled at depths that pass the loader's
# gap rule (writes FILE).
linear_profile() {
    file=$1 c1=$2 g=$3
    {
        echo "# test profile: linear c = $c1 + $g z"
        echo "depth_m,speed_m_s"
        for z in 0 20 40 60 90 135 200; do
            awk -v z="$z" -v c1="$c1" -v g="$g" \
                'BEGIN { printf "%d,%.10f\n", z, c1 + g * z }'
        done
    } >"$file"
}
linear_profile "$TMP/grad.csv" 1500 0.05
linear_profile "$TMP/steep.csv" 1500 0.5

# ---- one gradient layer: issue figures and closed form -----------------
run raytrace "$TMP/grad.csv" --angles -30,0,30,60 --depth 200 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "json run exited $rc: $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/grad.json"

run raytrace "$TMP/grad.csv" --angles 30 --depth 200 --transducer-depth 10 \
    --format json
if [ "$rc" -eq 0 ]; then ok; else bad "transducer run exited $rc"; fi
cp "$TMP/out" "$TMP/zt.json"

run raytrace "$TMP/steep.csv" --angles 40,75 --depth 200 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "turning run exited $rc"; fi
cp "$TMP/out" "$TMP/turn.json"

if python3 - "$TMP" <<'EOF'
import json, math, sys

d = sys.argv[1]
errors = []

def check(cond, what):
    if not cond:
        errors.append(what)

def arc(c1, g, h, p):
    """Classic closed form of one constant-gradient layer."""
    a = math.asin(p * c1)
    b = math.asin(p * (c1 + g * h))
    if p == 0:
        return 0.0, math.log((c1 + g * h) / c1) / g, 0.0
    return ((math.cos(a) - math.cos(b)) / (p * g),
            math.log(math.tan(b / 2) / math.tan(a / 2)) / g, math.degrees(b))

doc = json.load(open(d + "/grad.json"))
check(sorted(doc) == ["caution", "profile", "rays", "seafloor_depth_m",
                      "transducer_depth_m", "transducer_speed_mps"],
      "top-level keys %r" % sorted(doc))
keys = ["angle_deg", "depth_m", "offset_m", "seafloor_angle_deg", "t_oneway_s",
        "t_twoway_s", "turned"]
rays = doc["rays"]
check(len(rays) == 4, "4 rays")
for r in rays:
    check(sorted(r) == keys, "ray keys %r" % sorted(r))
    check(r["turned"] is False, "no turn at %r" % r["angle_deg"])
    check(abs(r["t_twoway_s"] - 2 * r["t_oneway_s"]) < 1e-9, "two-way")
    check(r["depth_m"] == 200, "depth")
    ang = r["angle_deg"]
    p = math.sin(math.radians(abs(ang))) / 1500.0
    dx, dt, b = arc(1500.0, 0.05, 200.0, p)
    s = -1 if ang < 0 else 1
    check(abs(r["offset_m"] - s * dx) < 1e-6, "offset %r: %r vs %r"
          % (ang, r["offset_m"], s * dx))
    check(abs(r["t_oneway_s"] - dt) < 1e-9, "time %r: %r vs %r"
          % (ang, r["t_oneway_s"], dt))
    check(abs(r["seafloor_angle_deg"] - s * b) < 1e-7, "angle %r" % ang)
r30 = [r for r in rays if r["angle_deg"] == 30][0]
# Figures quoted in the issue (7 significant digits).
check(abs(r30["offset_m"] - 115.9844) < 5e-5, "issue dx")
check(abs(r30["t_oneway_s"] - 0.1536202) < 5e-8, "issue dt")
check(abs(doc["transducer_speed_mps"] - 1500.0) < 1e-9, "c0")

# Transducer between samples: one arc from z = 10 m, c0 = 1500.5 m/s.
doc = json.load(open(d + "/zt.json"))
r = doc["rays"][0]
p = math.sin(math.radians(30)) / 1500.5
dx, dt, b = arc(1500.5, 0.05, 190.0, p)
check(abs(doc["transducer_speed_mps"] - 1500.5) < 1e-9, "c0 at 10 m")
check(abs(r["offset_m"] - dx) < 1e-6, "zt offset %r vs %r" % (r["offset_m"], dx))
check(abs(r["t_oneway_s"] - dt) < 1e-9, "zt time")

# Turning: c = 1500 + 0.5 z, launch 75 deg turns where c = 1500 / sin 75.
doc = json.load(open(d + "/turn.json"))
r40, r75 = doc["rays"]
check(r40["turned"] is False and r40["depth_m"] == 200, "40 deg reaches")
a = math.radians(75)
p = math.sin(a) / 1500.0
zt = (1.0 / p - 1500.0) / 0.5
check(r75["turned"] is True, "75 deg turns")
check(abs(r75["depth_m"] - zt) < 1e-6, "turn depth %r vs %r"
      % (r75["depth_m"], zt))
check(abs(r75["offset_m"] - math.cos(a) / (p * 0.5)) < 1e-6, "turn offset")
check(abs(r75["t_oneway_s"] + math.log(math.tan(a / 2)) / 0.5) < 1e-9,
      "turn time")
check(abs(r75["seafloor_angle_deg"] - 90) < 1e-9, "horizontal at the turn")

for e in errors:
    print("FAIL:", e)
sys.exit(1 if errors else 0)
EOF
then ok; else bad "closed-form checks"; fi

# ---- CSV and table ------------------------------------------------------
run raytrace "$TMP/grad.csv" --angles -60:60:30 --depth 150 --format csv
if [ "$rc" -eq 0 ] &&
    [ "$(head -n 1 "$TMP/out")" = "angle_deg,depth_m,offset_m,t_oneway_s,t_twoway_s,seafloor_angle_deg,turned" ] &&
    [ "$(wc -l <"$TMP/out")" -eq 6 ]; then
    ok
else
    bad "csv: exit $rc, $(head -n 2 "$TMP/out")"
fi

run raytrace "$TMP/steep.csv" --angles 0,75 --depth 200
if [ "$rc" -eq 0 ] && grep -q "offset (m)" "$TMP/out" &&
    grep -q "not the quality of a" "$TMP/out" &&
    grep -q "hydrographic" "$TMP/out" && grep -q "yes" "$TMP/out"; then
    ok
else
    bad "table output: exit $rc"
fi

run help raytrace
if [ "$rc" -eq 0 ] && grep -q -- "--transducer-depth" "$TMP/out"; then ok; else bad "help"; fi

# ---- input errors: one line, exit 2, nothing on stdout -----------------
expect_input_error "no depth" raytrace "$TMP/grad.csv" --angles 0
expect_input_error "no angles" raytrace "$TMP/grad.csv" --depth 50
expect_input_error "no profile" raytrace --angles 0 --depth 50
expect_input_error "angle 90" raytrace "$TMP/grad.csv" --angles 0,90 --depth 50
expect_input_error "angle 95" raytrace "$TMP/grad.csv" --angles 95 --depth 50
expect_input_error "bad range" raytrace "$TMP/grad.csv" --angles 10:0:5 --depth 50
expect_input_error "depth above transducer" raytrace "$TMP/grad.csv" \
    --angles 0 --depth 5 --transducer-depth 6
expect_input_error "negative transducer" raytrace "$TMP/grad.csv" \
    --angles 0 --depth 5 --transducer-depth -1
expect_input_error "bad format" raytrace "$TMP/grad.csv" --angles 0 \
    --depth 50 --format xml
expect_input_error "unknown option" raytrace "$TMP/grad.csv" --angles 0 \
    --depth 50 --bogus
expect_input_error "unknown equation" raytrace "$TMP/grad.csv" --angles 0 \
    --depth 50 --equation nonesuch

printf 'depth_m,speed_m_s\n0,1500\n10,1501\n10,1502\n' >"$TMP/bad.csv"
expect_input_error "non-increasing depth" raytrace "$TMP/bad.csv" \
    --angles 0 --depth 50
if grep -q "^$TMP/bad.csv:[0-9][0-9]*:[0-9][0-9]*: " "$TMP/err"; then ok; else
    bad "FILE:LINE:COL form: $(cat "$TMP/err")"
fi

# More layers below the transducer than a ray can hold: refused, with the
# position of the first sample beyond the limit: 1023 samples below the
# transducer plus the half-space make 1024 layers, so the sample at 1024 m
# (line 1026: header on line 1, 0 m on line 2) is the first too many.
awk 'BEGIN { print "depth_m,speed_m_s"
             for (z = 0; z <= 1100; z++) printf "%d,%.3f\n", z, 1500 + 0.01 * z }' \
    >"$TMP/long.csv"
expect_input_error "too many layers" raytrace "$TMP/long.csv" --angles 0 \
    --depth 1000
if grep -q "^$TMP/long.csv:1026:1: .*at most 1024" "$TMP/err"; then ok; else
    bad "layer limit message: $(cat "$TMP/err")"
fi
run raytrace "$TMP/long.csv" --angles 0 --depth 1000 --transducer-depth 80
if [ "$rc" -eq 0 ]; then ok; else bad "long profile below 80 m: exit $rc"; fi

run raytrace "$TMP/missing.csv" --angles 0 --depth 50
if [ "$rc" -ne 0 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ] && [ ! -s "$TMP/out" ]
then ok; else bad "missing file: exit $rc"; fi

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

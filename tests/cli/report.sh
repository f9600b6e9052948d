#!/bin/sh
# Shell test of `swathbudget report` (HTML and single SVG plots).
#
# 1. The HTML report and every SVG plot are well-formed XML (xmllint from
#    Debian's libxml2-utils) and refer to nothing outside themselves: no
#    http: at all in the HTML, none in an SVG but the SVG namespace name
#    (xmlns="http://www.w3.org/2000/svg", a name, not a reference), no src=,
#    no href, no @import, no <script, and every url( is a #fragment.
# 2. The plotted fail angle equals the one `plan` reports, and both equal
#    the closed form for a roll-only system: TVU95 = 1.959964 d tan(theta)
#    u_roll (Hare, Godin & Mayer 1995; JCGM 100:2008 G.1.3) reaches the
#    Order 1a limit sqrt(0.5^2 + (0.013 x 20)^2) = 0.563560 m (IHO S-44
#    ed. 6.0.0 (2020) Table 1) at 20 m for u_roll = 0.5 deg at
#    theta = atan(0.563560 / (1.959964 x 20 x 0.00872665)) = 58.742 deg.
#    The fail-angle rule is drawn at x = 70 + (theta + 75) / 150 x 632 px
#    (plot area 70..702 px of a 720 px picture, range -75..75 deg):
#    70 + 133.742 / 150 x 632 = 633.50 px.
# 3. A failed run leaves no output file (atomic output); bad options exit 2
#    with one line.
# The rendering in a browser is tests/cli/report_render.sh.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
LAUNCH="$SRC/profiles/systems/kestrel-launch.yaml"
AREA="$SRC/profiles/areas/kestrel-approach.yaml"

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_report.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

run() {
    "$SB" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
}

if ! command -v xmllint >/dev/null 2>&1; then
    echo "SKIP: xmllint (libxml2-utils) is not installed"
    exit 77
fi

# well-formed and self-contained; $2 = 1 for a standalone SVG
selfcontained() {
    f=$1
    if xmllint --noout "$f" 2>"$TMP/xml"; then ok; else bad "$f not well-formed: $(head -3 "$TMP/xml")"; fi
    if [ "$2" = 1 ]; then
        n=$(grep -o 'http:' "$f" | wc -l)
        m=$(grep -o 'xmlns="http://www.w3.org/2000/svg"' "$f" | wc -l)
        if [ "$n" -eq 1 ] && [ "$m" -eq 1 ]; then ok; else bad "$f: http: $n times, namespace $m times"; fi
    else
        if grep -q 'http:' "$f"; then bad "$f mentions http:"; else ok; fi
    fi
    if grep -qi -e 'src=' -e 'href' -e '@import' -e '<script' "$f"; then
        bad "$f has an outside reference: $(grep -oi -e 'src=[^ ]*' -e 'href[^ ]*' -e '@import' -e '<script' "$f" | head -3)"
    else ok; fi
    if grep -o 'url([^)]*)' "$f" | grep -v '^url(#' | grep -q .; then
        bad "$f has url() to something else: $(grep -o 'url([^)]*)' "$f" | grep -v '^url(#' | head -2)"
    else ok; fi
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
vertical_reference:
  method: tide_gauge
  draft: {nominal: 0 m, uncertainty: 0 m}
  water_level: 0 m
  zoning: 0 m
conditions: {speed: 2 m/s, roll_amplitude: 0 deg, roll_period: 8 s,
             pitch_amplitude: 0 deg, pitch_period: 6 s, heave_amplitude: 0 m}
YAML

# ---- 1. the HTML report ---------------------------------------------------
run report "$LAUNCH" --area "$AREA" --mc 2000 -o "$TMP/report.html"
if [ "$rc" -eq 0 ] && [ -s "$TMP/report.html" ]; then ok; else bad "report exited $rc: $(cat "$TMP/err")"; fi
selfcontained "$TMP/report.html" 0
for want in "a-priori estimate" "field checks" "hydrographic authority" \
            "Inputs as stated and as converted" "Equations and references" \
            "Survey effort" "Monte Carlo" "swathbudget " "kestrel-launch.yaml" \
            "kestrel-approach.yaml" "0.02 deg sd" "0.0003491 rad"; do
    if grep -q "$want" "$TMP/report.html"; then ok; else bad "report lacks '$want'"; fi
done
n=$(grep -c '<svg ' "$TMP/report.html")
if [ "$n" -ge 9 ]; then ok; else bad "only $n inline pictures"; fi

# ---- 2. single plots, and the fail angle as plan reports it ---------------
for p in tvu-angle thu-angle breakdown-tvu breakdown-thu; do
    run report "$LAUNCH" --plot "$p" --depth 30 --format svg -o "$TMP/$p.svg"
    if [ "$rc" -eq 0 ]; then ok; else bad "--plot $p exited $rc: $(cat "$TMP/err")"; fi
    selfcontained "$TMP/$p.svg" 1
done
run report "$LAUNCH" --plot angle-depth --format svg -o "$TMP/fan.svg"
if [ "$rc" -eq 0 ]; then ok; else bad "--plot angle-depth exited $rc"; fi
selfcontained "$TMP/fan.svg" 1

run report "$TMP/roll.yaml" --plot tvu-angle --depth 20 --order 1a --format svg -o "$TMP/roll.svg"
if [ "$rc" -eq 0 ]; then ok; else bad "roll plot exited $rc: $(cat "$TMP/err")"; fi
run plan "$TMP/roll.yaml" --order 1a --depth 20 --format json
cp "$TMP/out" "$TMP/plan.json"
if python3 - "$TMP/roll.svg" "$TMP/plan.json" >"$TMP/py" 2>&1 <<'PY'
import json, re, sys
svg = open(sys.argv[1]).read()
plan = json.load(open(sys.argv[2]))["usable"][0]
port = float(re.search(r"1a port (-?[0-9.]+) deg", svg).group(1))
stbd = float(re.search(r"1a stbd (-?[0-9.]+) deg", svg).group(1))
# the same angles as plan (printed to 0.01 deg in the label) ...
assert abs(stbd - plan["starboard_deg"]) <= 0.005, (stbd, plan)
assert abs(-port - plan["port_deg"]) <= 0.005, (port, plan)
# ... and as the closed form
assert abs(stbd - 58.742) <= 0.01 and abs(port + 58.742) <= 0.01, (port, stbd)
# the rule is drawn where the angle is: 633.50 px (port: 70 + 16.258 /
# 150 x 632 = 138.50 px)
xs = [float(v) for v in re.findall(r'<line x1="([0-9.]+)" y1="[0-9.]+" x2="\1" y2="[0-9.]+" stroke="#333333" stroke-width="1.2"', svg)]
assert any(abs(x - 633.50) < 0.05 for x in xs), xs
assert any(abs(x - 138.50) < 0.05 for x in xs), xs
PY
then ok; else bad "fail angle: $(cat "$TMP/py")"; fi

# ---- 3. errors and atomic output ------------------------------------------
expect2() {
    name=$1
    shift
    run "$@"
    if [ "$rc" -eq 2 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok; else bad "$name: exit $rc, $(cat "$TMP/err")"; fi
}
expect2 "no output" report "$LAUNCH"
expect2 "plot without svg" report "$LAUNCH" --plot tvu-angle --depth 20 -o "$TMP/x.svg"
expect2 "svg without plot" report "$LAUNCH" --format svg -o "$TMP/x.svg"
expect2 "unknown plot" report "$LAUNCH" --plot pie --format svg -o "$TMP/x.svg"
expect2 "angle plot without depth" report "$LAUNCH" --plot tvu-angle --format svg -o "$TMP/x.svg"
sed 's/^order: special/order: 9z/' "$AREA" >"$TMP/badorder.yaml"
expect2 "bad area order" report "$LAUNCH" --area "$TMP/badorder.yaml" -o "$TMP/bad.html"
if [ -e "$TMP/bad.html" ] || ls "$TMP"/bad.html.tmp* >/dev/null 2>&1; then bad "a failed run left a file"; else ok; fi
# an existing report survives a failed run untouched
cp "$TMP/report.html" "$TMP/keep.html"
run report "$LAUNCH" --area "$TMP/badorder.yaml" -o "$TMP/keep.html"
if cmp -s "$TMP/report.html" "$TMP/keep.html"; then ok; else bad "a failed run changed the old report"; fi

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

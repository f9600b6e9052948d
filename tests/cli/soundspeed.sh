#!/bin/sh
# CLI tests of `swathbudget soundspeed`: output shape of each format, the
# validity warnings, and exit status 2 with a one-line FILE:LINE:COL message
# for each defective cast under tests/bad/cast/.
# Program: $SWATHBUDGET (default ./swathbudget); data: $srcdir (default .).

SB=${SWATHBUDGET:-./swathbudget}
TOP=${srcdir:-.}
CASTS=$TOP/profiles/casts
BAD=$TOP/tests/bad/cast
TMP=${TMPDIR:-/tmp}/sb_soundspeed_cli.$$
mkdir -p "$TMP" || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
ko() { fail=$((fail + 1)); echo "FAIL: $*" >&2; }

# run ARGS...: stdout -> $TMP/out, stderr -> $TMP/err, status -> $rc
run() {
    "$SB" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
}

# ---- table: header lines, a column per quantity with its unit, caution
run soundspeed "$CASTS/kestrel_summer_thermocline.csv" --latitude 51.42
[ "$rc" -eq 0 ] && ok || ko "summer table: exit $rc"
grep -q '^equation: Chen & Millero' "$TMP/out" && ok || ko "summer table: equation line"
grep -q 'depth (m).*pressure (dbar).*temperature ITS-90 (degC).*salinity (psu).*sound speed (m/s)' \
    "$TMP/out" && ok || ko "summer table: column titles with units"
grep -q 'not proof of a survey' "$TMP/out" || grep -q "neither is proof" "$TMP/out" \
    && ok || ko "summer table: caution missing"
[ ! -s "$TMP/err" ] && ok || ko "summer table: unexpected stderr: $(cat "$TMP/err")"

# ---- csv: header, then as many rows as samples in the file, all numeric
run soundspeed "$CASTS/kestrel_summer_thermocline.csv" --latitude 51.42 --format csv
[ "$rc" -eq 0 ] && ok || ko "summer csv: exit $rc"
[ "$(head -n 1 "$TMP/out")" = "depth_m,pressure_dbar,temperature_degC,salinity_psu,speed_m_s" ] \
    && ok || ko "summer csv: header is '$(head -n 1 "$TMP/out")'"
samples=$(grep -c '^[0-9]' "$CASTS/kestrel_summer_thermocline.csv")
rows=$(($(wc -l <"$TMP/out") - 1))
[ "$rows" -eq "$samples" ] && ok || ko "summer csv: $rows rows for $samples samples"
if awk -F, 'NR > 1 { if (NF != 5) exit 1; for (i = 1; i <= NF; i++)
        if ($i !~ /^-?[0-9]+(\.[0-9]+)?$/) exit 1 }' "$TMP/out"; then ok
else ko "summer csv: a row is not 5 numbers"; fi
# speeds of the invented summer cast: physically 1450-1550 m/s in the
# range 0-40 degC (common practice), speed decreasing through the thermocline
if awk -F, 'NR > 1 && ($5 < 1450 || $5 > 1550) { exit 1 }' "$TMP/out"; then ok
else ko "summer csv: implausible speed"; fi

# ---- depth-speed file: two columns, no equation
run soundspeed "$CASTS/kestrel_channel_svp.csv" --format csv
[ "$rc" -eq 0 ] && ok || ko "svp csv: exit $rc"
[ "$(head -n 1 "$TMP/out")" = "depth_m,speed_m_s" ] && ok || ko "svp csv: header"

# an equation cannot apply to given speeds: exit 2, FILE:LINE:COL
run soundspeed "$CASTS/kestrel_channel_svp.csv" --equation mackenzie
[ "$rc" -eq 2 ] && ok || ko "svp with equation: exit $rc"
grep -q '^[^:]*kestrel_channel_svp.csv:[0-9][0-9]*:[0-9][0-9]*: ' "$TMP/err" \
    && ok || ko "svp with equation: message '$(cat "$TMP/err")'"

# ---- json: keys, warnings array (latitude assumed for the pressure cast)
run soundspeed "$CASTS/kestrel_winter_mixed.csv" --format json
[ "$rc" -eq 0 ] && ok || ko "winter json: exit $rc"
for key in '"source"' '"equation": "chen-millero"' '"samples"' '"depth_m"' \
    '"pressure_dbar"' '"temperature_degC"' '"salinity_psu"' '"speed_m_s"' \
    '"warnings"' '"latitude_assumed": true' '"caution"'; do
    grep -q "$key" "$TMP/out" && ok || ko "winter json: no $key"
done
grep -q 'latitude not given' "$TMP/out" && ok || ko "winter json: warning not in array"
[ ! -s "$TMP/err" ] && ok || ko "winter json: stderr not empty"
if command -v python3 >/dev/null 2>&1; then
    python3 -c 'import json,sys; d=json.load(open(sys.argv[1])); \
assert len(d["samples"]) > 10 and len(d["warnings"]) == 1' "$TMP/out" \
        && ok || ko "winter json: not valid JSON of the expected shape"
fi

# validity warnings go to stderr in table form, one line each, with FILE:LINE
run soundspeed "$CASTS/kestrel_summer_thermocline.csv" --latitude 51.42 --equation del-grosso
[ "$rc" -eq 0 ] && ok || ko "del-grosso: exit $rc"
grep -q 'kestrel_summer_thermocline.csv:[0-9][0-9]*: del-grosso: .*salinity' "$TMP/err" \
    && ok || ko "del-grosso: no salinity warning on stderr"
nwarn=$(grep -c 'warning:' "$TMP/err")
grep -q "[0-9] samples, $nwarn warning" "$TMP/out" && ok || ko "del-grosso: warning count"

# ---- usage errors: exit 2, one line
run soundspeed "$CASTS/kestrel_summer_thermocline.csv" --equation unesco
[ "$rc" -eq 2 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ] && ok || ko "unknown equation: exit $rc"
run soundspeed "$CASTS/kestrel_summer_thermocline.csv" --latitude 95
[ "$rc" -eq 2 ] && ok || ko "latitude 95: exit $rc"
run soundspeed
[ "$rc" -eq 2 ] && ok || ko "no file: exit $rc"
run soundspeed "$TMP/does-not-exist.csv"
[ "$rc" -eq 1 ] && ok || ko "missing file: exit $rc (expected 1, an I/O failure)"

# ---- bad casts: exit 2, exactly one line FILE:LINE:COL: ... (expected ...)
# expected line:col of each defect, counted by hand from the files
for spec in nonmonotonic:4:1 gap:5:1 missing_value:3:3 nonfinite:3:8 \
    unparsable:3:3 ragged:3:7 unknown_column:1:9 one_sample:2:1; do
    name=${spec%%:*}
    where=${spec#*:}
    run soundspeed "$BAD/$name.csv"
    [ "$rc" -eq 2 ] && ok || ko "$name: exit $rc"
    [ "$(wc -l <"$TMP/err")" -eq 1 ] && ok || ko "$name: not one line"
    [ ! -s "$TMP/out" ] && ok || ko "$name: output written"
    grep -q "^$BAD/$name.csv:$where: .*(expected .*)\$" "$TMP/err" \
        && ok || ko "$name: message '$(cat "$TMP/err")' not at $where"
done

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

#!/bin/sh
# Shell test of `swathbudget audit` and `swathbudget simulate`.
#
# Check values: the reconciliation counts of tests/bad/csv/every-bad-row.csv
# were counted by hand from the file (listed below, row by row); the
# failures file is checked against the per-sounding rule of IHO S-44 ed.
# 6.0.0 (2020), 3.2 (TVU = sqrt(a^2 + (b d)^2), Table 1 figures written out
# below) recomputed here in Python from the figures each row carries -- an
# independent evaluation, not the program's own summary pasted back.  The
# statistical end-to-end check (simulated survey against its own budget) is
# in tests/test_audit.c.
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget), SB_SRCDIR = the source tree (default: two levels above
# this script).  Exit 0 when every check passes, 1 otherwise.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
LAUNCH="$SRC/profiles/systems/kestrel-launch.yaml"
DEEP="$SRC/profiles/systems/kestrel-deep.yaml"
BAD="$SRC/tests/bad/csv"
DEMO="$SRC/profiles/surveys/kestrel-anchorage-demo.csv"
DEMO_AREA="$SRC/profiles/surveys/kestrel-anchorage-demo-area.yaml"
COLS=line=Line,x=Easting,y=Northing,z=Depth,angle=BeamAngle
DCOLS=line=line,x=easting_m,y=northing_m,z=depth_m,angle=beam_angle_deg

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_audit.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

run() {
    "$SB" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
}

# ---- reconciliation of a file seeded with every kind of bad row -----------
# every-bad-row.csv, by hand: 20 rows (line 19 is blank, not a row);
# used: lines 2, 3, 16, 20, 21 (5);
# unparsable: 4 abc, 10 eight fields, 11 text after a quote, 12 5.0.0,
#   17 a 70-character line name, 22 an unterminated quote (6);
# non_finite: 5 nan, 6 inf, 7 1e999 (3);
# missing_column: 8 empty northing, 9 four fields, 18 empty line name (3);
# out_of_range: 13 angle 95 deg (the launch's maximum is 70), 14 depth
#   0.5 m (above the launch's transducer, 0.59 m), 15 negative TVU (3).
run audit "$LAUNCH" "$BAD/every-bad-row.csv" \
    --columns "$COLS,tpu_v=TVU,tpu_h=THU" --decimal . --format json --quiet
if [ "$rc" -eq 0 ]; then ok; else bad "bad rows stopped the run ($rc): $(cat "$TMP/err")"; fi
if python3 - "$TMP/out" <<'EOF'
import json, sys
d = json.load(open(sys.argv[1]))["reconciliation"]
r = d["rejected_by_reason"]
ok = (d["rows_read"] == 20 and d["rows_used"] == 5
      and d["rows_rejected"] == 15
      and d["rows_read"] == d["rows_used"] + d["rows_rejected"]
      and r == {"unparsable": 6, "non_finite": 3, "missing_column": 3,
                "out_of_range": 3}
      and d["rows_with_tpu_v"] == 4 and d["rows_with_tpu_h"] == 5)
sys.exit(0 if ok else 1)
EOF
then ok; else bad "reconciliation counts: $(cat "$TMP/out")"; fi
# every bad row listed once, FILE:LINE:COL: first, in file order
listed=$(grep -c 'every-bad-row.csv:[0-9]*:[0-9]*: ' "$TMP/err")
if [ "$listed" -eq 15 ]; then ok; else bad "listed $listed bad rows: $(cat "$TMP/err")"; fi
lines=$(grep -o 'every-bad-row.csv:[0-9]*:' "$TMP/err" | cut -d: -f2 | tr '\n' ' ')
if [ "$lines" = "4 5 6 7 8 9 10 11 12 13 14 15 17 18 22 " ]; then ok
else bad "listed lines: $lines"; fi

# a listing limit lists fewer, counts all, and says so (without the tpu
# columns mapped, line 15's negative TVU is not read: 14 bad rows)
run audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns "$COLS" \
    --decimal . --list-bad 2 --quiet --format csv
listed=$(grep -c 'every-bad-row.csv:[0-9]*:[0-9]*: ' "$TMP/err")
if [ "$rc" -eq 0 ] && [ "$listed" -eq 2 ] &&
   grep -q '14 bad rows in all, 2 listed' "$TMP/err"; then ok
else bad "--list-bad 2: $rc $(cat "$TMP/err")"; fi

# ---- input errors: exit 2, one line FILE:LINE:COL: -------------------------
expect_input() {
    run "$@"
    lines=$(wc -l <"$TMP/err")
    if [ "$rc" -eq 2 ] && [ "$lines" -eq 1 ] && [ ! -s "$TMP/out" ]; then ok
    else bad "'$*': status $rc, $lines stderr lines: $(cat "$TMP/err")"; fi
}
expect_input audit "$LAUNCH" "$BAD/header-missing-column.csv" --columns "$COLS"
if grep -q '^[^:]*header-missing-column.csv:1:[0-9]*: .*BeamAngle' "$TMP/err"
then ok; else bad "missing column message: $(cat "$TMP/err")"; fi
expect_input audit "$LAUNCH" "$BAD/no-usable-row.csv" --columns "$COLS" \
    --list-bad 0
expect_input audit "$LAUNCH" "$BAD/empty.csv" --columns "$COLS"
# a file that cannot be opened is an I/O failure: exit 1, one line
run audit "$LAUNCH" "$TMP/no-such-file.csv" --columns "$COLS"
if [ "$rc" -eq 1 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ]; then ok
else bad "missing soundings file: $rc $(cat "$TMP/err")"; fi
# bad usage
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv"
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns line=Line
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns "$COLS,depth=Q"
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns "$COLS" \
    --crosslines X01 --reference "$DEMO"
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns "$COLS" \
    --cell 4
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns "$COLS" \
    --order 9z
expect_input audit "$LAUNCH" "$BAD/every-bad-row.csv" --columns "$COLS" \
    --decimal x
expect_input audit "$LAUNCH" --columns "$COLS"
# a mixed decimal mark: the ',' rows are used, the '.' row is counted
run audit "$LAUNCH" "$BAD/mixed-decimal-mark.csv" --columns "$COLS" \
    --delimiter ';' --decimal , --format json --quiet
if [ "$rc" -eq 0 ] && python3 - "$TMP/out" <<'EOF'
import json, sys
d = json.load(open(sys.argv[1]))["reconciliation"]
sys.exit(0 if (d["rows_used"], d["rows_rejected"],
               d["rejected_by_reason"]["unparsable"]) == (2, 1, 1) else 1)
EOF
then ok; else bad "mixed decimal mark: $rc $(cat "$TMP/out" "$TMP/err")"; fi

# ---- the demo survey: failures file and verdicts ---------------------------
run audit "$DEEP" "$DEMO" --columns "$DCOLS,tpu_v=tvu95_m,tpu_h=thu95_m" \
    --order special,1a --failures "$TMP/fail.csv" --format json --quiet
if [ "$rc" -eq 0 ] && [ -s "$TMP/fail.csv" ]; then ok
else bad "demo audit: $rc $(cat "$TMP/err")"; fi
cp "$TMP/out" "$TMP/demo.json"
# Every row of the failures file must really fail, by S-44 ed. 6 Table 1:
#   special a = 0.25 m, b = 0.0075, THU 2 m;
#   1a      a = 0.5 m,  b = 0.013,  THU 5 m + 5 % of depth;
# and their number per order must match the summary.
if python3 - "$TMP/fail.csv" "$TMP/demo.json" <<'EOF'
import csv, json, math, sys
table1 = {"special": (0.25, 0.0075, lambda d: 2.0),
          "1a": (0.5, 0.013, lambda d: 5.0 + 0.05 * d)}
rows = list(csv.DictReader(open(sys.argv[1])))
summary = {o["order"]: o for o in json.load(open(sys.argv[2]))["orders"]}
count = {"special": 0, "1a": 0}
errors = []
for r in rows:
    a, b, thu = table1[r["order"]]
    d = float(r["depth_m"])
    tvu_lim = math.sqrt(a * a + (b * d) ** 2)
    if abs(float(r["tvu_limit_m"]) - tvu_lim) > 6e-5:
        errors.append("limit " + str(r))
    why = set(r["failed"].split("+"))
    really = set()
    if float(r["tvu95_m"]) > tvu_lim:
        really.add("tvu")
    if float(r["thu95_m"]) > thu(d):
        really.add("thu")
    if r["data_tvu95_m"] and float(r["data_tvu95_m"]) > tvu_lim:
        really.add("data_tvu")
    if r["data_thu95_m"] and float(r["data_thu95_m"]) > thu(d):
        really.add("data_thu")
    # printed to 4 decimals: a value within 1e-4 of its limit may round
    # either way
    near = abs(float(r["tvu95_m"]) - tvu_lim) < 1e-4
    if why != really and not near:
        errors.append("reason %r vs %r in %r" % (why, really, r))
    count[r["order"]] += 1
for o in ("special", "1a"):
    if count[o] != summary[o]["failing"]:
        errors.append("%s: %d rows, summary %d" % (o, count[o],
                                                   summary[o]["failing"]))
if errors:
    print("\n".join(errors[:5]))
sys.exit(1 if errors else 0)
EOF
then ok; else bad "failures file does not match S-44"; fi

# the per-line tallies add up to the totals
if python3 - "$TMP/demo.json" <<'EOF'
import json, sys
d = json.load(open(sys.argv[1]))
lines = d["lines"]
ok = sum(l["soundings"] for l in lines) == d["reconciliation"]["rows_used"]
for o in d["orders"]:
    ok = ok and sum(l["failing"][o["order"]] for l in lines) == o["failing"]
ok = ok and not any(l["crossline"] for l in lines)  # none were named
sys.exit(0 if ok else 1)
EOF
then ok; else bad "per-line tallies"; fi

# --strict: a failed verdict exits 1 ...
run audit "$DEEP" "$DEMO" --columns "$DCOLS" --order special --strict --quiet
if [ "$rc" -eq 1 ] && grep -q '^verdict special: FAIL' "$TMP/out"; then ok
else bad "--strict on a failing order: $rc"; fi
# ... and a passing one 0 (Order 2: a = 1 m, b = 0.023, THU 20 m + 10 %;
# at the demo's shallowest 97 m its TVU limit is 2.46 m, above every
# a-priori TVU95 of the demo -- at most about 2 m at 70 deg)
run audit "$DEEP" "$DEMO" --columns "$DCOLS" --order 2 --strict --quiet
if [ "$rc" -eq 0 ] && grep -q '^verdict 2: PASS' "$TMP/out"; then ok
else bad "--strict on a passing order: $rc $(cat "$TMP/out")"; fi

# a failing run leaves no failures file behind (written atomically)
run audit "$LAUNCH" "$BAD/header-missing-column.csv" --columns "$COLS" \
    --failures "$TMP/none.csv"
if [ "$rc" -eq 2 ] && [ ! -e "$TMP/none.csv" ] &&
   [ -z "$(ls "$TMP" | grep '^none')" ]; then ok
else bad "failures file after a failed run"; fi

# ---- crossline comparison ------------------------------------------------------
run audit "$DEEP" "$DEMO" --columns "$DCOLS" --order special \
    --crosslines X01,X02,X03 --cell 16 --bin 10 --min-bin 30 --format json \
    --quiet
if [ "$rc" -eq 0 ] && python3 - "$TMP/out" <<'EOF'
import json, sys
d = json.load(open(sys.argv[1]))
r = d["reconciliation"]
ref = d["reference"]
ok = (r["compare_candidates"] == r["compared"] + r["outside_grid"]
      and r["compared"] > 300 and ref["cell_m"] == 16
      and ref["cells_usable"] <= ref["cells"]
      and sum(b["compared"] for b in d["bins"]) == r["compared"])
sys.exit(0 if ok else 1)
EOF
then ok; else bad "crossline comparison: $rc $(cat "$TMP/err")"; fi
# the same reference from a separate file: the crosslines' rows
{ head -1 "$DEMO"; grep '^X0' "$DEMO"; } >"$TMP/ref.csv"
grep -v '^X0' "$DEMO" >"$TMP/main.csv"
run audit "$DEEP" "$TMP/main.csv" --columns "$DCOLS" --order special \
    --reference "$TMP/ref.csv" --cell 16 --format json --quiet
if [ "$rc" -eq 0 ] && python3 - "$TMP/out" "$TMP/demo.json" <<'EOF'
import json, sys
d = json.load(open(sys.argv[1]))
r = d["reconciliation"]
ok = (r["reference_rows_rejected"] == 0 and r["compared"] > 300
      and r["rows_read"] + r["reference_rows_read"]
          == json.load(open(sys.argv[2]))["reconciliation"]["rows_read"])
sys.exit(0 if ok else 1)
EOF
then ok; else bad "--reference: $rc $(cat "$TMP/err")"; fi
# a crossline that is not in the file is reported
run audit "$DEEP" "$DEMO" --columns "$DCOLS" --order special \
    --crosslines X01,X9 --cell 16 --quiet
if [ "$rc" -eq 0 ] && grep -q "crossline 'X9' is not in" "$TMP/err"; then ok
else bad "missing crossline warning: $rc $(cat "$TMP/err")"; fi

# ---- simulate --------------------------------------------------------------------
run simulate "$DEEP" --area "$DEMO_AREA" -o "$TMP/a.csv" --seed 2024 \
    --ping-spacing 8 --beams 41 --crosslines 3 --with-tpu
if [ "$rc" -eq 0 ] && cmp -s "$TMP/a.csv" "$DEMO"; then ok
else bad "the shipped demo survey is not what simulate writes: $rc $(cat "$TMP/err")"; fi
run simulate "$DEEP" --area "$DEMO_AREA" -o "$TMP/b.csv" --seed 7 \
    --ping-spacing 8 --beams 41 --crosslines 3 --with-tpu
if [ "$rc" -eq 0 ] && ! cmp -s "$TMP/a.csv" "$TMP/b.csv" &&
   [ "$(wc -l <"$TMP/a.csv")" -eq "$(wc -l <"$TMP/b.csv")" ]; then ok
else bad "another seed: $rc"; fi
head -1 "$TMP/a.csv" >"$TMP/h"
if grep -qx 'line,easting_m,northing_m,depth_m,beam_angle_deg,tvu95_m,thu95_m' "$TMP/h"
then ok; else bad "header $(cat "$TMP/h")"; fi
# an output that cannot be written: exit 1, nothing left behind
run simulate "$DEEP" --area "$DEMO_AREA" -o "$TMP/no/such/dir/x.csv"
if [ "$rc" -eq 1 ]; then ok; else bad "unwritable output: $rc"; fi
expect_input simulate "$DEEP" -o "$TMP/x.csv"
expect_input simulate "$DEEP" --area "$DEMO_AREA"
expect_input simulate "$DEEP" --area "$DEMO_AREA" -o "$TMP/x.csv" --beams 1
expect_input simulate "$DEEP" --area "$DEMO_AREA" -o "$TMP/x.csv" \
    --relief hills
expect_input simulate "$DEEP" --area "$DEMO_AREA" -o "$TMP/x.csv" \
    --max-soundings 100
if [ ! -e "$TMP/x.csv" ]; then ok; else bad "a refused run left a file"; fi
# an area the system cannot survey to its order: at 600 m the Exclusive
# Order's limits (S-44 ed. 6 Table 1: TVU 4.5 m, THU 1 m) already fail at
# nadir for the deep-water system, so there is no line layout; the error
# points at the area's order line
sed 's/^order: 1a/order: exclusive/; s/depth: 1[02]5 m/depth: 600 m/' \
    "$DEMO_AREA" >"$TMP/deep-area.yaml"
expect_input simulate "$DEEP" --area "$TMP/deep-area.yaml" -o "$TMP/x.csv"
if grep -q 'deep-area.yaml:[0-9]*:[0-9]*: .*exclusive' "$TMP/err"; then ok
else bad "infeasible area message: $(cat "$TMP/err")"; fi

echo "audit.sh: $pass passed, $fail failed"
[ "$fail" -eq 0 ]

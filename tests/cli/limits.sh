#!/bin/sh
# Shell test of `swathbudget limits`.
#
# Check values: IHO S-44 Edition 6.0.0 (2020), Table 1 (a, b, THU, feature
# sizes) with TVU = sqrt(a^2 + (b d)^2) (S-44 ed. 6, 3.2); the spot values
# are worked by hand in the comments, the full 10:100:10 grid is recomputed
# here in Python from the Table 1 figures written out below (an independent
# evaluation of the published closed form, not the program's own output).
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget), SB_SRCDIR = the source tree (default: two levels above
# this script).  Exit 0 when every check passes, 1 otherwise.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
EXAMPLE="$SRC/profiles/standards/kestrel-harbour.yaml"

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_limits.XXXXXX") || exit 1
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

# ---- JSON against hand-computed S-44 ed. 6 values ----------------------
run limits --depths 10:100:10 --format json
if [ "$rc" -eq 0 ]; then ok; else bad "json run exited $rc: $(cat "$TMP/err")"; fi

if python3 - "$TMP/out" <<'EOF'
import json, math, sys

doc = json.load(open(sys.argv[1]))
errors = []

def check(cond, what):
    if not cond:
        errors.append(what)

# The exact shape: {"standard": ID, "limits": [{order, depth_m, tvu_m,
# thu_m, feature_m}]}
check(sorted(doc.keys()) == ["limits", "standard"], "top-level keys")
check(doc["standard"] == "s44-6", "standard id")
for row in doc["limits"]:
    check(sorted(row.keys()) == ["depth_m", "feature_m", "order", "thu_m",
                                 "tvu_m"], "row keys %r" % sorted(row))

# IHO S-44 Edition 6.0.0 (2020), Table 1:
#   order       a (m)  b       THU (m)            feature detection
table1 = {
    "exclusive": (0.15, 0.0075, lambda d: 1.0, lambda d: 0.5),
    "special":   (0.25, 0.0075, lambda d: 2.0, lambda d: 1.0),
    "1a":        (0.50, 0.013, lambda d: 5 + 0.05 * d,
                  lambda d: 2.0 if d <= 40 else 0.10 * d),
    "1b":        (0.50, 0.013, lambda d: 5 + 0.05 * d, lambda d: None),
    "2":         (1.00, 0.023, lambda d: 20 + 0.10 * d, lambda d: None),
}
depths = [10.0 * k for k in range(1, 11)]
rows = {(r["order"], r["depth_m"]): r for r in doc["limits"]}
check(len(doc["limits"]) == 5 * 10, "50 rows (5 orders x 10 depths)")
check([r["order"] for r in doc["limits"][::10]] ==
      ["exclusive", "special", "1a", "1b", "2"], "order sequence")
for order, (a, b, thu, feat) in table1.items():
    for d in depths:
        r = rows.get((order, d))
        if r is None:
            errors.append("missing %s at %g m" % (order, d))
            continue
        tvu = math.sqrt(a * a + (b * d) ** 2)   # S-44 ed. 6, 3.2
        check(abs(r["tvu_m"] - tvu) < 1e-8, "%s %g m tvu %r vs %r"
              % (order, d, r["tvu_m"], tvu))
        check(abs(r["thu_m"] - thu(d)) < 1e-8, "%s %g m thu" % (order, d))
        f = feat(d)
        if f is None:
            check(r["feature_m"] is None, "%s %g m feature null" % (order, d))
        else:
            check(r["feature_m"] is not None and abs(r["feature_m"] - f) < 1e-8,
                  "%s %g m feature %r vs %r" % (order, d, r["feature_m"], f))

# Spot values worked by hand:
#  1a at 40 m: TVU = sqrt(0.25 + 0.52^2) = sqrt(0.5204) = 0.721388 m,
#              THU = 5 + 0.05 x 40 = 7 m, feature 2 m (up to 40 m)
#  1a at 50 m: feature = 10 % of 50 m = 5 m
#  2 at 100 m: TVU = sqrt(1 + 2.3^2) = sqrt(6.29) = 2.507987 m, THU = 30 m
#  exclusive at 20 m: TVU = 0.15 sqrt(2) = 0.212132 m
r = rows[("1a", 40.0)]
check(abs(r["tvu_m"] - 0.721388) < 1e-6 and r["thu_m"] == 7 and
      r["feature_m"] == 2, "1a at 40 m by hand")
check(rows[("1a", 50.0)]["feature_m"] == 5, "1a at 50 m feature by hand")
r = rows[("2", 100.0)]
check(abs(r["tvu_m"] - 2.507987) < 1e-6 and r["thu_m"] == 30,
      "2 at 100 m by hand")
check(abs(rows[("exclusive", 20.0)]["tvu_m"] - 0.212132) < 1e-6,
      "exclusive at 20 m by hand")

for e in errors:
    print("  " + e)
sys.exit(1 if errors else 0)
EOF
then ok; else bad "json values differ from S-44 ed. 6 Table 1"; fi

# ---- table output --------------------------------------------------------
run limits --depth 40,50 --order 1a,1b
if [ "$rc" -eq 0 ]; then ok; else bad "table run exited $rc"; fi
# header carries the units
if grep -q 'depth (m)' "$TMP/out" && grep -q 'TVU 95% (m)' "$TMP/out" &&
   grep -q 'THU 95% (m)' "$TMP/out" && grep -q 'feature (m)' "$TMP/out"
then ok; else bad "table header without units"; fi
# 1a at 40 m (hand values above): 0.721 m, 7.00 m, 2.00 m
if grep -Eq '^1a +40\.00 +0\.721 +7\.00 +2\.00$' "$TMP/out"; then ok
else bad "table row 1a 40 m"; fi
# 1b: feature not specified (S-44 ed. 6, Table 1) shown as '-'
if grep -Eq '^1b +50\.00 +0\.820 +7\.50 +-$' "$TMP/out"; then ok
else bad "table row 1b 50 m"; fi
# aligned: header, rule and the four rows all have the same width
widths=$(awk '/^order /{on=1} on && NF==0{on=0} on{print length($0)}' \
         "$TMP/out" | sort -u | wc -l)
nrows=$(awk '/^order /{on=1} on && NF==0{on=0} on{n++} END{print n+0}' \
        "$TMP/out")
if [ "$widths" -eq 1 ] && [ "$nrows" -eq 6 ]; then ok
else bad "table not aligned ($widths widths, $nrows lines)"; fi

# ---- CSV output ----------------------------------------------------------
run limits --depth 40 --order 1a,1b --format csv
if [ "$rc" -eq 0 ] &&
   [ "$(sed -n 1p "$TMP/out")" = "order,depth_m,tvu_m,thu_m,feature_m" ] &&
   [ "$(sed -n 2p "$TMP/out")" = "1a,40.00,0.721,7.00,2.00" ] &&
   [ "$(sed -n 3p "$TMP/out")" = "1b,40.00,0.721,7.00," ] &&
   [ "$(wc -l <"$TMP/out")" -eq 3 ]
then ok; else bad "csv output: $(cat "$TMP/out")"; fi

# ---- other editions --------------------------------------------------------
# S-44 4th Edition (1998), Table 1 (from memory, not checked against the
# text): Order 3 THU = 150 m + 5 % d; at 100 m: 155 m.
run limits --standard s44-4 --order 3 --depth 100 --format csv
if [ "$rc" -eq 0 ] && grep -q '^3,100.00,2.508,155.00,$' "$TMP/out"; then ok
else bad "s44-4 order 3: $(cat "$TMP/out" "$TMP/err")"; fi

# ---- custom standard (the shipped example) ---------------------------------
# Figures as written in kestrel-harbour.yaml: anchorage a = 50 cm, b = 0.013,
# THU 5 m + 5 %.  At 60 m: TVU = sqrt(0.25 + 0.78^2) = 0.926499 m, THU 8 m,
# feature 10 % of 60 m = 6 m.
run limits --standard "$EXAMPLE" --order anchorage,passage --depth 60 \
    --format json
if [ "$rc" -eq 0 ] && python3 - "$TMP/out" <<'EOF'
import json, sys
d = json.load(open(sys.argv[1]))
a, p = d["limits"]
ok = (d["standard"] == "ksha-hs2" and a["order"] == "anchorage"
      and abs(a["tvu_m"] - 0.926499) < 1e-6 and abs(a["thu_m"] - 8) < 1e-9
      and abs(a["feature_m"] - 6) < 1e-9 and p["feature_m"] is None)
sys.exit(0 if ok else 1)
EOF
then ok; else bad "custom standard: $(cat "$TMP/out" "$TMP/err")"; fi

# ---- bad options: exit 2, one line on stderr, nothing on stdout ------------
expect_usage() {
    run "$@"
    lines=$(wc -l <"$TMP/err")
    if [ "$rc" -eq 2 ] && [ "$lines" -eq 1 ] && [ ! -s "$TMP/out" ]; then ok
    else bad "'$*': status $rc, $lines stderr lines: $(cat "$TMP/err")"; fi
}
expect_usage limits --depth 40 --order 3          # no Order 3 in ed. 6
expect_usage limits --depth 40 --order 1a,nope
expect_usage limits --depth 0
expect_usage limits --depth -10
expect_usage limits --depth ten
expect_usage limits --depth 10,,20
expect_usage limits --depth nan
expect_usage limits --depths 10:100
expect_usage limits --depths 100:10:10
expect_usage limits --depths 10:100:0
expect_usage limits --depths 0:100:10
expect_usage limits --depths a:b:c
expect_usage limits --depth 10 --depths 10:20:5
expect_usage limits
expect_usage limits --depth 10 --format xml
expect_usage limits --depth 10 --standard s44-9
expect_usage limits --depth 10 --no-such-option
expect_usage limits --depth 10 stray

# a custom standard with an error: FILE:LINE:COL: on one line, exit 2
cat >"$TMP/bad.yaml" <<'EOF'
id: broken
name: Broken specification
orders:
  - id: one
    name: One
    tvu:
      a: -0.5 m
      b: 0.013
    thu:
      constant: 5 m
      depth_fraction: 5%
    feature: none
    coverage: 100%
EOF
expect_usage limits --depth 10 --standard "$TMP/bad.yaml"
if grep -q "^$TMP/bad.yaml:7:10: " "$TMP/err"; then ok
else bad "custom error position: $(cat "$TMP/err")"; fi

# ---- help ---------------------------------------------------------------------
run help limits
if [ "$rc" -eq 0 ] && grep -q '^usage: swathbudget limits' "$TMP/out"; then ok
else bad "help limits"; fi
run limits --help
if [ "$rc" -eq 0 ] && grep -q '^usage: swathbudget limits' "$TMP/out"; then ok
else bad "limits --help"; fi

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

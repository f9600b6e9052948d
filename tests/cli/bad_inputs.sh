#!/bin/sh
# Shell test: the malformed-input corpus under tests/bad/ (one file per error
# class) and a few inputs generated here (a 100 MB single line, binary
# garbage).  For each: exit status exactly 2, exactly one line on stderr
# that starts with FILE:LINE:COL: (FILE as given on the command line), says
# what was expected ("(expected ...)") and names the problem, and nothing
# on stdout.
#
# Loaders and the command that reaches each:
#   tests/bad/spec/*.yaml      system spec        swathbudget plan FILE
#   tests/bad/standard/*.yaml  custom standard    swathbudget limits --standard FILE --depth 10
#   tests/bad/cast/*.csv       cast / profile     swathbudget soundspeed FILE
#   tests/bad/area/*.yaml      survey area        swathbudget report SYSTEM --area FILE -o OUT
#   soundings CSV (fatal errors only; bad rows are counted, not fatal)
#                                                 swathbudget audit SYSTEM FILE --columns ...
#
# The expected LINE:COL of every file was found by reading the file by hand
# (1-based; columns count characters as an editor shows them; the first
# line of each file says what is wrong with it).  Notes:
#   spec/truncated, standard/truncated: the text ends inside a flow mapping,
#       libyaml reports the end of the stream at the start of the next line;
#   empty and binary files: nothing else to point at than 1:1;
#   cast/ragged: the row ends at column 7 where a third field should start;
#   cast/mixed-decimal-mark: the cast format's delimiter is ',', so "2,0"
#       splits into two fields and the row is ragged at column 5;
#   cast/one_sample, cast/header-only: the count is reported at the line
#       after the header (2 = the header itself when the file ends there).
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget), SB_SRCDIR = the source tree (default: two levels above
# this script).  Prints 'N passed, N failed'; exit 0 when all pass.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
BAD="$SRC/tests/bad"
LAUNCH="$SRC/profiles/systems/kestrel-launch.yaml"

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_badin.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

# expect_error PATH LINE:COL WANT CMD...: run CMD, check the contract.
expect_error() {
    path=$1
    pos=$2
    want=$3
    shift 3
    "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
    name=${path#"$SRC/"}
    if [ "$rc" -eq 2 ]; then ok; else bad "$name: exit status $rc (expected 2)"; fi
    lines=$(wc -l <"$TMP/err")
    if [ "$lines" -eq 1 ]; then ok; else bad "$name: $lines lines on stderr (expected 1)"; fi
    msg=$(head -c 2000 "$TMP/err")
    case "$msg" in
        "$path:$pos: "*) ok ;;
        *) bad "$name: message '$msg' (expected it to start with $path:$pos:)" ;;
    esac
    case "$msg" in
        *"(expected "*) ok ;;
        *) bad "$name: message '$msg' does not say what was expected" ;;
    esac
    case "$msg" in
        *"$want"*) ok ;;
        *) bad "$name: message '$msg' lacks '$want'" ;;
    esac
    if [ ! -s "$TMP/out" ]; then ok; else bad "$name: output on stdout"; fi
}

# run_table DIR: lines "FILE LINE:COL TEXT" from stdin, with the command
# given by the function cmd_for.
run_table() {
    dir=$1
    while read -r file pos want; do
        [ -n "$file" ] || continue
        path="$BAD/$dir/$file"
        if [ ! -f "$path" ]; then
            bad "$dir/$file: missing test file"
            continue
        fi
        echo "$dir/$file" >>"$TMP/covered"
        # shellcheck disable=SC2046
        expect_error "$path" "$pos" "$want" $(cmd_for "$dir") "$path" $(cmd_tail "$dir")
    done
}

cmd_for() {
    case $1 in
        spec) echo "$SB plan" ;;
        standard) echo "$SB limits --depth 10 --standard" ;;
        cast) echo "$SB soundspeed" ;;
        area) echo "$SB report $LAUNCH -o $TMP/report.html --area" ;;
    esac
}
cmd_tail() { :; }

: >"$TMP/covered"

# ---- system specifications (positions as in tests/cli/spec_errors.sh) ------
run_table spec <<'EOF'
unknown-key.yaml          20:3   unknown key 'rol'
missing-key.yaml          20:3   missing required key 'pitch'
wrong-type.yaml           41:14  found a mapping
wrong-dimension.yaml      20:9   unit 'm' is a length
negative-uncertainty.yaml 23:10  negative uncertainty
nan.yaml                  23:10  non-finite number
inf.yaml                  16:20  not a finite number
angle-90.yaml             47:19  out of range
duplicate-key.yaml        23:3   duplicate key 'heading'
tab-indent.yaml           22:1   tab character
truncated.yaml            8:1    YAML syntax error
empty.yaml                1:1    empty file
binary.yaml               1:1    control characters
EOF

# ---- custom standards ------------------------------------------------------
run_table standard <<'EOF'
truncated.yaml            8:1    YAML syntax error
tab-indent.yaml           7:1    tab character
duplicate-key.yaml        9:5    duplicate key 'tvu'
wrong-type.yaml           7:10   found a list
unknown-key.yaml          9:5    unknown key 'colour'
missing-key.yaml          5:5    missing required key 'thu'
wrong-dimension.yaml      7:14   unit 's' is a time
negative.yaml             8:21   negative length
nan.yaml                  7:24   is not a number
inf.yaml                  7:14   non-finite number
empty.yaml                1:1    empty file
binary.yaml               1:1    control characters
EOF

# ---- casts and sound velocity profiles --------------------------------------
run_table cast <<'EOF'
gap.csv                   5:1    gap of 56.00 m
missing_value.csv         3:3    missing value of temperature_degC
nonfinite.csv             3:8    is not finite
nonmonotonic.csv          4:1    is not below the previous sample
one_sample.csv            2:1    1 sample after the header
ragged.csv                3:7    row has 2 fields
unknown_column.csv        1:9    unknown column 'temp'
unparsable.csv            3:3    is not a number
empty.csv                 1:1    no header line
binary.csv                1:1    unknown column
header-only.csv           2:1    0 samples after the header
mixed-decimal-mark.csv    4:5    row has 3 fields
EOF

# ---- survey areas ------------------------------------------------------------
run_table area <<'EOF'
wrong-dimension.yaml      8:12   unit 'kn' is a speed
negative-depth.yaml       9:8    out of range
too-few-vertices.yaml     6:5    2 distinct corners
EOF
if [ ! -e "$TMP/report.html" ]; then ok; else bad "area: a report was written despite the error"; fi

# every file of these corpora is covered by a case above
for dir in spec standard cast area; do
    for f in "$BAD/$dir"/*; do
        [ -f "$f" ] || continue
        name="$dir/$(basename "$f")"
        if grep -qx "$name" "$TMP/covered"; then ok; else bad "$name: no case for this file"; fi
    done
done

# ---- generated: 100 MB on a single line -------------------------------------
# (made here, never committed)  One YAML value of 100 000 000 characters,
# one line of 100 000 000 characters with no line break at all, and a CSV
# header of that length.
big=100000000
gen() { head -c "$big" /dev/zero | tr '\0' "$1"; }
{ printf 'name: '; gen a; printf '\n'; } >"$TMP/long-value.yaml"
gen x >"$TMP/one-line.yaml"
{ gen d; printf '\n0,1500\n10,1499\n'; } >"$TMP/long-header.csv"
{ printf 'Line,Easting,Northing,Depth,BeamAngle'; gen x; printf '\nL1,1,2,20,0\n'; } >"$TMP/long-soundings.csv"
expect_error "$TMP/long-value.yaml" 1:7 "too long" "$SB" plan "$TMP/long-value.yaml"
expect_error "$TMP/one-line.yaml" 1:1 "found a single value" "$SB" plan "$TMP/one-line.yaml"
expect_error "$TMP/one-line.yaml" 1:1 "" "$SB" limits --depth 10 --standard "$TMP/one-line.yaml"
expect_error "$TMP/long-header.csv" 1:1 "unknown column" "$SB" soundspeed "$TMP/long-header.csv"
rm -f "$TMP/long-value.yaml" "$TMP/long-header.csv"

# ---- the soundings CSV reader (through audit): fatal errors ------------------
COLS=line=Line,x=Easting,y=Northing,z=Depth,angle=BeamAngle
if "$SB" help audit >/dev/null 2>&1; then
    expect_error "$TMP/long-soundings.csv" 1:1 "" \
        "$SB" audit "$LAUNCH" "$TMP/long-soundings.csv" --columns "$COLS"
    head -c 4096 /dev/urandom >"$TMP/garbage.csv" 2>/dev/null ||
        awk 'BEGIN { for (i = 0; i < 4096; i++) printf "%c", (i * 7919) % 256 }' >"$TMP/garbage.csv"
    # random bytes: whatever the header turns out to be, the columns named
    # are not in it (or the header is unusable) -- an input error
    "$SB" audit "$LAUNCH" "$TMP/garbage.csv" --columns "$COLS" >"$TMP/out" 2>"$TMP/err"
    rc=$?
    if [ "$rc" -eq 2 ] && [ "$(wc -l <"$TMP/err")" -eq 1 ] &&
        grep -q "^$TMP/garbage.csv:[0-9][0-9]*:[0-9][0-9]*: .*(expected " "$TMP/err"
    then ok; else bad "garbage soundings: status $rc, $(head -c 300 "$TMP/err")"; fi
    expect_error "$BAD/csv/empty.csv" 1:1 "empty file" \
        "$SB" audit "$LAUNCH" "$BAD/csv/empty.csv" --columns "$COLS"
    expect_error "$BAD/csv/header-missing-column.csv" 1:1 "BeamAngle" \
        "$SB" audit "$LAUNCH" "$BAD/csv/header-missing-column.csv" --columns "$COLS"
    # bad rows (ragged, mixed decimal marks, non-finite, ...) are counted
    # and listed, not fatal: every listed line still has the
    # FILE:LINE:COL: ... (expected ...) form
    "$SB" audit "$LAUNCH" "$BAD/csv/every-bad-row.csv" --columns "$COLS" \
        --quiet --list-bad 100 >"$TMP/out" 2>"$TMP/err"
    n=$(wc -l <"$TMP/err")
    good=$(grep -c "^$BAD/csv/every-bad-row.csv:[0-9][0-9]*:[0-9][0-9]*: .*(expected .*)" "$TMP/err")
    if [ "$n" -ge 10 ] && [ "$good" -eq "$n" ]; then ok
    else bad "bad-row listing: $good of $n lines in the FILE:LINE:COL form"; fi
    "$SB" audit "$LAUNCH" "$BAD/csv/mixed-decimal-mark.csv" --columns "$COLS" \
        --delimiter ';' --decimal , --quiet >"$TMP/out" 2>"$TMP/err"
    if grep -q "^$BAD/csv/mixed-decimal-mark.csv:4:18: .*decimal mark.*(expected " "$TMP/err"
    then ok; else bad "mixed decimal mark row: $(cat "$TMP/err")"; fi
fi
rm -f "$TMP/long-soundings.csv" "$TMP/one-line.yaml"

# ---- input text quoted in a message stays on one line -----------------------
# a YAML key holding a line break (a multi-line plain scalar), found by the
# fuzzer (tests/fuzz/corpus/standard/regress-key-with-line-break)
printf 'id: t\nname: x\norders:\n  - id: a\n    name: A\n    thu: {constant: 5 m, depth_fraction: 5%%}\n    feature: none\n    coverage: 100%%\n    tvu: {a: 0.5 m, b: 0.013, c d\n\n      e}\n' >"$TMP/key-break.yaml"
expect_error "$TMP/key-break.yaml" 9:31 "unknown key 'c d?e'" "$SB" limits --depth 10 --standard "$TMP/key-break.yaml"
# a quoted CSV column name holding a line break
printf 'depth_m,"speed\nm_s"\n0,1500\n10,1499\n' >"$TMP/name-break.csv"
expect_error "$TMP/name-break.csv" 1:9 "" "$SB" soundspeed "$TMP/name-break.csv"

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

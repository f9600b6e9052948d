#!/bin/sh
# Shell test: every bad system file in tests/bad/spec/ makes `swathbudget
# plan FILE` exit with status 2 and print exactly one line on stderr that
# starts with FILE:LINE:COL: and nothing on stdout.
#
# The expected LINE:COL of each file was found by reading the file by hand
# (1-based, columns in characters as an editor shows them); the first line
# of each file says what is wrong with it.  Notes:
#   truncated.yaml  the text ends inside a flow mapping on line 7; libyaml
#                   reports the end of the stream at the start of line 8
#   empty.yaml      nothing to point at: 1:1
#   binary.yaml     the first byte (0x1f) is a control character: 1:1
#
# Environment: SWATHBUDGET = the program (default ../swathbudget or
# ./swathbudget), SB_SRCDIR = the source tree (default: two levels above
# this script).  Prints 'N passed, N failed'; exit 0 when all pass.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
BAD="$SRC/tests/bad/spec"

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_specerr.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM

pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

# file           line:col  text the message must contain
CASES='
unknown-key.yaml          20:3   motion: unknown key '"'"'rol'"'"'
missing-key.yaml          20:3   motion: missing required key '"'"'pitch'"'"'
wrong-type.yaml           41:14  echosounder.frequency: found a mapping
wrong-dimension.yaml      20:9   motion.roll: unit '"'"'m'"'"' is a length (expected an angle
negative-uncertainty.yaml 23:10  motion.heave: negative uncertainty
nan.yaml                  23:10  motion.heave: non-finite number
inf.yaml                  16:20  positioning.latency.value: '"'"'.inf'"'"' is not a finite number
angle-90.yaml             47:19  echosounder.max_beam_angle: '"'"'90 deg'"'"' is out of range
duplicate-key.yaml        23:3   duplicate key '"'"'heading'"'"'
tab-indent.yaml           22:1   tab character used for indentation (expected spaces)
truncated.yaml            8:1    YAML syntax error:
empty.yaml                1:1    empty file (expected a YAML mapping)
binary.yaml               1:1    control characters are not allowed
'

echo "$CASES" | while read -r file pos want; do
    [ -n "$file" ] || continue
    echo "$file $pos $want"
done >"$TMP/cases"

while read -r file pos want; do
    path="$BAD/$file"
    if [ ! -f "$path" ]; then
        bad "$file: missing test file"
        continue
    fi
    "$SB" plan "$path" >"$TMP/out" 2>"$TMP/err"
    rc=$?
    if [ "$rc" -eq 2 ]; then ok; else bad "$file: exit status $rc (expected 2)"; fi
    lines=$(wc -l <"$TMP/err")
    if [ "$lines" -eq 1 ]; then ok; else bad "$file: $lines lines on stderr (expected 1)"; fi
    msg=$(cat "$TMP/err")
    case "$msg" in
        "$path:$pos: "*) ok ;;
        *) bad "$file: message '$msg' (expected it to start with $path:$pos:)" ;;
    esac
    case "$msg" in
        *"$want"*) ok ;;
        *) bad "$file: message '$msg' lacks '$want'" ;;
    esac
    if [ ! -s "$TMP/out" ]; then ok; else bad "$file: output on stdout"; fi
done <"$TMP/cases"

# every bad file is covered by a case above
for f in "$BAD"/*.yaml; do
    name=$(basename "$f")
    if grep -q "^$name " "$TMP/cases"; then ok; else bad "$name: no expected position in this script"; fi
done

echo "$pass passed, $fail failed"
[ "$fail" -eq 0 ]

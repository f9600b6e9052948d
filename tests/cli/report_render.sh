#!/bin/sh
# Render the HTML report in headless Chromium (Debian's chromium package)
# and check that a non-blank picture of the expected size came out: the PNG
# header's width and height are those asked for, and its pixels (decoded
# here with python3's zlib and the PNG filters of the PNG specification,
# ISO/IEC 15948:2004 clause 9) are not all one colour.  Nothing is fetched:
# networking, sync and updates are turned off and the page is a local file.
# SKIPs (exit 77) when chromium is not installed.

SB=${SWATHBUDGET:-}
if [ -z "$SB" ]; then
    if [ -x ../swathbudget ]; then SB=../swathbudget; else SB=./swathbudget; fi
fi
SRC=${SB_SRCDIR:-$(cd "$(dirname "$0")/../.." && pwd)}
CHROMIUM=${CHROMIUM:-$(command -v chromium 2>/dev/null)}
if [ -z "$CHROMIUM" ] || [ ! -x "$CHROMIUM" ]; then
    echo "SKIP: chromium is not installed"
    exit 77
fi

TMP=$(mktemp -d "${TMPDIR:-/tmp}/sb_render.XXXXXX") || exit 1
trap 'rm -rf "$TMP"' EXIT HUP INT TERM
case $TMP in /*) ;; *) TMP=$(pwd)/$TMP ;; esac

"$SB" report "$SRC/profiles/systems/kestrel-launch.yaml" \
    --area "$SRC/profiles/areas/kestrel-approach.yaml" -o "$TMP/report.html" \
    2>"$TMP/err" || { echo "FAIL: report: $(cat "$TMP/err")"; exit 1; }

timeout 120 "$CHROMIUM" --headless --no-sandbox --disable-gpu \
    --disable-background-networking --no-first-run \
    --disable-component-update --disable-sync \
    --user-data-dir="$TMP/profile" --screenshot="$TMP/shot.png" \
    --window-size=1200,1600 "file://$TMP/report.html" >"$TMP/log" 2>&1
if [ ! -s "$TMP/shot.png" ]; then
    echo "FAIL: no screenshot: $(tail -3 "$TMP/log")"
    exit 1
fi

python3 - "$TMP/shot.png" <<'PY'
import struct, sys, zlib

data = open(sys.argv[1], "rb").read()
assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
pos, idat, ihdr = 8, b"", None
while pos < len(data):
    n, kind = struct.unpack(">I4s", data[pos:pos + 8])
    body = data[pos + 8:pos + 8 + n]
    if kind == b"IHDR":
        ihdr = struct.unpack(">IIBBBBB", body)
    elif kind == b"IDAT":
        idat += body
    pos += 12 + n
w, h, depth, ctype, _, _, interlace = ihdr
assert (w, h) == (1200, 1600), (w, h)
assert depth == 8 and ctype in (2, 6) and interlace == 0, ihdr
bpp = 3 if ctype == 2 else 4
raw = zlib.decompress(idat)
stride = w * bpp
prev = bytearray(stride)
colours = set()
for y in range(h):
    f = raw[y * (stride + 1)]
    line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
    for i in range(stride):
        a = line[i - bpp] if i >= bpp else 0
        b = prev[i]
        c = prev[i - bpp] if i >= bpp else 0
        if f == 1:
            line[i] = (line[i] + a) & 255
        elif f == 2:
            line[i] = (line[i] + b) & 255
        elif f == 3:
            line[i] = (line[i] + (a + b) // 2) & 255
        elif f == 4:
            p = a + b - c
            pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
            pr = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
            line[i] = (line[i] + pr) & 255
    if y % 16 == 0:
        for x in range(0, w, 7):
            colours.add(bytes(line[x * bpp:x * bpp + 3]))
    prev = line
# text, rules and plots: far more than one colour; a blank page has one
assert len(colours) > 20, len(colours)
dark = sum(1 for c in colours if max(c) < 80)
assert dark > 0, "no dark pixels: no text was drawn"
print("rendered %dx%d, %d colours sampled" % (w, h, len(colours)))
PY

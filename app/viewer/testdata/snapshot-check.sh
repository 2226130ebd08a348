#!/usr/bin/env bash
# Usage: app/viewer/testdata/snapshot-check.sh QUADTRACE_BINARY [FILE.sgy]
#
# Checks that `quadtrace --snapshot OUT.png` writes what is really on the
# screen: in a fresh Xvfb display it runs the snapshot with the window held
# open for a few seconds afterwards (QUADTRACE_SNAPSHOT_HOLD), grabs the whole
# screen with ImageMagick's `import -window root` while the window is still
# there, crops the grab at the window position the viewer reports, and
# compares the two pixel by pixel, and reports how fyne's own Canvas().Capture()
# of the same frame compares. It also checks that the snapshot is not
# blank: the section area holds many distinct colours (over 200; a blank
# window shows a few dozen, the demo survey thousands, the flat corpus file
# small.sgy about 300).
# Needs xvfb-run and imagemagick (import, convert, compare, identify).
set -euo pipefail
bin=$(realpath "${1:?usage: snapshot-check.sh QUADTRACE_BINARY [FILE]}"); shift
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
export LANG=${LANG:-C.UTF-8}
# fresh preferences: a window size saved by an earlier run on a larger
# screen must not decide what this check sees
export XDG_CONFIG_HOME="$work/config"
xvfb-run -a -s "-screen 0 1600x1000x24" bash -c '
  bin=$1; work=$2; shift 2
  QUADTRACE_SNAPSHOT_HOLD=4 QUADTRACE_SNAPSHOT_GL_CAPTURE="$work/gl.png" "$bin" --snapshot "$work/snap.png" "$@" 2>"$work/log" & pid=$!
  for i in $(seq 1 1200); do [ -f "$work/snap.png" ] && break; sleep 0.1; done
  sleep 0.5
  import -window root "$work/root.png"
  wait $pid' _ "$bin" "$work" "$@"
geom=$(sed -n 's/.*window \([0-9]*x[0-9]*\) at \([0-9]*\),\([0-9]*\) on the screen.*/\1+\2+\3/p' "$work/log")
[ -n "$geom" ] || { echo "FAIL: the viewer reported no window position"; cat "$work/log"; exit 1; }
convert "$work/root.png" -crop "$geom" +repage "$work/crop.png"
diff=$(compare -metric AE "$work/snap.png" "$work/crop.png" null: 2>&1 || true)
colours=$(convert "$work/snap.png" -crop 50%x60%+400+120 +repage -format %k info:)
gldiff=$(compare -metric AE "$work/gl.png" "$work/crop.png" null: 2>&1 || true)
echo "for comparison, fyne's Canvas().Capture() of the same frame: $(convert "$work/gl.png" -format '%k colours, opaque: %[opaque]' info:), pixels differing from the screen grab: $gldiff"
echo "snapshot $(identify -format %wx%h "$work/snap.png"), window at ${geom#*+}; pixels differing from the screen grab: $diff; colours in the section area: $colours"
[ "$diff" = "0" ] || { echo "FAIL: the snapshot differs from the screen"; exit 1; }
[ "$colours" -gt 200 ] || { echo "FAIL: the snapshot looks blank"; exit 1; }
echo "snapshot check: 1 passed, 0 failed"

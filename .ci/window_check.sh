#!/usr/bin/env bash
# Window check: build the real program, open its window on a virtual screen (Xvfb, Mesa software
# OpenGL), capture the window to PNG and check that it is not blank and that the canal wall shows
# depth-of-cut colours (the check itself is TestWindowCapture in ./ui).
# Needs xvfb, x11-utils and imagemagick: bash .ci/setup.sh test installs them.
#   bash .ci/window_check.sh [OUT.png]
set -euo pipefail
cd "$(dirname "$0")/.."
export PATH=$PATH:/usr/local/go/bin
for tool in Xvfb xwininfo import convert; do
  command -v "$tool" >/dev/null || { echo "window check: $tool is missing (run: bash .ci/setup.sh test)" >&2; exit 1; }
done

work=$(mktemp -d)
out=${1:-$work/window.png}
app="" xpid=""
cleanup() {
  [ -n "$app" ] && kill "$app" 2>/dev/null || true
  [ -n "$xpid" ] && kill "$xpid" 2>/dev/null || true
  rm -rf "$work"
}
trap cleanup EXIT

go build -o "$work/tapersweep" ./cmd/tapersweep

# A free display number; Xvfb is ready when the root window answers.
for _ in 1 2 3 4 5; do
  disp=:$((200 + RANDOM % 700))
  [ -e "/tmp/.X11-unix/X${disp#:}" ] && continue
  Xvfb "$disp" -screen 0 1440x900x24 -nolisten tcp >"$work/xvfb.log" 2>&1 &
  xpid=$!
  for _ in $(seq 25); do DISPLAY=$disp xwininfo -root >/dev/null 2>&1 && break; sleep 0.2; done
  DISPLAY=$disp xwininfo -root >/dev/null 2>&1 && break
  kill "$xpid" 2>/dev/null || true
  xpid=""
done
[ -n "$xpid" ] || { echo "window check: no virtual screen could be started" >&2; exit 1; }

DISPLAY=$disp LIBGL_ALWAYS_SOFTWARE=1 LANG=${LANG:-C.UTF-8} "$work/tapersweep" >"$work/app.log" 2>&1 &
app=$!

# Wait for the window (at most 60 s).
win=""
for _ in $(seq 120); do
  if ! kill -0 "$app" 2>/dev/null; then
    echo "window check: the program exited before showing a window:" >&2
    cat "$work/app.log" >&2
    exit 1
  fi
  win=$(DISPLAY=$disp xwininfo -root -tree 2>/dev/null | awk '/"tapersweep"/ {print $1; exit}')
  [ -n "$win" ] && break
  sleep 0.5
done
[ -n "$win" ] || { echo "window check: no window within 60 s" >&2; exit 1; }

# The demo is measured and drawn in the background: capture until the picture is rich
# (at most 40 s), then once more after it has settled.
capture() {
  DISPLAY=$disp import -window "$win" "$out" 2>/dev/null || DISPLAY=$disp import -window root "$out"
}
for _ in $(seq 20); do
  capture
  colours=$(convert "$out" -format %k info: 2>/dev/null || echo 0)
  [ "${colours:-0}" -ge 1000 ] && break
  sleep 2
done
sleep 2
capture
echo "window check: captured $out ($(convert "$out" -format '%wx%h, %k colours' info:))"

TAPERSWEEP_WINDOW_PNG=$(readlink -f "$out") go test ./ui -run '^TestWindowCapture$' -count=1 -v

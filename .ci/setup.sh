#!/usr/bin/env bash
# Installs what tapersweep needs on a Debian machine.
#   bash .ci/setup.sh app    what the build needs (a C compiler and fyne's OpenGL/X11 headers)
#   bash .ci/setup.sh test   the same, plus the reference tools the tests compare against
#                            (admesh, VTK, scikit-image, pydicom, nibabel, dcmtk, Pillow, SciPy)
#                            and a virtual screen for the window check
set -euo pipefail
what=${1:-app}
pkgs=(gcc pkg-config libgl1-mesa-dev libgl1-mesa-dri xorg-dev)
if [ "$what" = test ]; then
  pkgs+=(admesh python3-vtk9 python3-skimage python3-numpy xvfb x11-utils imagemagick poppler-utils
         python3-pydicom python3-nibabel dcmtk python3-pil python3-scipy)
fi
missing=()
for p in "${pkgs[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  sudo=""
  [ "$(id -u)" -ne 0 ] && sudo=sudo
  echo "installing: ${missing[*]}" >&2
  export DEBIAN_FRONTEND=noninteractive
  $sudo apt-get update -qq
  $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
if ! command -v go >/dev/null; then
  [ -x /usr/local/go/bin/go ] || { echo "Go 1.26 or newer is needed: install it to /usr/local/go and add /usr/local/go/bin to PATH" >&2; exit 1; }
fi

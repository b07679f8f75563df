#!/usr/bin/env bash
# Installs what flitlog needs on a fresh Debian 12 machine, and nothing when
# it is already there. Called by `make demo`, `make test` and `make bench`.
#   deps.sh          OpenCV headers and libraries (libopencv-dev, pkg-config)
#   deps.sh samples  also OpenCV's sample clips and images (opencv-doc), for tests
set -euo pipefail

want=()
if ! pkg-config --modversion opencv4 >/dev/null 2>&1; then
  want+=(libopencv-dev pkg-config)
fi
if [ "${1:-}" = samples ] && [ ! -e /usr/share/doc/opencv-doc/examples/data/vtest.avi ]; then
  want+=(opencv-doc)
fi
[ ${#want[@]} -eq 0 ] && exit 0

sudo=""
if [ "$(id -u)" -ne 0 ]; then
  if command -v sudo >/dev/null 2>&1; then
    sudo="sudo"
  else
    echo "flitlog: need Debian packages ${want[*]}: run as root or install sudo" >&2
    exit 1
  fi
fi
echo "flitlog: installing Debian packages: ${want[*]}" >&2
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -qq
# opencv-doc's docs are large; its sample data is what the tests need.
$sudo apt-get install -y -qq --no-install-recommends "${want[@]}" >/dev/null
pkg-config --modversion opencv4 >/dev/null

#!/usr/bin/env bash
# Installs what building and testing broadline needs on Debian: the C toolchain
# and the X11/OpenGL headers for fyne's cgo build. Quick when already done.
# Extra Debian package names may be passed as arguments (e.g. xvfb for screenshots).
set -euo pipefail

pkgs=(gcc libc6-dev pkg-config libgl1-mesa-dev libx11-dev libxcursor-dev libxrandr-dev
      libxinerama-dev libxi-dev libxxf86vm-dev "$@")

if ! command -v go >/dev/null 2>&1; then
  echo "broadline: Go is not on PATH; install Go 1.26 or later (https://go.dev/dl/) and retry." >&2
  exit 1
fi
gov=$(go env GOVERSION | sed 's/^go//')
if [ "$(printf '%s\n1.26\n' "$gov" | sort -V | head -n1)" != "1.26" ]; then
  echo "broadline: Go $gov is too old; Go 1.26 or later is needed." >&2
  exit 1
fi

missing=()
for p in "${pkgs[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q 'install ok installed'; then
    missing+=("$p")
  fi
done
[ ${#missing[@]} -eq 0 ] && exit 0

line="apt-get install -y --no-install-recommends ${missing[*]}"
if [ "$(id -u)" -ne 0 ]; then
  echo "broadline: these Debian packages are missing: ${missing[*]}" >&2
  echo "Install them as root, then run make again:" >&2
  echo "  sudo apt-get update && sudo $line" >&2
  exit 1
fi
echo "installing: ${missing[*]}"
apt-get update -qq
DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends \
  -o DPkg::Lock::Timeout=600 "${missing[@]}" >/dev/null

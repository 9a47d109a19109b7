#!/usr/bin/env bash
# Installs the Debian packages linkrise needs to build and test, only when some are missing. clang and its
# runtimes (libclang-rt-14-dev: AddressSanitizer, UndefinedBehaviorSanitizer, libFuzzer) build the checking build;
# Open MPI (libopenmpi-dev, and openmpi-bin for mpirun) the MPI build that `make build` configures.
set -euo pipefail
packages=(build-essential cmake libeigen3-dev libsundials-dev libyaml-cpp-dev libgtest-dev libcli11-dev
  nlohmann-json3-dev libfmt-dev libbenchmark-dev libgsl-dev chromium fonts-liberation libpng-dev
  clang libclang-rt-14-dev libopenmpi-dev openmpi-bin valgrind ${LINKRISE_EXTRA_PACKAGES:-})
missing=()
for package in "${packages[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$package")
  fi
done
if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi
command_line="apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends ${missing[*]}"
if [ "$(id -u)" -eq 0 ]; then
  runner=()
elif command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then
  runner=(sudo)
else
  echo "linkrise: missing Debian packages: ${missing[*]}" >&2
  echo "Install them as root with:" >&2
  echo "  $command_line" >&2
  exit 1
fi
echo "linkrise: installing ${missing[*]}"
"${runner[@]}" apt-get update -qq
DEBIAN_FRONTEND=noninteractive "${runner[@]}" env DEBIAN_FRONTEND=noninteractive \
  apt-get install -y -qq --no-install-recommends "${missing[@]}"

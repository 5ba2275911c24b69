#!/usr/bin/env bash
# Builds and tests the Cortex-M4F firmware: the host parts it needs (the
# exported demo header and the golden vectors, target `firmware_generated`),
# then the cross preset `cortex-m4f`, then its ctest (QEMU tests included).
#
# Missing toolchain: prints a skip message and exits 0, except in CI
# (CI=true), where it is a failure (exit 1).
#
# Environment:
#   SPOOLSTEP_HOST_BUILD_DIR  host build tree (default: build/host-debug when
#                             it is already configured, as scripts/test-all.sh
#                             leaves it, else build/host)
#   SPOOLSTEP_JOBS            parallel jobs (default: 2)
#   SPOOLSTEP_BUILD_LOCK      lock file every build/test command runs under
#                             (default: /tmp/spoolstep-build.lock; the script
#                             takes it itself, so do not wrap the script in flock)
set -euo pipefail

repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
default_host_dir="${repo}/build/host"
[[ -f "${repo}/build/host-debug/CMakeCache.txt" ]] && default_host_dir="${repo}/build/host-debug"
host_dir="${SPOOLSTEP_HOST_BUILD_DIR:-${default_host_dir}}"
jobs="${SPOOLSTEP_JOBS:-2}"
lock="${SPOOLSTEP_BUILD_LOCK:-/tmp/spoolstep-build.lock}"

locked() {
  if command -v flock >/dev/null 2>&1; then
    flock "${lock}" "$@"
  else
    "$@"
  fi
}

missing=()
for tool in arm-none-eabi-gcc arm-none-eabi-g++ arm-none-eabi-nm arm-none-eabi-size qemu-system-arm cmake ninja; do
  command -v "${tool}" >/dev/null 2>&1 || missing+=("${tool}")
done
if command -v arm-none-eabi-g++ >/dev/null 2>&1; then
  # newlib-nano and its C++ library for the M4F multilib (ecosystem.md 5.2).
  for file in nano.specs rdimon.specs nosys.specs libc_nano.a libstdc++_nano.a; do
    found="$(arm-none-eabi-g++ -mcpu=cortex-m4 -mthumb -mfloat-abi=hard -mfpu=fpv4-sp-d16 -print-file-name="${file}")"
    [[ "${found}" == /* && -e "${found}" ]] || missing+=("${file}")
  done
fi
if ((${#missing[@]} > 0)); then
  echo "firmware tests: toolchain incomplete, missing: ${missing[*]}" >&2
  echo "  Debian 12: apt-get install gcc-arm-none-eabi libnewlib-arm-none-eabi libstdc++-arm-none-eabi-newlib qemu-system-arm" >&2
  if [[ "${CI:-}" == "true" ]]; then
    echo "firmware tests: FAILED (a missing toolchain is an error in CI)" >&2
    exit 1
  fi
  echo "firmware tests: SKIPPED (not in CI)" >&2
  exit 0
fi

echo "== host: exported demo header and golden vectors (${host_dir})"
if [[ ! -f "${host_dir}/CMakeCache.txt" ]]; then
  locked cmake -S "${repo}" -B "${host_dir}" -G Ninja -DCMAKE_BUILD_TYPE=Debug -DSPOOLSTEP_BUILD_BENCH=OFF
fi
if ! locked cmake --build "${host_dir}" -j "${jobs}" --target firmware_generated; then
  echo "firmware tests: the host target firmware_generated failed or does not exist;" >&2
  echo "  tests/CMakeLists.txt must list the 'firmware' folder (and SPOOLSTEP_BUILD_TESTS=ON)." >&2
  exit 1
fi
generated="${host_dir}/generated/firmware"

echo "== target: cortex-m4f preset"
cd "${repo}"
locked cmake --preset cortex-m4f -DSPOOLSTEP_HOST_GENERATED_DIR="${generated}"
locked cmake --build --preset cortex-m4f -j "${jobs}"
locked ctest --preset cortex-m4f -j "${jobs}"

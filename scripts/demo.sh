#!/usr/bin/env bash
# Sets up, builds and runs the main job on the bundled demo machine: checks
# the invented press cell's machine file, then runs its full automatic cycle.
set -euo pipefail
cd "$(dirname "$0")/.."
jobs=${SPOOLSTEP_JOBS:-2}

bash scripts/install-deps.sh
cmake --preset release >/dev/null
cmake --build --preset release -j "$jobs" --target spoolstep
bin=build/release/tools/cli/spoolstep

echo
echo "=== machine file check ==="
"$bin" check config/press_cell.json

echo
echo "=== the control core alone, against the scripted demo timeline ==="
"$bin" replay config/press_cell.json config/scenarios/press_cell_replay.json

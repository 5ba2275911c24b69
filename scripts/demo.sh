#!/usr/bin/env bash
# Sets up, builds and runs the main job on the bundled demo machine: checks
# the invented press cell's machine file, then runs its automatic cycle on
# the bench (control core + hydraulic plant model in closed loop).
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
echo "=== bench run: the control core and the plant model in closed loop ==="
"$bin" sim config/press_cell.json config/scenarios/press_cell_cycle.json --out out/press_cell_cycle
echo
echo "Open out/press_cell_cycle/report.html in a browser for the plots; trace.csv, io.vcd"
echo "(any waveform viewer) and summary.json are beside it."

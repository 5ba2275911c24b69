#!/usr/bin/env bash
# Rewrites the demo's pinned bench results (tests/cli/golden/) from a run of
# the present build. Run it only when a change is meant to move the demo's
# trace, and say why in the commit.
set -euo pipefail
cd "$(dirname "$0")/.."
bin=${1:-build/host-debug/tools/cli/spoolstep}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
"$bin" sim config/press_cell.json config/scenarios/press_cell_cycle.json --out "$work/run" -q >/dev/null
sha256sum "$work/run/trace.csv" | cut -d' ' -f1 >tests/cli/golden/press_cell_cycle.trace.csv.sha256
cp "$work/run/io.vcd" tests/cli/golden/press_cell_cycle.io.vcd
echo "pinned: $(cat tests/cli/golden/press_cell_cycle.trace.csv.sha256)"

#!/usr/bin/env bash
# Regenerates the checked-in parameter references from the loaders' tables:
#   config/machine-file-reference.md  (control part, machine_file/src/parameters.cpp)
#   docs/plant-model.md, between the parameter-table markers (hostsim/src/plant_params.cpp)
# Usage: scripts/regen-references.sh [BUILD_DIR]   (default build/host-debug)
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build/host-debug}
cli="$build/tools/cli/spoolstep"
[ -x "$cli" ] || { echo "regen-references: $cli not built; build first (cmake --build --preset host-debug)" >&2; exit 2; }
tmp=$(mktemp)
trap 'rm -f "$tmp"' EXIT
"$cli" check --reference > "$tmp"
mv "$tmp" config/machine-file-reference.md
"$cli" check --plant-reference > "$tmp"
/usr/bin/python3 - "$tmp" docs/plant-model.md <<'PY'
import sys
table = open(sys.argv[1]).read()
path = sys.argv[2]
text = open(path).read()
begin, end = "<!-- parameter-table:begin -->\n", "<!-- parameter-table:end -->"
b, e = text.index(begin) + len(begin), text.index(end)
new = text[:b] + table + text[e:]
with open(path + ".tmp", "w") as f:
    f.write(new)
import os
os.replace(path + ".tmp", path)
PY
echo "regen-references: config/machine-file-reference.md and docs/plant-model.md regenerated"

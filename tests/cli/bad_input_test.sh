#!/usr/bin/env bash
# Bad input through the one JSON reader, as a user meets it on every command:
# exit code 2, the file, an RFC 6901 pointer and a reason; nothing echoed
# whole or raw; nothing written. Limits are the documented ones
# (machine-file-reference.md and scenario-format.md, "Limits").
set -u
bin=$1
src=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }
expect_code() { # expected actual what
  [ "$1" = "$2" ] || fail "$3: exit code $2, expected $1"
}
py=/usr/bin/python3
machine=$src/config/press_cell.json
scenario=$src/config/scenarios/press_cell_cycle.json

# A number too large for a double names its pointer.
$py - "$machine" "$work/overflow.json" <<'PY'
import sys
text = open(sys.argv[1]).read().replace('"watchdog_ms": 20', '"watchdog_ms": 1e400', 1)
assert '1e400' in text
open(sys.argv[2], 'w').write(text)
PY
for cmd in check export; do
  "$bin" $cmd "$work/overflow.json" >"$work/out.txt" 2>"$work/err.txt"
  expect_code 2 $? "$cmd with 1e400"
  grep -q "overflow.json: /timing/watchdog_ms: number overflow parsing '1e400'" "$work/err.txt" || fail "$cmd 1e400 message: $(head -c 400 "$work/err.txt")"
  [ -s "$work/out.txt" ] && fail "$cmd wrote output for a file it refused"
done

# A root that is not an object.
echo '[1, 2, 3]' >"$work/array.json"
"$bin" check "$work/array.json" >/dev/null 2>"$work/err.txt"
expect_code 2 $? "check on an array"
grep -q "array.json: the document is a JSON array, not an object" "$work/err.txt" || fail "array root message: $(cat "$work/err.txt")"

# Too large: refused from its size, before parsing (the text is not even JSON).
head -c 1100000 /dev/zero | tr '\0' '{' >"$work/huge.json"
"$bin" check "$work/huge.json" >/dev/null 2>"$work/err.txt"
expect_code 2 $? "check on an over-large file"
grep -q "huge.json: the machine file is 1100000 bytes, more than the limit of 1048576 bytes" "$work/err.txt" || fail "size limit message: $(head -c 300 "$work/err.txt")"

# Too many inputs: refused at the first one past the array limit.
$py - "$machine" "$work/many.json" <<'PY'
import json, sys
m = json.load(open(sys.argv[1]))
m['inputs']['digital'] += [{"name": "extra_%d" % i} for i in range(5000)]
json.dump(m, open(sys.argv[2], 'w'))
PY
"$bin" check "$work/many.json" >/dev/null 2>"$work/err.txt"
expect_code 2 $? "check with 5000 extra inputs"
grep -q "many.json: /inputs/digital/1024: more than 1024 items in one array" "$work/err.txt" || fail "array limit message: $(head -c 300 "$work/err.txt")"

# A 1 MB name is cut, and control characters are escaped, before they reach a terminal.
$py - "$machine" "$work/names.json" <<'PY'
import json, sys
m = json.load(open(sys.argv[1]))
m['inputs']['digital'][0]['name'] = 'n' * 900000
m['inputs']['digital'][1]['name'] = 'guard\u001b[2Jclosed'
json.dump(m, open(sys.argv[2], 'w'))
PY
"$bin" check "$work/names.json" >/dev/null 2>"$work/err.txt"
expect_code 2 $? "check with a long and an escaped name"
[ "$(wc -c <"$work/err.txt")" -lt 20000 ] || fail "a long name is echoed whole ($(wc -c <"$work/err.txt") bytes)"
grep -q "(900000 bytes)" "$work/err.txt" || fail "the cut name does not say how long it was"
grep -q $'\x1b' "$work/err.txt" && fail "an escape character reached the terminal"
grep -q 'guard\\x1B\[2Jclosed' "$work/err.txt" || fail "the control character is not shown escaped: $(grep guard "$work/err.txt" | head -c 300)"

# sim on a machine file without a plant section: a pointer and a reason.
$py - "$machine" "$work/noplant.json" <<'PY'
import json, sys
m = json.load(open(sys.argv[1]))
del m['plant']
json.dump(m, open(sys.argv[2], 'w'))
PY
"$bin" sim "$work/noplant.json" "$scenario" --out "$work/run" -q >/dev/null 2>"$work/err.txt"
expect_code 2 $? "sim without a plant section"
grep -q "noplant.json: /plant: missing the plant section a bench run needs" "$work/err.txt" || fail "no-plant message: $(cat "$work/err.txt")"
[ -e "$work/run" ] && fail "sim created --out for a refused run"

# export checks the plant section as check does.
$py - "$machine" "$work/badplant.json" <<'PY'
import json, sys
m = json.load(open(sys.argv[1]))
m['plant']['pump']['speed_rpm'] = -5
json.dump(m, open(sys.argv[2], 'w'))
PY
"$bin" check "$work/badplant.json" >/dev/null 2>"$work/check_err.txt"
expect_code 2 $? "check with a bad plant section"
"$bin" export "$work/badplant.json" -o "$work/config.hpp" >/dev/null 2>"$work/err.txt"
expect_code 2 $? "export with a bad plant section"
grep -q "/plant/pump/speed_rpm" "$work/err.txt" || fail "export does not name the plant field: $(cat "$work/err.txt")"
[ -e "$work/config.hpp" ] && fail "export wrote a header for a file check rejects"

# replay refuses the same broken plant section (one file, one answer).
"$bin" replay "$work/badplant.json" "$src/config/scenarios/press_cell_replay.json" >/dev/null 2>"$work/err.txt"
expect_code 2 $? "replay with a bad plant section"
grep -q "/plant/pump/speed_rpm" "$work/err.txt" || fail "replay does not name the plant field: $(cat "$work/err.txt")"

# A whole number may be written 20.0 (JSON has one number type).
$py - "$machine" "$work/float_int.json" <<'PY'
import sys
text = open(sys.argv[1]).read().replace('"watchdog_ms": 20', '"watchdog_ms": 20.0', 1)
assert '20.0' in text
open(sys.argv[2], 'w').write(text)
PY
"$bin" check "$work/float_int.json" >/dev/null 2>"$work/err.txt"
expect_code 0 $? "check with watchdog_ms 20.0: $(cat "$work/err.txt")"

# Text from a scenario that the run prints (an expectation's name) is cut
# and escaped too: no escape sequence or forged line reaches the terminal.
$py - "$src/config/scenarios/press_cell_replay.json" "$work/evil_names.json" <<'PY'
import json, sys
s = json.load(open(sys.argv[1]))
s['expect'][0]['name'] = '\u001b[31mRED\u001b[0m\nFAKE pass line' + 'x' * 1000000
json.dump(s, open(sys.argv[2], 'w'))
PY
"$bin" replay "$machine" "$work/evil_names.json" >"$work/out.txt" 2>&1
grep -q $'\x1b' "$work/out.txt" && fail "an escape character from a scenario name reached the terminal"
grep -q '^FAKE pass line' "$work/out.txt" && fail "a newline in a scenario name forged an output line"
[ "$(wc -c <"$work/out.txt")" -lt 20000 ] || fail "a 1 MB expectation name is printed whole"

# A scenario past its size limit, and a duplicate key in one.
head -c 4300000 /dev/zero | tr '\0' ' ' >"$work/big_scenario.json"
"$bin" sim "$machine" "$work/big_scenario.json" --out "$work/run" -q >/dev/null 2>"$work/err.txt"
expect_code 2 $? "sim with an over-large scenario"
grep -q "big_scenario.json: the scenario is 4300000 bytes, more than the limit of 4194304 bytes" "$work/err.txt" || fail "scenario size message: $(head -c 300 "$work/err.txt")"
printf '{"format": "x", "format": "y"}' >"$work/dup_scenario.json"
"$bin" sim "$machine" "$work/dup_scenario.json" --out "$work/run" -q >/dev/null 2>"$work/err.txt"
expect_code 2 $? "sim with a duplicate key in the scenario"
grep -q "dup_scenario.json: /format: duplicate key 'format' in one object" "$work/err.txt" || fail "scenario duplicate message: $(cat "$work/err.txt")"
[ -e "$work/run" ] && fail "sim created --out for a refused run"

# The documented limits are the ones enforced (the messages above print the
# enforced values; the scenario reference is written by hand).
grep -q "at most 4 194 304 bytes" "$src/docs/scenario-format.md" || fail "scenario-format.md does not state the size limit the reader enforces"
grep -q "file size: at most 1048576 bytes" "$src/config/machine-file-reference.md" || fail "machine-file-reference.md does not state the size limit"

if [ "$failures" -ne 0 ]; then
  echo "$failures failure(s)"
  exit 1
fi
echo "all bad-input checks passed"

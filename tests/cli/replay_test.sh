#!/usr/bin/env bash
# spoolstep check / replay as a user runs them: exit codes, messages naming
# the file and JSON path, deterministic traces, nothing written on bad input.
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

machine=$src/config/press_cell.json
timeline=$src/config/scenarios/press_cell_replay.json

"$bin" --help >"$work/help.txt" 2>&1
expect_code 0 $? "--help"
grep -q "replay" "$work/help.txt" || fail "--help does not list replay"
grep -q "check" "$work/help.txt" || fail "--help does not list check"
"$bin" replay --help >/dev/null 2>&1
expect_code 0 $? "replay --help"

"$bin" check "$machine" >/dev/null 2>&1
expect_code 0 $? "check demo machine"

"$bin" replay "$machine" "$timeline" --trace "$work/a.csv" >"$work/out.txt" 2>&1
expect_code 0 $? "replay demo timeline"
grep -q "FAIL" "$work/out.txt" && fail "demo replay reports a failed expectation"
grep -q "auto_held" "$work/out.txt" || fail "replay output does not show the held cycle"
"$bin" replay "$machine" "$timeline" --trace "$work/b.csv" -q >/dev/null 2>&1
cmp -s "$work/a.csv" "$work/b.csv" || fail "two runs of the same timeline gave different traces"
head -1 "$work/a.csv" | grep -q "^t_s,state,step" || fail "trace header"
[ "$(wc -l <"$work/a.csv")" -eq 14002 ] || fail "trace should have a header and 14001 scans"

# A bad reference in a scenario: exit 2, message names file and JSON path, no trace written.
sed 's/"step": "dwell"/"step": "dwel"/' "$timeline" >"$work/bad_step.json"
"$bin" replay "$machine" "$work/bad_step.json" --trace "$work/bad.csv" >"$work/bad_out.txt" 2>"$work/bad_err.txt"
expect_code 2 $? "scenario with an unknown step"
grep -q "bad_step.json: /expect/0/step: no step named 'dwel'" "$work/bad_err.txt" || fail "unknown step message: $(cat "$work/bad_err.txt")"
[ -e "$work/bad.csv" ] && fail "a trace was written for a bad scenario"
[ -e "$work/bad.csv.partial" ] && fail "a partial trace was left behind"

# An input the machine does not have.
sed 's/"guard_door_closed": false/"guard_door_open": false/' "$timeline" >"$work/bad_input.json"
"$bin" replay "$machine" "$work/bad_input.json" >/dev/null 2>"$work/err2.txt"
expect_code 2 $? "scenario with an unknown input"
grep -q "/timeline/21/set/guard_door_open: no digital input named 'guard_door_open'" "$work/err2.txt" || fail "unknown input message: $(cat "$work/err2.txt")"

# JSON syntax error: line and column.
printf '{\n  "format": "spoolstep-scenario/1",\n  "duration_s": 1\n  "timeline": []\n}\n' >"$work/syntax.json"
"$bin" replay "$machine" "$work/syntax.json" >/dev/null 2>"$work/err3.txt"
expect_code 2 $? "scenario with a syntax error"
grep -q "line 4" "$work/err3.txt" || fail "syntax error should name line 4: $(cat "$work/err3.txt")"

# A failing expectation: exit 1.
sed 's/"before_s": 5.0/"before_s": 4.0/' "$timeline" >"$work/late.json"
"$bin" replay "$machine" "$work/late.json" -q >"$work/late_out.txt" 2>&1
expect_code 1 $? "replay with a failing expectation"
grep -q "FAIL  the ram reaches the dwell step in time" "$work/late_out.txt" || fail "failed expectation not reported"

# A bad machine file: exit 2 with its path.
sed 's/"quick_stop_ms": 80/"quick_stop_ms": -80/' "$machine" >"$work/bad_machine.json"
"$bin" check "$work/bad_machine.json" >/dev/null 2>"$work/err4.txt"
expect_code 2 $? "check a bad machine file"
grep -q "/functions/1/quick_stop_ms" "$work/err4.txt" || fail "bad machine message: $(cat "$work/err4.txt")"

# A supervision fault names the step and the condition that never came true.
sed -e 's/"press_pressure": 185/"press_pressure": 150/' -e 's/"ms": 4000/"ms": 9000/' "$timeline" >"$work/weak.json"
"$bin" replay "$machine" "$work/weak.json" -q >"$work/weak_out.txt" 2>&1
expect_code 1 $? "a cycle whose force never builds"
grep -q "step 'press_force' took longer than its supervision time: 'press_pressure > 180' did not come true" "$work/weak_out.txt" || fail "supervision fault text: $(grep fault "$work/weak_out.txt")"

# An output that is one of the inputs is refused; the input is untouched.
cp "$machine" "$work/m.json"
"$bin" replay "$work/m.json" "$timeline" --trace "$work/m.json" -q >/dev/null 2>"$work/err5.txt"
expect_code 2 $? "--trace onto the machine file"
cmp -s "$machine" "$work/m.json" || fail "the machine file was overwritten by --trace"
"$bin" export "$work/m.json" -o "$work/m.json" >/dev/null 2>&1
expect_code 2 $? "export onto the machine file"
cmp -s "$machine" "$work/m.json" || fail "the machine file was overwritten by export"

# Duplicate keys in a scenario are errors, not "the last one wins".
sed 's/"duration_s": 14.0,/"duration_s": 14.0, "duration_s": 2.0,/' "$timeline" >"$work/dup.json"
"$bin" replay "$machine" "$work/dup.json" -q >/dev/null 2>"$work/err6.txt"
expect_code 2 $? "scenario with a duplicate key"
grep -q "/duration_s: duplicate key 'duration_s'" "$work/err6.txt" || fail "duplicate key message: $(cat "$work/err6.txt")"

# check covers the plant section too.
sed 's/"oil": {/"oil_": {/' "$machine" >"$work/bad_plant.json"
"$bin" check "$work/bad_plant.json" >/dev/null 2>"$work/err7.txt"
expect_code 2 $? "check a machine file with a bad plant section"
grep -q "/plant/oil_" "$work/err7.txt" || fail "plant error message: $(cat "$work/err7.txt")"

if [ "$failures" -eq 0 ]; then echo "cli tests: all passed"; exit 0; fi
echo "cli tests: $failures failed"
exit 1

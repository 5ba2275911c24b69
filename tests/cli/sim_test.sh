#!/usr/bin/env bash
# spoolstep sim as a user runs it: the demo cycle passes, its four result
# files are complete and deterministic, bad input leaves nothing behind.
set -u
bin=$1
src=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }

machine=$src/config/press_cell.json
scenario=$src/config/scenarios/press_cell_cycle.json

"$bin" sim "$machine" "$scenario" --out "$work/run1" >"$work/out1.txt" 2>"$work/err1.txt"
code=$?
[ $code -eq 0 ] || fail "demo cycle exit code $code: $(cat "$work/out1.txt")"
for f in trace.csv summary.json io.vcd report.html; do
  [ -s "$work/run1/$f" ] || fail "missing or empty $f"
done
grep -q "spoolstep sim: 100%" "$work/err1.txt" || fail "no progress lines on stderr"
grep -q "results in" "$work/out1.txt" || fail "does not say where the results are"
grep -q "not a safety-rated control system" "$work/out1.txt" || fail "no safety caution in the output"

"$bin" sim "$machine" "$scenario" --out "$work/run2" -q >/dev/null 2>&1
cmp -s "$work/run1/trace.csv" "$work/run2/trace.csv" || fail "two runs gave different traces"
cmp -s "$work/run1/io.vcd" "$work/run2/io.vcd" || fail "two runs gave different VCD files"

# The demo's results are pinned: trace.csv by its SHA-256 and io.vcd whole,
# both written by the bench loop before the host runtime re-cut. A change
# that moves them must say why; scripts/regen-demo-golden.sh rewrites them.
want=$(cat "$src/tests/cli/golden/press_cell_cycle.trace.csv.sha256")
got=$(sha256sum "$work/run1/trace.csv" | cut -d' ' -f1)
[ "$want" = "$got" ] || fail "demo trace.csv differs from the pinned one ($got, pinned $want)"
cmp -s "$src/tests/cli/golden/press_cell_cycle.io.vcd" "$work/run1/io.vcd" || fail "demo io.vcd differs from the pinned one"

# A plant that fails mid-run (a load of 1e308 N makes its state non-finite):
# exit 3, the time and the cause named, nothing written, earlier results kept.
sed 's|"plant_fault": {"kind": "sensor_wire_break", "target": "press_position"}|"plant_fault": {"kind": "load_change", "target": "press_cyl", "value": 1e308}|' \
  "$scenario" >"$work/absurd_load.json"
grep -q '1e308' "$work/absurd_load.json" || fail "test setup: the load change was not substituted"
"$bin" sim "$machine" "$work/absurd_load.json" --out "$work/run1" -q >"$work/absurd_out.txt" 2>"$work/absurd_err.txt"
code=$?
[ $code -eq 3 ] || fail "failing plant: exit code $code (want 3)"
grep -q "the run ended early at 14.80" "$work/absurd_err.txt" || fail "failing plant message: $(cat "$work/absurd_err.txt")"
grep -q "safe state" "$work/absurd_err.txt" || fail "failing plant: does not say the outputs went safe"
grep -q "pass" "$work/absurd_out.txt" && fail "failing plant: a pass line was printed: $(cat "$work/absurd_out.txt")"
cmp -s "$work/run1/trace.csv" "$work/run2/trace.csv" || fail "failing plant: the earlier results were touched"
[ -e "$work/run1.partial" ] && fail "failing plant: staging directory left behind"

# Value Change Dump (IEEE 1364 clause 18): header keywords and a first time stamp.
grep -q '^\$timescale 1 us \$end' "$work/run1/io.vcd" || fail "VCD timescale"
grep -q '^\$enddefinitions \$end' "$work/run1/io.vcd" || fail "VCD end of definitions"
grep -q '^#0$' "$work/run1/io.vcd" || fail "VCD first time stamp"
grep -q 'di_guard_door_closed' "$work/run1/io.vcd" || fail "VCD lacks the guard input"

grep -q '"passed": true' "$work/run1/summary.json" || fail "summary does not say passed"
grep -q '"cycle_times_s"' "$work/run1/summary.json" || fail "summary lacks the cycle time"
# The state and step columns are numbers; the run says what each one means,
# in the machine file's own step names.
grep -q '^\$comment step values: 0=wait_start 1=clamp 2=fast_approach' "$work/run1/io.vcd" || fail "io.vcd does not name the step values"
grep -q '^\$comment state values: 0=power_up 1=manual' "$work/run1/io.vcd" || fail "io.vcd does not name the state values"
/usr/bin/python3 -c "import json,sys; v=json.load(open(sys.argv[1]))['value_names']; assert v['step'][1]=='clamp' and v['state'][7]=='faulted', v" "$work/run1/summary.json" || fail "summary.json lacks value_names"
grep -q '<svg' "$work/run1/report.html" || fail "report has no plots"
grep -q 'not a safety-rated control system' "$work/run1/report.html" || fail "report lacks the caution"

# Running again into the same directory replaces it whole.
"$bin" sim "$machine" "$scenario" --out "$work/run1" -q >/dev/null 2>&1 || fail "rerun into the same directory"
[ -e "$work/run1.partial" ] && fail "staging directory left behind"

# Bad input: exit 2, message with file and JSON path, no output directory.
sed 's/"sensor_wire_break"/"sensor_wirebreak"/' "$scenario" >"$work/bad_fault.json"
"$bin" sim "$machine" "$work/bad_fault.json" --out "$work/bad" >/dev/null 2>"$work/bad_err.txt"
code=$?
[ $code -eq 2 ] || fail "unknown fault kind: exit code $code"
grep -q "bad_fault.json: /timeline/.*/plant_fault/kind: unknown plant fault kind 'sensor_wirebreak'" "$work/bad_err.txt" || fail "fault message: $(cat "$work/bad_err.txt")"

# A misspelt fault target is bad input at load time, not a run that stops halfway.
sed 's/"target": "press_position"/"target": "press_postion"/' "$scenario" >"$work/bad_target.json"
"$bin" sim "$machine" "$work/bad_target.json" --out "$work/run1" >/dev/null 2>"$work/target_err.txt"
code=$?
[ $code -eq 2 ] || fail "unknown fault target: exit code $code"
grep -q "/plant_fault/target: no input named 'press_postion'" "$work/target_err.txt" || fail "target message: $(cat "$work/target_err.txt")"
[ -f "$work/run1/trace.csv" ] || fail "a failed load must leave the previous results alone"
[ -e "$work/bad" ] && fail "output directory created for bad input"
[ -e "$work/bad.partial" ] && fail "staging directory created for bad input"

# A sensor fault needs an input a plant sensor drives (oil_temperature has
# none in the demo), and a fault's value is required where the kind takes
# one: both bad input at load time.
sed 's/"target": "press_position"/"target": "oil_temperature"/' "$scenario" >"$work/no_sensor.json"
"$bin" sim "$machine" "$work/no_sensor.json" --out "$work/no_sensor" >/dev/null 2>"$work/no_sensor_err.txt"
[ $? -eq 2 ] || fail "a sensor fault on an input without a sensor should be refused"
grep -q "no input named 'oil_temperature' that a plant sensor drives" "$work/no_sensor_err.txt" || fail "no-sensor message: $(cat "$work/no_sensor_err.txt")"
[ -e "$work/no_sensor" ] && fail "output directory created for a fault without a sensor"
sed 's/{"kind": "sensor_wire_break", "target": "press_position"}/{"kind": "pump_failure"}/' "$scenario" >"$work/no_value.json"
"$bin" sim "$machine" "$work/no_value.json" --out "$work/no_value" >/dev/null 2>"$work/no_value_err.txt"
[ $? -eq 2 ] || fail "a pump failure without a value should be refused"
grep -q '/plant_fault/value: a pump_failure fault needs "value"' "$work/no_value_err.txt" || fail "no-value message: $(cat "$work/no_value_err.txt")"

# An expectation nothing could pass is bad input, not a failed run.
sed 's/"max": 215}/"min": 300, "max": 215}/' "$scenario" >"$work/min_max.json"
"$bin" sim "$machine" "$work/min_max.json" --out "$work/min_max" >/dev/null 2>"$work/min_max_err.txt"
[ $? -eq 2 ] || fail "min above max should be refused"
grep -q "/expect/2/min: min 300 is above max 215" "$work/min_max_err.txt" || fail "min/max message: $(cat "$work/min_max_err.txt")"

# Results that cannot be written: exit 3 (here /proc takes no new folders, even for root).
"$bin" sim "$machine" "$scenario" --out /proc/spoolstep-sim-test/run -q >/dev/null 2>"$work/unwritable_err.txt"
code=$?
[ $code -eq 3 ] || fail "an unwritable --out: exit code $code, expected 3 ($(cat "$work/unwritable_err.txt"))"

# A plant-driven input may not be scripted.
sed 's/"oil_level_ok": true}/"oil_level_ok": true, "press_top_ls": true}/' "$scenario" >"$work/driven.json"
"$bin" sim "$machine" "$work/driven.json" --out "$work/driven" >/dev/null 2>"$work/driven_err.txt"
[ $? -eq 2 ] || fail "scripting a plant-driven input should be refused"
grep -q "press_top_ls' is driven by the plant model" "$work/driven_err.txt" || fail "driven input message: $(cat "$work/driven_err.txt")"

# An --out that holds someone else's files is refused.
mkdir -p "$work/precious" && echo keep >"$work/precious/notes.txt"
"$bin" sim "$machine" "$scenario" --out "$work/precious" -q >/dev/null 2>"$work/precious_err.txt"
[ $? -eq 2 ] || fail "a foreign output directory should be refused"
[ -f "$work/precious/notes.txt" ] || fail "a foreign file was deleted"

# A failing expectation: exit 1, and the results are still written.
sed 's/"before_s": 8.0/"before_s": 5.0/' "$scenario" >"$work/late.json"
"$bin" sim "$machine" "$work/late.json" --out "$work/late" -q >"$work/late_out.txt" 2>&1
[ $? -eq 1 ] || fail "a failed expectation should exit 1"
grep -q '"passed": false' "$work/late/summary.json" || fail "summary should say failed"

# The current directory (or above it) is never an --out.
mkdir -p "$work/here"
(cd "$work/here" && "$bin" sim "$machine" "$scenario" --out . -q >/dev/null 2>"$work/here_err.txt")
[ $? -eq 2 ] || fail "--out . should be refused: $(cat "$work/here_err.txt")"
[ -d "$work/here" ] || fail "the current directory was removed"

if [ "$failures" -eq 0 ]; then echo "sim tests: all passed"; exit 0; fi
echo "sim tests: $failures failed"
exit 1

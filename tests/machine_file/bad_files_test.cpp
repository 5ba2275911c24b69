// Every file in tests/machine_file/bad/ is a complete machine file with one
// defect. Each row names the file, the JSON pointer where the loader must
// report it and a fragment of the message (reason or hint).
#include <algorithm>
#include <filesystem>
#include <ostream>
#include <set>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::machine_file {
namespace {

struct BadFile {
  const char* file;
  const char* json_path;
  const char* fragment;
  const char* why;  ///< the message of the row: what the check protects against
};

// clang-format off
const BadFile kBadFiles[] = {
  {"syntax_missing_comma.json", "", "parse error at line 3, column 11",
   "JSON syntax errors give line and column"},
  {"empty_file.json", "", "line 1, column 1",
   "an empty file is a syntax error, not an empty machine"},
  {"duplicate_json_key.json", "/machine/name", "duplicate key 'name'",
   "a key written twice would otherwise silently keep the last value"},
  {"unknown_field_typo.json", "/functions/1/ramps/1/extnd_accel_ms", "Did you mean 'extend_accel_ms'?",
   "a typo in a key is an error with a suggestion, not a silently ignored setting"},
  {"unknown_top_level_section.json", "/interlock", "Did you mean 'interlocks'?",
   "a typo in a section name would drop every interlock"},
  {"wrong_type_number_as_string.json", "/functions/1/ramps/0/extend_accel_ms", "must be a number (got string \"200\")",
   "a quoted number is a type error"},
  {"fractional_milliseconds.json", "/sequence/steps/1/supervision_ms", "must be a whole number (got 2000.5)",
   "integer parameters reject fractions instead of truncating them"},
  {"missing_valve_kind.json", "/functions/0/valve/kind", "missing required field 'kind'",
   "required fields have no default"},
  {"missing_emergency_stop.json", "/operator/emergency_stop", "missing required field 'emergency_stop'",
   "a machine without an emergency stop input does not load"},
  {"duplicate_function_name.json", "/functions/1/name", "duplicate function name 'lift'",
   "names are unique within their kind"},
  {"name_too_long.json", "/inputs/digital/6/name", "at most 23 fit (kMaxNameLength)",
   "names must fit the core's fixed name arrays"},
  {"unknown_input_reference.json", "/interlocks/0/condition", "unknown digital input 'guard_closd_sw'",
   "a bare string condition names a declared digital input"},
  {"unknown_coil_reference.json", "/functions/0/valve/coil_extend", "unknown coil 'lift_y3'",
   "valve outputs name declared coils"},
  {"digital_input_used_as_coil.json", "/functions/0/valve/coil_retract", "'estop_ok' is a digital input, not a coil",
   "an I/O point of the wrong kind is named as such"},
  {"unknown_function_in_action.json", "/sequence/steps/1/actions/0/function", "unknown function 'lfit'",
   "step actions name declared functions"},
  {"unknown_step_in_condition.json", "/sequence/transitions/0/condition/all/1/step", "unknown step 'busy'",
   "step conditions name declared steps"},
  {"unknown_interlock_reference.json", "/interlocks/1/condition/all/0/interlock", "unknown interlock 'gaurd'",
   "interlock references name declared interlocks"},
  {"unknown_ramp_in_action.json", "/sequence/steps/1/actions/1/ramp", "function 'tilt' has no ramp 'sft'",
   "a step action uses a ramp its function has"},
  {"transition_from_unknown_step.json", "/sequence/transitions/1/from", "unknown step 'upp'",
   "transitions connect existing steps"},
  {"initial_step_not_first.json", "/sequence/initial_step", "must be the first step",
   "the core starts at step 0, so the named initial step must be step 0"},
  {"step_without_exit.json", "/sequence/steps/1", "no transition out",
   "a step without a way out stops the sequence for good"},
  {"ramp_time_out_of_range.json", "/functions/1/ramps/0/extend_accel_ms", "must be between 0 and 60000 (got -5)",
   "values are checked against the parameter table's limits"},
  // IEC 60204-1: the emergency stop shall function as stop category 0 or 1.
  // Source: check-values.md 3.1, [SRC] gt-engineering.it IEC 60204-1 chapter 9 summary.
  {"estop_category_2.json", "/operator/emergency_stop_category", "IEC 60204-1 allows only stop category 0 or 1",
   "an emergency stop cannot be a category 2 stop"},
  // ISO 13851 type III: both hands within 0.5 s. From memory, not in check-values.md.
  {"two_hand_sync_too_long.json", "/two_hand/0/max_sync_ms", "must be between 1 and 500 (got 800)",
   "two-hand synchronous actuation window"},
  {"crack_not_below_max.json", "/functions/1/valve/current_extend_ma/crack", "crack current (800 mA) must be below max current (800 mA)",
   "the valve must open between crack and max current"},
  {"ramp_on_solenoid_valve.json", "/functions/0/ramps", "solenoid valves shift fully and cannot be ramped",
   "on/off valves cannot meter"},
  {"solenoid_speed_not_100.json", "/sequence/steps/1/actions/0/speed_percent", "speed_percent must be 100",
   "on/off valves have no partial speed"},
  {"proportional_without_ramps.json", "/functions/1", "needs at least one ramp",
   "proportional functions need a default ramp"},
  {"coil_owned_twice.json", "/power_unit/motor", "coil 'lift_y1' already has an owner: function 'lift'",
   "every output channel has exactly one owner"},
  {"channel_unit_mismatch.json", "/functions/1/valve/channel_extend", "declared in percent",
   "a two-solenoid valve drives currents in mA"},
  {"valve_missing_output.json", "/functions/1/valve/channel_retract", "missing required field 'channel_retract'",
   "a valve kind has the outputs it needs"},
  {"centre_on_4_2_valve.json", "/functions/0/valve/centre", "a 4/2 valve has no centre position",
   "only 4/3 valves have a centre"},
  {"unknown_valve_kind.json", "/functions/1/valve/kind", "Did you mean \"proportional_4_3_two_solenoid\"?",
   "choices are checked with a suggestion"},
  {"unsupported_format_version.json", "/format", "unsupported format \"spoolstep-machine/2\"",
   "other format versions are refused"},
  {"interlock_reference_cycle.json", "/interlocks/1/condition/all/0/interlock",
   "interlock reference cycle: guard -> guard_and_pressure -> guard",
   "condition nesting through interlock references has no cycles"},
  {"condition_with_two_forms.json", "/sequence/transitions/0/condition", "exactly one of its forms",
   "a condition object is one thing, not two"},
  {"analog_threshold_outside_range.json", "/interlocks/1/condition/all/1/below", "outside the range of 'lift_pressure'",
   "a threshold the input can never cross is a mistake"},
  {"guard_unknown_motion.json", "/interlocks/1/guards/0", "unknown motion 'extnd'",
   "guards name a motion as function.extend or function.retract"},
  {"function_state_without_end_input.json", "/sequence/transitions/1/condition/is", "has no extended_end input, so this condition could never be true",
   "an end-of-travel condition needs a way to sense the end"},
  {"unknown_condition_form.json", "/sequence/transitions/0/condition/analgo", "Did you mean 'analog'?",
   "a typo in a condition form gets a suggestion"},
  {"coil_retract_on_spring_return.json", "/functions/0/valve/coil_retract", "the spring gives the retract position",
   "a single-solenoid valve has no retract coil"},
  {"jerk_on_linear_ramp.json", "/functions/1/ramps/1/jerk_ms", "jerk_ms applies to s_curve ramps only",
   "a setting that would be ignored is refused"},
  {"two_hand_same_input_twice.json", "/two_hand/0/right", "left and right are the same input",
   "one button cannot be both hands"},
  {"supervision_shorter_than_min_time.json", "/sequence/steps/1/supervision_ms", "must be longer than min_time_ms",
   "a step that must fault before it may leave"},
  {"watchdog_shorter_than_two_scans.json", "/timing/watchdog_ms", "at least two scan periods",
   "a watchdog that trips on every normal scan"},
  {"moving_step_without_supervision.json", "/sequence/steps/1/supervision_ms", "missing required field 'supervision_ms'",
   "a step that moves must time out rather than hang with valves open"},
};
// clang-format on

// Readable test parameter names in failure output.
void PrintTo(const BadFile& row, std::ostream* out) { *out << row.file; }

std::string bad_dir() { return std::string(SPOOLSTEP_MACHINE_FILE_TEST_DIR) + "/bad"; }

class BadMachineFile : public ::testing::TestWithParam<BadFile> {};

TEST_P(BadMachineFile, ReportsTheDefectAtItsJsonPath) {
  const BadFile& row = GetParam();
  const std::string path = bad_dir() + "/" + row.file;
  const LoadResult result = load_machine_file(path);
  EXPECT_EQ(result.machine, nullptr) << row.why;
  EXPECT_FALSE(result.ok());
  ASSERT_FALSE(result.errors.empty()) << row.why;
  std::string all;
  bool found = false;
  for (const auto& error : result.errors) {
    all += error.to_string() + "\n";
    EXPECT_EQ(error.file, path);
    EXPECT_FALSE(error.reason.empty());
    EXPECT_FALSE(error.hint.empty());
    const std::string text = error.reason + " " + error.hint;
    found = found || (error.json_path == row.json_path && text.find(row.fragment) != std::string::npos);
  }
  EXPECT_TRUE(found) << row.why << "\nexpected at '" << row.json_path << "': " << row.fragment << "\ngot:\n" << all;
}

std::string row_name(const ::testing::TestParamInfo<BadFile>& info) {
  std::string name = info.param.file;
  name = name.substr(0, name.find('.'));
  return name;
}

INSTANTIATE_TEST_SUITE_P(Table, BadMachineFile, ::testing::ValuesIn(kBadFiles), row_name);

TEST(BadMachineFiles, EveryFileHasARowAndEveryRowAFile) {
  std::set<std::string> on_disk;
  for (const auto& entry : std::filesystem::directory_iterator(bad_dir())) {
    on_disk.insert(entry.path().filename().string());
  }
  std::set<std::string> in_table;
  for (const auto& row : kBadFiles) in_table.insert(row.file);
  EXPECT_EQ(on_disk, in_table);
  EXPECT_GE(in_table.size(), 25u);
}

TEST(BadMachineFiles, TheBaseTheyAreMadeFromLoads) {
  const LoadResult result = load_machine_file(std::string(SPOOLSTEP_MACHINE_FILE_TEST_DIR) + "/good_minimal.json");
  for (const auto& error : result.errors) ADD_FAILURE() << error.to_string();
  EXPECT_TRUE(result.ok());
}

}  // namespace
}  // namespace spoolstep::machine_file

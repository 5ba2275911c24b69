// Loader behaviour outside the bad-file table: capacities, file handling,
// error formatting, the parameter table and the generated reference.
#include <fstream>
#include <sstream>
#include <string>

#include <fmt/format.h>
#include <gtest/gtest.h>

#include "spoolstep/machine_file/machine_file.hpp"
#include "spoolstep/core/soft_command.hpp"
#include "spoolstep/machine_file/parameters.hpp"

namespace spoolstep::machine_file {
namespace {

using json = nlohmann::json;

std::string read_text(const std::string& path) {
  std::ifstream in(path);
  std::ostringstream out;
  out << in.rdbuf();
  return out.str();
}

json minimal() {
  return json::parse(read_text(std::string(SPOOLSTEP_MACHINE_FILE_TEST_DIR) + "/good_minimal.json"), nullptr, true,
                     /*ignore_comments=*/true);
}

bool has_error(const LoadResult& result, const std::string& path, const std::string& fragment) {
  for (const auto& e : result.errors) {
    if (e.json_path == path && (e.reason + " " + e.hint).find(fragment) != std::string::npos) return true;
  }
  return false;
}

std::string dump_errors(const LoadResult& result) {
  std::string all;
  for (const auto& e : result.errors) all += e.to_string() + "\n";
  return all;
}

TEST(Capacity, TooManyDigitalInputsNamesTheCapacity) {
  json doc = minimal();
  while (doc["inputs"]["digital"].size() <= core::kMaxDigitalInputs) {
    doc["inputs"]["digital"].push_back({{"name", fmt::format("spare_{}", doc["inputs"]["digital"].size())}});
  }
  const auto result = load_machine_text(doc.dump(), "many_inputs.json");
  EXPECT_EQ(result.machine, nullptr);
  EXPECT_TRUE(has_error(result, "/inputs/digital/64", "capacity kMaxDigitalInputs = 64")) << dump_errors(result);
}

TEST(Capacity, TooManyFunctionsNamesTheCapacity) {
  json doc = minimal();
  for (std::size_t i = 0; doc["functions"].size() <= core::kMaxFunctions; ++i) {
    doc["outputs"]["coils"].push_back({{"name", fmt::format("extra_{}_a", i)}});
    doc["outputs"]["coils"].push_back({{"name", fmt::format("extra_{}_b", i)}});
    doc["functions"].push_back({{"name", fmt::format("extra_{}", i)},
                                {"valve",
                                 {{"kind", "solenoid_4_2_detented"},
                                  {"coil_extend", fmt::format("extra_{}_a", i)},
                                  {"coil_retract", fmt::format("extra_{}_b", i)}}}});
  }
  const auto result = load_machine_text(doc.dump(), "many_functions.json");
  EXPECT_EQ(result.machine, nullptr);
  EXPECT_TRUE(has_error(result, "/functions/8", "capacity kMaxFunctions = 8")) << dump_errors(result);
}

TEST(Capacity, TooManyConditionNodesNamesTheCapacity) {
  json doc = minimal();
  json many = json::array();
  for (std::size_t i = 0; i < 100; ++i) many.push_back({{"not", "start_pb"}});  // two nodes each
  doc["sequence"]["transitions"][0]["condition"] = {{"any", many}};
  const auto result = load_machine_text(doc.dump(), "many_nodes.json");
  EXPECT_EQ(result.machine, nullptr);
  bool found = false;
  for (const auto& e : result.errors) {
    found = found || e.reason.find("kMaxConditionNodes = 192") != std::string::npos;
  }
  EXPECT_TRUE(found) << dump_errors(result);
  EXPECT_EQ(result.errors.size(), 1u) << "reported once, not once per node\n" << dump_errors(result);
}

TEST(Capacity, FourActionsPerStepFitAndAFifthDoesNot) {
  json doc = minimal();
  auto& actions = doc["sequence"]["steps"][1]["actions"];
  for (int i = 0; i < 3; ++i) actions.push_back({{"function", "lift"}, {"direction", "extend"}});
  const auto result = load_machine_text(doc.dump(), "many_actions.json");
  EXPECT_TRUE(has_error(result, "/sequence/steps/1/actions/4", "capacity kMaxActionsPerStep = 4")) << dump_errors(result);
}

TEST(FailureProperty, AnyLeafReplacedByAListFailsWithNoMachine) {
  // Every scalar in the minimal machine is either a name, a number, a choice,
  // text or a condition; none of them may be a list of lists.
  const json doc = minimal();
  const json flat = doc.flatten();
  std::size_t checked = 0;
  for (const auto& leaf : flat.items()) {
    json broken = doc;
    broken[json::json_pointer(leaf.key())] = json::array({json::array()});
    const auto result = load_machine_text(broken.dump(), "leaf.json");
    EXPECT_EQ(result.machine, nullptr) << leaf.key();
    ASSERT_FALSE(result.errors.empty()) << leaf.key();
    bool at_or_above = false;
    for (const auto& e : result.errors) {
      at_or_above = at_or_above || leaf.key().rfind(e.json_path, 0) == 0;
    }
    EXPECT_TRUE(at_or_above) << leaf.key() << "\n" << dump_errors(result);
    ++checked;
  }
  EXPECT_GT(checked, 50u);
}

TEST(FailureProperty, EveryRequiredTopLevelSectionIsRequired) {
  for (const char* section : {"format", "machine", "inputs", "outputs", "operator", "functions"}) {
    json doc = minimal();
    doc.erase(section);
    const auto result = load_machine_text(doc.dump(), "no_section.json");
    EXPECT_EQ(result.machine, nullptr) << section;
    EXPECT_TRUE(has_error(result, std::string("/") + section, "missing required field")) << section << "\n"
                                                                                         << dump_errors(result);
  }
}

TEST(Loading, MissingFileIsAnErrorNotAThrow) {
  const auto result = load_machine_file("/nonexistent/machine.json");
  EXPECT_EQ(result.machine, nullptr);
  ASSERT_EQ(result.errors.size(), 1u);
  EXPECT_EQ(result.errors[0].reason, "file not found");
  EXPECT_EQ(result.errors[0].file, "/nonexistent/machine.json");
}

TEST(Loading, DirectoryIsNotAMachineFile) {
  const auto result = load_machine_file(SPOOLSTEP_MACHINE_FILE_TEST_DIR);
  EXPECT_EQ(result.machine, nullptr);
  ASSERT_EQ(result.errors.size(), 1u);
  EXPECT_EQ(result.errors[0].reason, "not a regular file");
}

TEST(Loading, CommentsAreAllowedAndThePlantSectionIsKeptRaw) {
  json doc = minimal();
  doc["plant"] = {{"anything", {{"the", "plant model"}, {"owns", 1}}}};
  const auto result = load_machine_text("// a comment\n" + doc.dump(2), "with_plant.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  EXPECT_EQ(result.machine->plant, doc["plant"]);
  EXPECT_EQ(result.machine->source_path, "with_plant.json");
}

TEST(Loading, DefaultsAreTakenFromTheParameterTable) {
  const auto result = load_machine_text(minimal().dump(), "defaults.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  const auto& c = result.machine->config;
  EXPECT_EQ(c.safety.watchdog_us, 20000u);
  EXPECT_EQ(c.safety.supervision_category, core::StopCategory::kCat1);
  EXPECT_EQ(c.operator_panel.estop_category, core::StopCategory::kCat0);
  EXPECT_EQ(c.two_hand[0].max_sync_us, 500000u);
  const auto& tilt = c.functions[find_function(c, "tilt").value()];
  EXPECT_EQ(tilt.ramps[0].profile, core::RampProfile::kLinear);
  EXPECT_EQ(tilt.ramps[0].extend_accel_us, 500000u);
  EXPECT_EQ(tilt.ramps[1].extend_accel_us, 900000u);
  EXPECT_FLOAT_EQ(tilt.jog_speed_percent, 10.0f);
  EXPECT_EQ(tilt.reversal_dwell_us, 100000u);
  EXPECT_EQ(c.interlocks[0].stop_category, core::StopCategory::kCat1);
}

TEST(Loading, AllGuardCoversEveryMotionAndThePump) {
  const auto result = load_machine_text(minimal().dump(), "guards.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  const auto& c = result.machine->config;
  EXPECT_EQ(c.interlocks[0].guards, 0b1111u | core::kPowerUnitGuardBit);
  EXPECT_EQ(c.interlocks[1].guards, core::motion_bit(0, core::Direction::kExtend));
}

TEST(Loading, TwoHandReleaseHoldsEveryMotionUnlessTheFileNamesFewer) {
  json doc = minimal();
  doc["operator"]["cycle_start"] = {{"two_hand", "main"}};
  auto result = load_machine_text(doc.dump(), "two_hand_default.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  EXPECT_EQ(result.machine->config.two_hand[0].release_holds, core::kAllMotionBits);
  EXPECT_TRUE(configuration_warnings(result.machine->config).empty()) << "the safe default needs no warning";

  doc["two_hand"][0]["release_holds"] = {"lift.extend"};
  result = load_machine_text(doc.dump(), "two_hand_opt_out.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  const auto& c = result.machine->config;
  EXPECT_EQ(c.two_hand[0].release_holds, core::motion_bit(0, core::Direction::kExtend));
  const auto warnings = configuration_warnings(c);
  ASSERT_EQ(warnings.size(), 1u);
  EXPECT_NE(warnings[0].find("does not hold lift.retract"), std::string::npos) << warnings[0];

  doc["two_hand"][0]["release_holds"] = {"pump"};
  result = load_machine_text(doc.dump(), "two_hand_pump.json");
  EXPECT_TRUE(has_error(result, "/two_hand/0/release_holds/0", "not a motion")) << dump_errors(result);
}

TEST(Loading, SoftCommandsAreNoneByDefaultAndNamedFromTheCoreTable) {
  json doc = minimal();
  auto result = load_machine_text(doc.dump(), "soft_default.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  EXPECT_EQ(result.machine->config.operator_panel.soft_commands, 0u);
  doc["operator"]["soft_commands"] = {"pump_start", "jog"};
  result = load_machine_text(doc.dump(), "soft_some.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  EXPECT_EQ(result.machine->config.operator_panel.soft_commands,
            core::soft_command_bit(core::SoftCommand::kPumpStart) | core::soft_command_bit(core::SoftCommand::kJog));
  doc["operator"]["soft_commands"] = {"cycle_strat"};
  result = load_machine_text(doc.dump(), "soft_typo.json");
  EXPECT_TRUE(has_error(result, "/operator/soft_commands/0", "unknown soft command 'cycle_strat'")) << dump_errors(result);
  EXPECT_TRUE(has_error(result, "/operator/soft_commands/0", "cycle_start")) << "the hint lists the commands";
}

TEST(Loading, SoftCommandsNeverReplaceAPhysicalControl) {
  json doc = minimal();
  doc["operator"]["cycle_start"] = {{"two_hand", "main"}};
  doc["operator"]["auto_mode"] = "guard_closed_sw";
  doc["operator"]["soft_commands"] = {"cycle_start", "select_auto"};
  const auto result = load_machine_text(doc.dump(), "soft_replaces.json");
  EXPECT_TRUE(has_error(result, "/operator/soft_commands/0", "two-hand start")) << dump_errors(result);
  EXPECT_TRUE(has_error(result, "/operator/soft_commands/1", "mode selector")) << dump_errors(result);
}

TEST(Loading, NameLookupsFindDeclaredNamesOnly) {
  const auto result = load_machine_text(minimal().dump(), "names.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  const auto& c = result.machine->config;
  EXPECT_EQ(find_digital_input(c, "start_pb"), 2);
  EXPECT_EQ(find_analog_input(c, "lift_pressure"), 0);
  EXPECT_EQ(find_coil(c, "lift_y2"), 2);
  EXPECT_EQ(find_prop_output(c, "tilt_yb"), 1);
  EXPECT_EQ(find_function(c, "tilt"), 1);
  EXPECT_EQ(find_step(c, "up"), 1);
  EXPECT_EQ(find_interlock(c, "guard_and_pressure"), 1);
  EXPECT_EQ(find_two_hand(c, "main"), 0);
  EXPECT_EQ(find_ramp(c, 1, "soft"), 1);
  EXPECT_FALSE(find_digital_input(c, "lift_y1").has_value());
  EXPECT_FALSE(find_function(c, "").has_value());
  EXPECT_FALSE(find_ramp(c, 0, "soft").has_value());
  EXPECT_FALSE(find_step(c, "upx").has_value());
}

TEST(LoadErrorText, NamesFilePathReasonAndHint) {
  const LoadError e{"press_cell.json", "/functions/1/ramps/0/extend_accel_ms", "must be between 0 and 60000 (got -5)",
                    "Fix the value."};
  EXPECT_EQ(e.to_string(),
            "press_cell.json: /functions/1/ramps/0/extend_accel_ms: must be between 0 and 60000 (got -5). Fix the value.");
  const LoadError whole{"x.json", "", "file not found", "Check the path."};
  EXPECT_EQ(whole.to_string(), "x.json: file not found. Check the path.");
}

TEST(ParameterTable, DefaultsLieWithinTheirLimitsAndChoices) {
  ASSERT_GT(parameter_count(), 50u);
  for (std::size_t i = 0; i < parameter_count(); ++i) {
    const Parameter& p = parameter_at(i);
    EXPECT_FALSE(p.description.empty()) << p.key;
    EXPECT_EQ(find_parameter(p.key), &p) << "keys are unique: " << p.key;
    if (p.presence.required_in_object()) {
      EXPECT_TRUE(p.default_value.empty()) << p.key << ": a required field has no default";
    }
    // A conditional requirement is written in the presence column, from the
    // table, never only in the free text (where it drifted from the loader).
    if (p.presence.kind == Presence::Kind::kWhen) {
      EXPECT_FALSE(p.presence.when.empty()) << p.key;
    }
    EXPECT_EQ(std::string(p.description).find("equired"), std::string::npos)
        << p.key << ": say when it is required in the presence, not in the description";
    if (p.default_value.empty()) continue;
    if (p.type == ParamType::kInteger || p.type == ParamType::kNumber) {
      const double value = std::stod(std::string(p.default_value));
      EXPECT_GE(value, p.min) << p.key;
      EXPECT_LE(value, p.max) << p.key;
    } else if (p.type == ParamType::kChoice) {
      EXPECT_NE(("|" + std::string(p.choices) + "|").find("|" + std::string(p.default_value) + "|"), std::string::npos)
          << p.key;
    }
  }
}

TEST(ParameterReference, ListsEveryParameterInOneMarkdownTable) {
  std::ostringstream out;
  write_parameter_reference(out);
  const std::string text = out.str();
  EXPECT_NE(text.find("| Key | Type | Unit | Required | Default | Min | Max | Description |"), std::string::npos);
  for (std::size_t i = 0; i < parameter_count(); ++i) {
    EXPECT_NE(text.find("| `" + std::string(parameter_at(i).key) + "` |"), std::string::npos) << parameter_at(i).key;
  }
}

TEST(ParameterReference, CheckedInCopyIsUpToDate) {
  std::ostringstream out;
  write_parameter_reference(out);
  EXPECT_EQ(read_text(std::string(SPOOLSTEP_CONFIG_DIR) + "/machine-file-reference.md"), out.str())
      << "regenerate with: spoolstep check --reference > config/machine-file-reference.md";
}

}  // namespace
}  // namespace spoolstep::machine_file

namespace spoolstep::machine_file {
namespace {

TEST(ValveKinds, EveryKindLoadsWithItsOwnOutputsAndSummarizes) {
  json doc = minimal();
  doc["outputs"]["coils"].push_back({{"name", "door_y1"}});
  doc["outputs"]["coils"].push_back({{"name", "door_y2"}});
  doc["outputs"]["coils"].push_back({{"name", "eject_y1"}});
  doc["outputs"]["proportional"].push_back({{"name", "slide_cmd"}, {"unit", "percent"}});
  doc["functions"].push_back(json::parse(R"({"name": "door", "valve": {"kind": "solenoid_4_2_detented",
      "coil_extend": "door_y1", "coil_retract": "door_y2", "detent_pulse_ms": 150}})"));
  doc["functions"].push_back(json::parse(R"({"name": "eject", "valve": {"kind": "solenoid_4_2_spring_return",
      "coil_extend": "eject_y1"}})"));
  doc["functions"].push_back(json::parse(R"({"name": "slide", "valve": {"kind": "proportional_4_3_signed",
      "centre": "float", "channel": "slide_cmd", "deadband_jump_percent": 12}, "ramps": [{"name": "normal"}]})"));
  const auto result = load_machine_text(doc.dump(), "kinds.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  const auto& c = result.machine->config;
  const auto& door = c.functions[find_function(c, "door").value()];
  EXPECT_EQ(door.valve, core::ValveKind::kSolenoid42Detented);
  EXPECT_EQ(door.centre, core::ValveCentre::kNotApplicable);
  EXPECT_EQ(door.detent_pulse_us, 150000u);
  const auto& eject = c.functions[find_function(c, "eject").value()];
  EXPECT_EQ(eject.valve, core::ValveKind::kSolenoid42SpringReturn);
  EXPECT_EQ(eject.coil_extend, find_coil(c, "eject_y1"));
  EXPECT_EQ(eject.coil_retract, core::kNoIndex8);
  const auto& slide = c.functions[find_function(c, "slide").value()];
  EXPECT_EQ(slide.valve, core::ValveKind::kProportional43SignedCommand);
  EXPECT_EQ(slide.centre, core::ValveCentre::kFloat);
  EXPECT_EQ(slide.prop_extend, find_prop_output(c, "slide_cmd"));
  EXPECT_EQ(slide.prop_retract, core::kNoIndex8);
  EXPECT_FLOAT_EQ(slide.deadband_jump_percent, 12.0f);
  const std::string text = summarize(c);
  for (const char* expected : {"door: 4/2 solenoid, detented, no centre (4/2)", "detent pulse 150 ms",
                               "eject: 4/2 solenoid, spring return", "spring gives retract",
                               "slide: 4/3 proportional, signed command, float centre", "deadband jump 12 %"}) {
    EXPECT_NE(text.find(expected), std::string::npos) << expected << "\n" << text;
  }
}

TEST(ValveKinds, DetentedValveRejectsProportionalSettings) {
  json doc = minimal();
  doc["functions"][0]["valve"] = json::parse(R"({"kind": "solenoid_4_2_detented", "coil_extend": "lift_y1",
      "coil_retract": "lift_y2", "dither": {"amplitude_ma": 40, "frequency_hz": 100}})");
  const auto result = load_machine_text(doc.dump(), "detent_dither.json");
  EXPECT_EQ(result.machine, nullptr);
  EXPECT_TRUE(has_error(result, "/functions/0/valve/dither", "does not apply to valve kind solenoid_4_2_detented"))
      << dump_errors(result);
}

TEST(ValveKinds, QuickStopAndJogSpeedAreForProportionalValvesOnly) {
  json doc = minimal();
  doc["functions"][0]["quick_stop_ms"] = 80;
  doc["functions"][0]["jog"] = {{"extend", "start_pb"}, {"speed_percent", 20}};
  const auto result = load_machine_text(doc.dump(), "solenoid_extras.json");
  EXPECT_EQ(result.machine, nullptr);
  EXPECT_TRUE(has_error(result, "/functions/0/quick_stop_ms", "applies to proportional valves only")) << dump_errors(result);
  EXPECT_TRUE(has_error(result, "/functions/0/jog/speed_percent", "applies to proportional valves only"))
      << dump_errors(result);
}

TEST(Conditions, EveryFormCompilesToItsOperation) {
  json doc = minimal();
  doc["sequence"]["transitions"][0]["condition"] = json::parse(R"({"all": [
      true, false, "start_pb", {"input": "hand_l"}, {"not": "hand_r"},
      {"any": [{"mode": "automatic"}, {"mode": "manual"}]},
      {"analog": "lift_pressure", "above": 50, "hysteresis": 2},
      {"on_delay_ms": 200, "of": "start_pb"}, {"off_delay_ms": 300, "of": "start_pb"}, {"debounce_ms": 20, "of": "start_pb"},
      {"function": "lift", "is": "retracting"}, {"interlock": "guard"}, {"step": "up"}, {"two_hand": "main"},
      {"power_unit": "ready"}]})");
  const auto result = load_machine_text(doc.dump(), "forms.json");
  ASSERT_TRUE(result.ok()) << dump_errors(result);
  const auto& c = result.machine->config;
  const auto& root = c.nodes[c.transitions[0].condition];
  ASSERT_EQ(root.op, core::ConditionOp::kAll);
  ASSERT_EQ(root.b, 15);
  using Op = core::ConditionOp;
  const Op expected[] = {Op::kTrue, Op::kFalse, Op::kDigitalInput, Op::kDigitalInput, Op::kNot, Op::kAny,
                         Op::kAnalogAbove, Op::kOnDelay, Op::kOffDelay, Op::kDebounce, Op::kFunctionState,
                         Op::kNodeRef, Op::kStepActive, Op::kTwoHandHeld, Op::kPowerUnitReady};
  for (std::uint16_t k = 0; k < root.b; ++k) {
    EXPECT_EQ(c.nodes[c.child_slots[root.a + k]].op, expected[k]) << "child " << k;
  }
  const auto& on_delay = c.nodes[c.child_slots[root.a + 7]];
  EXPECT_EQ(on_delay.time_us, 200000u);
  EXPECT_STREQ(on_delay.label.text.data(), "start_pb on 200ms");
  const auto& state = c.nodes[c.child_slots[root.a + 10]];
  EXPECT_EQ(state.b, static_cast<std::uint16_t>(core::FunctionCondition::kRetracting));
  EXPECT_STREQ(state.label.text.data(), "lift retracting");
  EXPECT_EQ(c.nodes[c.child_slots[root.a + 11]].a, c.interlocks[0].condition);
  EXPECT_STREQ(c.nodes[c.child_slots[root.a + 4]].label.text.data(), "not hand_r");
}

}  // namespace
}  // namespace spoolstep::machine_file

namespace spoolstep::machine_file {
namespace {

TEST(ErrorPaths, DuplicateKeyInsideAListIsReportedAtItsIndex) {
  const std::string text = minimal().dump();
  // Write "kind" twice in the second function's valve.
  std::string doubled = text;
  const std::string needle = "\"kind\":\"proportional_4_3_two_solenoid\"";
  const auto at = doubled.find(needle);
  ASSERT_NE(at, std::string::npos);
  doubled.insert(at, needle + ",");
  const auto result = load_machine_text(doubled, "dup.json");
  EXPECT_EQ(result.machine, nullptr);
  EXPECT_TRUE(has_error(result, "/functions/1/valve/kind", "duplicate key 'kind'")) << dump_errors(result);
}

TEST(ErrorPaths, KeysAreEscapedAsJsonPointerTokens) {
  json doc = minimal();
  doc["machine"]["a/b~c"] = 1;
  const auto result = load_machine_text(doc.dump(), "escape.json");
  EXPECT_TRUE(has_error(result, "/machine/a~1b~0c", "unknown field 'a/b~c'")) << dump_errors(result);
}

TEST(ErrorPaths, EveryProblemIsReportedNotJustTheFirst) {
  json doc = minimal();
  doc["timing"] = {{"watchdog_ms", -1}};
  doc["functions"][1]["ramps"][0]["profile"] = "scurve";
  doc["interlocks"][0]["guards"] = json::array({"lift.up"});
  const auto result = load_machine_text(doc.dump(), "three.json");
  EXPECT_EQ(result.machine, nullptr);
  EXPECT_EQ(result.errors.size(), 3u) << dump_errors(result);
  EXPECT_TRUE(has_error(result, "/timing/watchdog_ms", "must be between 1 and 10000 (got -1)")) << dump_errors(result);
  EXPECT_TRUE(has_error(result, "/functions/1/ramps/0/profile", "Did you mean \"s_curve\"?")) << dump_errors(result);
  EXPECT_TRUE(has_error(result, "/interlocks/0/guards/0", "unknown motion 'up'")) << dump_errors(result);
}

}  // namespace
}  // namespace spoolstep::machine_file

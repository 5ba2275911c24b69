// The invented demo machine config/press_cell.json loads, and what it
// compiles to is what the file says.
#include <cstdio>
#include <cstring>
#include <string>

#include <gtest/gtest.h>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::machine_file {
namespace {

using core::ConditionOp;
using core::Direction;

class PressCell : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    result_ = new LoadResult(load_machine_file(std::string(SPOOLSTEP_CONFIG_DIR) + "/press_cell.json"));
  }
  static void TearDownTestSuite() {
    delete result_;
    result_ = nullptr;
  }
  const core::MachineConfig& config() const { return result_->machine->config; }
  std::uint8_t function(std::string_view name) const { return find_function(config(), name).value(); }
  const core::InterlockConfig& interlock(std::string_view name) const {
    return config().interlocks[find_interlock(config(), name).value()];
  }
  const core::StepConfig& step(std::string_view name) const { return config().steps[find_step(config(), name).value()]; }

  static LoadResult* result_;
};
LoadResult* PressCell::result_ = nullptr;

TEST_F(PressCell, LoadsWithoutErrors) {
  for (const auto& error : result_->errors) ADD_FAILURE() << error.to_string();
  ASSERT_TRUE(result_->ok());
  EXPECT_EQ(name_view(config().name), "press_cell");
  EXPECT_TRUE(result_->machine->plant.is_object()) << "the plant section is kept raw for hostsim";
}

TEST_F(PressCell, TheCoreAcceptsTheLoadedConfiguration) {
  ASSERT_TRUE(result_->ok());
  const core::Status status = core::validate_config(config());
  EXPECT_TRUE(status.is_ok()) << core::to_string(status.code()) << " in " << status.where() << " row "
                              << status.index();
}

TEST_F(PressCell, CountsMatchTheFile) {
  ASSERT_TRUE(result_->ok());
  EXPECT_EQ(config().digital_input_count, 19);
  EXPECT_EQ(config().analog_input_count, 4);
  EXPECT_EQ(config().coil_count, 5);
  EXPECT_EQ(config().prop_output_count, 2);
  EXPECT_EQ(config().function_count, 2);
  EXPECT_EQ(config().two_hand_count, 1);
  EXPECT_EQ(config().interlock_count, 7);
  EXPECT_EQ(config().step_count, 8);
  EXPECT_EQ(config().transition_count, 8);
  EXPECT_EQ(config().functions[function("press")].ramp_count, 4);
}

TEST_F(PressCell, ValvesResolveToTheirOutputsAndCentres) {
  ASSERT_TRUE(result_->ok());
  const auto& clamp = config().functions[function("clamp")];
  EXPECT_EQ(clamp.valve, core::ValveKind::kSolenoid43SpringCentred);
  EXPECT_EQ(clamp.centre, core::ValveCentre::kClosed);
  EXPECT_EQ(clamp.coil_extend, find_coil(config(), "clamp_y1"));
  EXPECT_EQ(clamp.coil_retract, find_coil(config(), "clamp_y2"));
  EXPECT_EQ(clamp.prop_extend, core::kNoIndex8);
  EXPECT_EQ(clamp.extended_end_input, core::kNoIndex8);
  EXPECT_EQ(clamp.retracted_end_input, find_digital_input(config(), "clamp_open_ls"));

  const auto& press = config().functions[function("press")];
  EXPECT_EQ(press.valve, core::ValveKind::kProportional43TwoSolenoid);
  EXPECT_EQ(press.centre, core::ValveCentre::kBleed);
  EXPECT_EQ(press.prop_extend, find_prop_output(config(), "press_ya"));
  EXPECT_EQ(press.prop_retract, find_prop_output(config(), "press_yb"));
  EXPECT_EQ(press.enable_coil, find_coil(config(), "press_valve_enable"));
  EXPECT_EQ(press.coil_extend, core::kNoIndex8);
  EXPECT_FLOAT_EQ(press.current_extend.crack_ma, 280.0f);
  EXPECT_FLOAT_EQ(press.retract_slowdown, 40.0f);
  EXPECT_FLOAT_EQ(press.slowdown_speed_percent, 3.0f);
  EXPECT_FLOAT_EQ(press.current_extend.max_ma, 800.0f);
  EXPECT_FLOAT_EQ(press.dither_amplitude_ma, 40.0f);
  EXPECT_FLOAT_EQ(press.dither_frequency_hz, 120.0f);
  EXPECT_EQ(press.position_input, find_analog_input(config(), "press_position"));
  EXPECT_FLOAT_EQ(press.extend_limit, 480.0f);
  EXPECT_FLOAT_EQ(press.retract_limit, 1.0f);
  EXPECT_FLOAT_EQ(press.jog_speed_percent, 15.0f);
}

TEST_F(PressCell, MillisecondsBecomeMicroseconds) {
  ASSERT_TRUE(result_->ok());
  EXPECT_EQ(config().safety.scan_period_us, 1000u);
  EXPECT_EQ(config().safety.watchdog_us, 20000u);
  EXPECT_EQ(config().safety.max_digital_age_us, 50000u);
  EXPECT_EQ(config().power_unit.unloaded_start_us, 1500000u);
  EXPECT_EQ(config().power_unit.pressure_ready_timeout_us, 5000000u);
  EXPECT_EQ(config().two_hand[0].max_sync_us, 500000u);
  EXPECT_EQ(step("dwell").min_time_us, 1500000u);
  EXPECT_EQ(step("dwell").supervision_us, 3000000u);
  const auto& press = config().functions[function("press")];
  EXPECT_EQ(press.quick_stop_us, 80000u);
  EXPECT_EQ(press.reversal_dwell_us, 150000u);
  const auto& force = press.ramps[find_ramp(config(), function("press"), "force").value()];
  EXPECT_EQ(force.profile, core::RampProfile::kSCurve);
  EXPECT_EQ(force.extend_accel_us, 300000u);
  EXPECT_EQ(force.jerk_us, 50000u);
  EXPECT_EQ(config().analog_inputs[find_analog_input(config(), "oil_temperature").value()].max_age_us, 500000u);
}

TEST_F(PressCell, AnalogInputsCarryUnitSignalAndRange) {
  ASSERT_TRUE(result_->ok());
  const auto& pressure = config().analog_inputs[find_analog_input(config(), "press_pressure").value()];
  EXPECT_EQ(pressure.signal, core::AnalogSignal::kCurrent4To20);
  EXPECT_EQ(name_view(pressure.unit), "bar");
  EXPECT_FLOAT_EQ(pressure.range_min, 0.0f);
  EXPECT_FLOAT_EQ(pressure.range_max, 250.0f);
}

TEST_F(PressCell, GuardsBecomeMotionBits) {
  ASSERT_TRUE(result_->ok());
  const std::uint8_t clamp = function("clamp");
  const std::uint8_t press = function("press");
  const std::uint32_t both = core::motion_bit(clamp, Direction::kExtend) | core::motion_bit(clamp, Direction::kRetract) |
                             core::motion_bit(press, Direction::kExtend) | core::motion_bit(press, Direction::kRetract);
  EXPECT_EQ(interlock("guard_closed").guards, both);
  EXPECT_EQ(interlock("hands_on_controls").guards, core::motion_bit(press, Direction::kExtend));
  EXPECT_EQ(interlock("oil_level").guards, core::kPowerUnitGuardBit);
  EXPECT_EQ(interlock("oil_level").kind, core::InterlockKind::kTrip);
  EXPECT_EQ(interlock("press_not_overloaded").stop_category, core::StopCategory::kCat0);
  EXPECT_EQ(config().operator_panel.estop_input, find_digital_input(config(), "estop_ok"));
  EXPECT_EQ(config().operator_panel.estop_category, core::StopCategory::kCat0);
}

TEST_F(PressCell, TwoHandOrManualCompilesChildrenBeforeTheirParent) {
  ASSERT_TRUE(result_->ok());
  const auto& c = config();
  const std::uint16_t root = interlock("hands_on_controls").condition;
  ASSERT_LT(root, c.node_count);
  const auto& any = c.nodes[root];
  ASSERT_EQ(any.op, ConditionOp::kAny);
  ASSERT_EQ(any.b, 2);
  const auto& manual = c.nodes[c.child_slots[any.a]];
  const auto& hands = c.nodes[c.child_slots[any.a + 1]];
  EXPECT_EQ(manual.op, ConditionOp::kModeIs);
  EXPECT_EQ(manual.b, 0) << "0 = manual";
  EXPECT_EQ(hands.op, ConditionOp::kTwoHandHeld);
  EXPECT_EQ(hands.a, 0);
  EXPECT_LT(c.child_slots[any.a], root);
  EXPECT_LT(c.child_slots[any.a], c.child_slots[any.a + 1]) << "children compile in file order";
  EXPECT_STREQ(any.label.text.data(), "mode manual or two_ha..");
}

TEST_F(PressCell, InterlockReferencePointsAtTheInterlocksRoot) {
  ASSERT_TRUE(result_->ok());
  const auto& c = config();
  const auto& first = c.transitions[0];
  EXPECT_EQ(first.from_step, find_step(c, "wait_start"));
  EXPECT_EQ(first.to_step, find_step(c, "clamp"));
  const auto& all = c.nodes[first.condition];
  ASSERT_EQ(all.op, ConditionOp::kAll);
  const auto& ref = c.nodes[c.child_slots[all.a]];
  ASSERT_EQ(ref.op, ConditionOp::kNodeRef);
  EXPECT_EQ(ref.a, interlock("guard_closed").condition);
  EXPECT_EQ(c.nodes[c.child_slots[all.a + 1]].op, ConditionOp::kPowerUnitReady);
}

TEST_F(PressCell, EveryNodeReadsOnlyLowerNodes) {
  ASSERT_TRUE(result_->ok());
  const auto& c = config();
  for (std::uint16_t i = 0; i < c.node_count; ++i) {
    const auto& n = c.nodes[i];
    switch (n.op) {
      case ConditionOp::kNot:
      case ConditionOp::kNodeRef:
      case ConditionOp::kOnDelay:
      case ConditionOp::kOffDelay:
      case ConditionOp::kDebounce:
        EXPECT_LT(n.a, i) << "node " << i;
        break;
      case ConditionOp::kAll:
      case ConditionOp::kAny:
        ASSERT_LE(n.a + n.b, c.child_slot_count);
        for (std::uint16_t k = 0; k < n.b; ++k) EXPECT_LT(c.child_slots[n.a + k], i) << "node " << i;
        break;
      default:
        break;
    }
    EXPECT_LE(std::strlen(n.label.text.data()), core::kMaxNameLength);
  }
}

TEST_F(PressCell, AnalogThresholdsAndLabels) {
  ASSERT_TRUE(result_->ok());
  const auto& c = config();
  const auto& t = c.transitions[3];  // press_force -> dwell
  EXPECT_EQ(t.from_step, find_step(c, "press_force"));
  const auto& n = c.nodes[t.condition];
  EXPECT_EQ(n.op, ConditionOp::kAnalogAbove);
  EXPECT_EQ(n.a, find_analog_input(c, "press_pressure"));
  EXPECT_FLOAT_EQ(n.threshold, 180.0f);
  EXPECT_FLOAT_EQ(n.hysteresis, 5.0f);
  // "press_pressure > 180 bar" is 24 characters: the unit is dropped to fit.
  EXPECT_STREQ(n.label.text.data(), "press_pressure > 180");
}

TEST_F(PressCell, ClampHoldsFromClampThroughDecompress) {
  ASSERT_TRUE(result_->ok());
  const std::uint8_t clamp = function("clamp");
  for (const char* name : {"clamp", "fast_approach", "press_force", "dwell", "decompress"}) {
    const auto& s = step(name);
    bool holds = false;
    for (std::uint8_t k = 0; k < s.action_count; ++k) {
      holds = holds || (s.actions[k].function == clamp && s.actions[k].direction == Direction::kExtend);
    }
    EXPECT_TRUE(holds) << name;
    EXPECT_GT(s.supervision_us, 0u) << name << " moves, so it is supervised";
  }
  const auto& approach = step("fast_approach");
  ASSERT_EQ(approach.action_count, 2);
  EXPECT_EQ(approach.actions[1].function, function("press"));
  EXPECT_FLOAT_EQ(approach.actions[1].speed_percent, 100.0f);
  EXPECT_EQ(approach.actions[1].ramp, find_ramp(config(), function("press"), "fast"));
  EXPECT_FLOAT_EQ(approach.actions[0].speed_percent, 100.0f) << "solenoid valves shift fully";
}

TEST_F(PressCell, SummaryShowsValvesGuardsAndTransitions) {
  ASSERT_TRUE(result_->ok());
  const std::string text = summarize(config());
  for (const char* expected :
       {"press: 4/3 proportional, two solenoids, bleed centre", "clamp: 4/3 solenoid, spring-centred, closed centre",
        "press_ya 280..800 mA", "slow-down to 3 %: extending no slow-down; retracting the last 40", "ramp force: s-curve", "guards press.extend", "healthy when mode manual or two-hand main held",
        "-> dwell when press_pressure > 180 bar (hysteresis 5)", "-> clamp when interlock guard_closed and power unit ready",
        "healthy when not (filter_clogged for 5000 ms)", "0 wait_start (initial)"}) {
    EXPECT_NE(text.find(expected), std::string::npos) << "missing: " << expected << "\n" << text;
  }
}

TEST(DemoMachineFile, SaysItIsInvented) {
  const auto result = load_machine_file(std::string(SPOOLSTEP_CONFIG_DIR) + "/press_cell.json");
  ASSERT_TRUE(result.ok());
  // The description is not kept in the config; read it back from the text.
  std::FILE* f = std::fopen((std::string(SPOOLSTEP_CONFIG_DIR) + "/press_cell.json").c_str(), "rb");
  ASSERT_NE(f, nullptr);
  std::string text;
  char buffer[4096];
  for (std::size_t n; (n = std::fread(buffer, 1, sizeof buffer, f)) > 0;) text.append(buffer, n);
  std::fclose(f);
  const auto doc = nlohmann::json::parse(text);
  EXPECT_NE(doc.at("machine").at("description").get<std::string>().find("Invented"), std::string::npos);
}

}  // namespace
}  // namespace spoolstep::machine_file

// The full-capacity machine used for the worst-case scan cost on the target
// must be a valid configuration with every table full, and its chain must
// actually cycle with the scripted inputs (else the cost figure would be of
// an idle machine).
#include <gtest/gtest.h>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/firmware/full_capacity_machine.hpp"

namespace {

using namespace spoolstep::core;

TEST(FullCapacityMachine, FillsEveryTableAndValidates) {
  static MachineConfig c;
  spoolstep::firmware::build_full_capacity_machine(c);
  const Status status = validate_config(c);
  ASSERT_TRUE(status.is_ok()) << to_string(status.code()) << " in " << status.where() << "[" << status.index() << "]";
  EXPECT_EQ(c.digital_input_count, kMaxDigitalInputs);
  EXPECT_EQ(c.analog_input_count, kMaxAnalogInputs);
  EXPECT_EQ(c.coil_count, kMaxCoils);
  EXPECT_EQ(c.prop_output_count, kMaxPropOutputs);
  EXPECT_EQ(c.function_count, kMaxFunctions);
  EXPECT_EQ(c.node_count, kMaxConditionNodes);
  EXPECT_EQ(c.child_slot_count, kMaxConditionChildren);
  EXPECT_EQ(c.interlock_count, kMaxInterlocks);
  EXPECT_EQ(c.two_hand_count, kMaxTwoHandDevices);
  EXPECT_EQ(c.step_count, kMaxSteps);
  EXPECT_EQ(c.transition_count, kMaxTransitions);
  for (std::size_t s = 0; s < kMaxSteps; ++s) EXPECT_EQ(c.steps[s].action_count, kMaxActionsPerStep);
  for (std::size_t f = 0; f < kMaxFunctions; ++f) {
    if (is_proportional(c.functions[f].valve)) {
      EXPECT_EQ(c.functions[f].ramp_count, kMaxRampsPerFunction);
    }
  }
}

TEST(FullCapacityMachine, ChainCyclesThroughAllStepsWithoutFaults) {
  static MachineConfig c;
  spoolstep::firmware::build_full_capacity_machine(c);
  Controller controller;
  ASSERT_TRUE(controller.init(c).is_ok());
  InputImage in{};
  OutputImage out{};
  std::uint32_t highest_step = 0;
  for (std::uint32_t scan = 0; scan < 4000; ++scan) {
    spoolstep::firmware::full_capacity_inputs(scan, in);
    controller.scan(in, 1000u * (scan + 1), out);
    if (controller.diagnostics().active_step > highest_step) highest_step = controller.diagnostics().active_step;
  }
  const Diagnostics& d = controller.diagnostics();
  EXPECT_EQ(d.fault_count, 0u);
  EXPECT_EQ(d.state, MachineState::kAutoCycle);
  EXPECT_EQ(highest_step, kMaxSteps - 1);
  EXPECT_GE(d.completed_cycles, 1u);
}

}  // namespace

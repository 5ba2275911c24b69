// The valve-kind table (core/valve_kinds.hpp) is what the validator checks a
// function's outputs against: a row's outputs validate, one output more or
// one less is refused. And every centre's connections are as ISO 1219 port
// letters describe them (common practice, no source).
#include <gtest/gtest.h>

#include "spoolstep/core/valve_kinds.hpp"
#include "test_rig.hpp"

namespace spoolstep::core {
namespace {

using testing::kClampY1;
using testing::kClampY2;

// The test machine with its press replaced by `kind` driving the outputs
// its row names (coils and channels not used by the clamp).
MachineConfig with_press_as(const ValveKindRow& row, std::uint8_t extra_bits, std::uint8_t missing_bits) {
  MachineConfig c = testing::make_test_machine();
  FunctionConfig& f = c.functions[testing::kPress];
  const std::uint8_t drives = static_cast<std::uint8_t>((row.outputs | extra_bits) & ~missing_bits);
  f.valve = row.kind;
  f.centre = row.has_centre ? ValveCentre::kClosed : ValveCentre::kNotApplicable;
  f.coil_extend = f.coil_retract = f.prop_extend = f.prop_retract = kNoIndex8;
  f.enable_coil = kNoIndex8;
  c.coils[c.coil_count] = testing::name("spare_a");
  const std::uint8_t spare_a = c.coil_count++;
  c.coils[c.coil_count] = testing::name("spare_b");
  const std::uint8_t spare_b = c.coil_count++;
  c.prop_outputs[testing::kPressYa].unit = (drives & kDrivesSignedCommand) ? PropUnit::kPercent : PropUnit::kMilliamp;
  if (drives & kDrivesCoilExtend) f.coil_extend = spare_a;
  if (drives & kDrivesCoilRetract) f.coil_retract = spare_b;
  if (drives & (kDrivesCurrentExtend | kDrivesSignedCommand)) f.prop_extend = testing::kPressYa;
  if (drives & kDrivesCurrentRetract) f.prop_retract = testing::kPressYb;
  f.detent_pulse_us = row.detented ? 100000 : 0;
  if (!row.meters) f.ramp_count = 0;
  return c;
}

TEST(ValveKindTable, EachRowsOutputsValidateAndOneMoreOrOneLessIsRefused) {
  const std::uint8_t all = kDrivesCoilExtend | kDrivesCoilRetract | kDrivesCurrentExtend | kDrivesCurrentRetract;
  for (const ValveKindRow& row : kValveKinds) {
    EXPECT_TRUE(validate_config(with_press_as(row, 0, 0)).is_ok()) << row.key << ": its own outputs";
    for (std::uint8_t bit = 1; bit & all; bit = static_cast<std::uint8_t>(bit << 1)) {
      if (row.outputs & bit) {
        EXPECT_FALSE(validate_config(with_press_as(row, 0, bit)).is_ok()) << row.key << ": missing output bit " << int{bit};
      } else if (!((row.outputs & kDrivesSignedCommand) && bit == kDrivesCurrentExtend)) {
        EXPECT_FALSE(validate_config(with_press_as(row, bit, 0)).is_ok()) << row.key << ": extra output bit " << int{bit};
      }
    }
  }
}

TEST(ValveKindTable, OnlyMeteringKindsAreProportional) {
  for (const ValveKindRow& row : kValveKinds) {
    EXPECT_EQ(is_proportional(row.kind), row.meters) << row.key;
    EXPECT_EQ(row.has_centre, row.positions == 3) << row.key << ": a 4/3 valve has a centre, a 4/2 none";
  }
  EXPECT_FALSE(is_proportional(static_cast<ValveKind>(200)));
  EXPECT_EQ(valve_kind_row(static_cast<ValveKind>(200)), nullptr);
}

// Connections as the trade names the centres: tandem P to T with A and B
// blocked; float P blocked, A and B to T; regenerative P, A, B joined with T
// blocked (common practice, no source).
TEST(CentreTable, ConnectionsFollowTheTradeNames) {
  const CentreRow& tandem = *centre_row(ValveCentre::kTandem);
  EXPECT_TRUE(tandem.p_to_t);
  EXPECT_FALSE(tandem.a_to_t || tandem.b_to_t || tandem.p_to_a || tandem.p_to_b);
  const CentreRow& flt = *centre_row(ValveCentre::kFloat);
  EXPECT_TRUE(flt.a_to_t && flt.b_to_t);
  EXPECT_FALSE(flt.p_to_t || flt.p_to_a || flt.p_to_b);
  const CentreRow& regen = *centre_row(ValveCentre::kRegenerative);
  EXPECT_TRUE(regen.p_to_a && regen.p_to_b);
  EXPECT_FALSE(regen.p_to_t || regen.a_to_t || regen.b_to_t);
  EXPECT_TRUE(traps_a_and_b(ValveCentre::kClosed));
  EXPECT_TRUE(traps_a_and_b(ValveCentre::kTandem));
  EXPECT_FALSE(traps_a_and_b(ValveCentre::kFloat));
  EXPECT_FALSE(traps_a_and_b(ValveCentre::kBleed));
  EXPECT_TRUE(centre_row(ValveCentre::kBleed)->throttled);
}

}  // namespace
}  // namespace spoolstep::core

// The plant's connection to the core: outputs to spools, sensors to the
// input image (4-20 mA, NAMUR NE 43), switches with hysteresis, faults.
#include <gtest/gtest.h>

#include <cmath>

#include "rig.hpp"

namespace spoolstep::hostsim::test {
namespace {

using core::ValveCentre;
using core::ValveKind;

Rig sensor_rig(ValveKind kind = ValveKind::kSolenoid43SpringCentred) {
  Rig rig = single_cylinder(kind, ValveCentre::kClosed);
  rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
  rig.plant["sensors"] = nlohmann::json::parse(R"([
    {"kind": "pressure", "at": "cyl.A", "input": "p_a"},
    {"kind": "position", "cylinder": "cyl", "input": "x"},
    {"kind": "pressure", "at": "pump", "input": "p_eng"},
    {"kind": "limit_switch", "cylinder": "cyl", "at_mm": 200, "active": "above", "hysteresis_mm": 5, "input": "at_end"},
    {"kind": "pressure_switch", "at": "cyl.A", "above_bar": 100, "hysteresis_bar": 10, "input": "pressed"}
  ])");
  return rig;
}

TEST(PlantSensors, TransducersScaleTo4To20mA) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 125e5));
  core::InputImage in{};
  p->read_inputs(in);
  // 125 bar of 0..250 bar is 50 % = 12 mA (check-values section 2 test vectors).
  EXPECT_NEAR(in.analog[0].value, 12.0f, 1e-4f);
  EXPECT_TRUE(in.analog[0].healthy);
  EXPECT_EQ(in.analog[0].age_us, 0u);
  // 100 mm of 0..500 mm: 4 + 16 * 0.2 = 7.2 mA.
  EXPECT_NEAR(in.analog[1].value, 7.2f, 1e-4f);
}

TEST(PlantSensors, TransducerSaturatesAtNe43Limits) {
  Rig rig = sensor_rig();
  rig.machine.analog_inputs[0].range_min = 20.0f;  // 4 mA at 20 bar, so 0 bar is below range
  auto p = build(rig);
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 400e5));
  core::InputImage in{};
  p->read_inputs(in);
  // Above range: clamps at 20.5 mA, still a valid measurement
  // (NAMUR NE 43, check-values section 2 [SRC] g-sensor.net).
  EXPECT_FLOAT_EQ(in.analog[0].value, 20.5f);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 0.0));
  p->read_inputs(in);
  EXPECT_FLOAT_EQ(in.analog[0].value, 3.8f);  // below range: 3.8 mA
}

TEST(PlantSensors, WireBreakReadsInTheNe43FailureLowBand) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->inject({FaultKind::kSensorWireBreak, "p_a", 0.0}));
  core::InputImage in{};
  p->read_inputs(in);
  // An open loop carries no current: <= 3.6 mA is a failure
  // (NAMUR NE 43, check-values section 2 [SRC]; the inclusive bound [MEM]).
  EXPECT_LE(in.analog[0].value, 3.6f);
  // An engineering-unit input has no live zero: flagged unhealthy instead.
  ASSERT_TRUE(p->inject({FaultKind::kSensorWireBreak, "p_eng", 0.0}));
  p->read_inputs(in);
  EXPECT_FALSE(in.analog[2].healthy);
}

TEST(PlantSensors, TransmitterFailureSignalsUseNe43Levels) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  core::InputImage in{};
  ASSERT_TRUE(p->inject({FaultKind::kSensorFailHigh, "p_a", 0.0}));
  p->read_inputs(in);
  EXPECT_GE(in.analog[0].value, 21.0f);  // >= 21 mA (NE 43, check-values section 2)
  ASSERT_TRUE(p->inject({FaultKind::kSensorFailLow, "p_a", 0.0}));
  p->read_inputs(in);
  EXPECT_LE(in.analog[0].value, 3.6f);
}

TEST(PlantSensors, StuckAndDriftingTransducers) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->inject({FaultKind::kSensorStuck, "x", 0.0}));
  ASSERT_TRUE(p->inject({FaultKind::kSensorDrift, "p_eng", 10.0}));  // 10 bar/s
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  run(*p, 0.5);
  core::InputImage in{};
  p->read_inputs(in);
  EXPECT_NEAR(in.analog[1].value, 7.2f, 1e-4f);  // frozen at 100 mm although the rod moved
  EXPECT_GT(p->cylinder_position("cyl"), 0.15);
  const double true_bar = p->node_pressure("pump") / 1e5;
  EXPECT_NEAR(in.analog[2].value, true_bar + 5.0, 1e-3);
  p->clear_faults();
  p->read_inputs(in);
  EXPECT_NEAR(in.analog[2].value, true_bar, 1e-3);
}

TEST(PlantSensors, LimitSwitchSwitchesWithHysteresis) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  core::InputImage in{};
  ASSERT_TRUE(p->set_cylinder_state("cyl", 0.1999, 0.0));
  p->read_inputs(in);
  EXPECT_FALSE(in.digital[0]);
  ASSERT_TRUE(p->set_cylinder_state("cyl", 0.2000, 0.0));
  p->read_inputs(in);
  EXPECT_TRUE(in.digital[0]);
  ASSERT_TRUE(p->set_cylinder_state("cyl", 0.1960, 0.0));  // within the 5 mm hysteresis
  p->read_inputs(in);
  EXPECT_TRUE(in.digital[0]);
  ASSERT_TRUE(p->set_cylinder_state("cyl", 0.1949, 0.0));
  p->read_inputs(in);
  EXPECT_FALSE(in.digital[0]);
}

TEST(PlantSensors, PressureSwitchSwitchesWithHysteresis) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 105e5));
  core::InputImage in{};
  p->read_inputs(in);
  EXPECT_TRUE(in.digital[1]);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 95e5));  // within 10 bar hysteresis
  p->read_inputs(in);
  EXPECT_TRUE(in.digital[1]);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 89e5));
  p->read_inputs(in);
  EXPECT_FALSE(in.digital[1]);
}

TEST(PlantOutputs, SolenoidCoilsShiftTheSpoolInItsSwitchTime) {
  Rig rig = sensor_rig();
  auto p = build(rig);
  ASSERT_TRUE(p);
  const core::FunctionConfig& f = rig.machine.functions[0];
  core::OutputImage out{};
  out.coils[f.coil_extend] = true;
  p->apply_outputs(out);
  ASSERT_TRUE(p->advance(2.5e-3));  // half the 5 ms switch time
  EXPECT_NEAR(p->spool_position("f"), 0.5, 0.02);
  run(*p, 0.01);
  EXPECT_NEAR(p->spool_position("f"), 1.0, 1e-3);
  out.coils[f.coil_retract] = true;  // both coils: spring centre
  p->apply_outputs(out);
  run(*p, 0.01);
  EXPECT_NEAR(p->spool_position("f"), 0.0, 1e-3);
}

TEST(PlantOutputs, ProportionalChannelsSetTheSpoolTarget) {
  Rig rig = sensor_rig(ValveKind::kProportional43SignedCommand);
  auto p = build(rig);
  ASSERT_TRUE(p);
  core::OutputImage out{};
  out.prop[rig.machine.functions[0].prop_extend].value = -40.0f;  // percent
  p->apply_outputs(out);
  run(*p, 0.05);  // 5 ms first-order time constant
  EXPECT_NEAR(p->spool_position("f"), -0.4, 1e-3);

  Rig two = sensor_rig(ValveKind::kProportional43TwoSolenoid);
  auto q = build(two);
  ASSERT_TRUE(q);
  core::OutputImage o2{};
  o2.prop[two.machine.functions[0].prop_extend].value = 600.0f;  // mA of 800 max
  q->apply_outputs(o2);
  run(*q, 0.05);
  EXPECT_NEAR(q->spool_position("f"), 0.75, 1e-3);
}

TEST(PlantOutputs, DetentedValveHoldsItsLastSide) {
  Rig rig = single_cylinder(ValveKind::kSolenoid42Detented, ValveCentre::kNotApplicable);
  auto p = build(rig);
  ASSERT_TRUE(p);
  core::OutputImage out{};
  out.coils[rig.machine.functions[0].coil_extend] = true;
  p->apply_outputs(out);
  run(*p, 0.02);
  out.coils[rig.machine.functions[0].coil_extend] = false;  // pulse over
  p->apply_outputs(out);
  run(*p, 0.02);
  EXPECT_NEAR(p->spool_position("f"), 1.0, 1e-3);
}

TEST(PlantOutputs, SpringReturnValveReturnsWhenDeEnergised) {
  Rig rig = single_cylinder(ValveKind::kSolenoid42SpringReturn, ValveCentre::kNotApplicable);
  auto p = build(rig);
  ASSERT_TRUE(p);
  EXPECT_NEAR(p->spool_position("f"), -1.0, 1e-12);  // spring position = retract side
  core::OutputImage out{};
  out.coils[rig.machine.functions[0].coil_extend] = true;
  p->apply_outputs(out);
  run(*p, 0.02);
  EXPECT_NEAR(p->spool_position("f"), 1.0, 1e-3);
  p->apply_outputs(core::OutputImage{});
  run(*p, 0.02);
  EXPECT_NEAR(p->spool_position("f"), -1.0, 1e-3);
}

TEST(PlantOutputs, PowerUnitMotorAndDumpValveComeFromTheCore) {
  const core::MachineConfig machine = demo_machine();
  auto p = build(Rig{machine, demo_plant_json()});
  ASSERT_TRUE(p);
  core::OutputImage out{};
  run(*p, 0.1);
  EXPECT_NEAR(p->snapshot().get("pump.q_l_min"), 0.0, 1e-12);  // motor off
  out.coils[machine.power_unit.motor_coil] = true;             // motor on, dump open
  p->apply_outputs(out);
  run(*p, 0.2);
  EXPECT_LT(p->node_pressure("pump"), 10e5);
  out.coils[machine.power_unit.dump_coil] = true;  // dump closed: loaded; all valves centred
  p->apply_outputs(out);
  run(*p, 0.2);
  // Both valves have tandem centres, the press through the clamp: the pump
  // pressure is only the drop of the two centre passages in series.
  EXPECT_LT(p->node_pressure("pump"), 10e5);
  EXPECT_GT(p->node_pressure("pump"), 0.5e5);
}

TEST(PlantFaults, CoilOpenLeavesTheSpoolCentred) {
  Rig rig = sensor_rig();
  auto p = build(rig);
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->inject({FaultKind::kCoilOpen, "f_extend", 0.0}));
  core::OutputImage out{};
  out.coils[rig.machine.functions[0].coil_extend] = true;
  p->apply_outputs(out);
  run(*p, 0.05);
  EXPECT_NEAR(p->spool_position("f"), 0.0, 1e-6);
  EXPECT_FALSE(p->inject({FaultKind::kCoilShort, "no_such_coil", 0.0}));
}

TEST(PlantFaults, StuckSpoolIgnoresItsCommand) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  run(*p, 0.05);
  ASSERT_TRUE(p->inject({FaultKind::kStuckSpool, "f", 0.0}));
  ASSERT_TRUE(p->set_spool_target("f", 0.0));
  run(*p, 0.2);
  EXPECT_NEAR(p->spool_position("f"), 1.0, 1e-3);
  EXPECT_GT(p->cylinder_velocity("cyl"), 0.1);  // still moving
}

TEST(PlantFaults, PumpFailureStopsTheFlow) {
  auto p = build(sensor_rig());
  ASSERT_TRUE(p);
  ASSERT_TRUE(p->set_spool_target("f", 1.0));
  run(*p, 0.3);
  ASSERT_TRUE(p->inject({FaultKind::kPumpFailure, "", 0.0}));
  // The rod coasts on, the A side cavitates, and the cavity closes again
  // as the vacuum pulls the rod back: all over within about 0.4 s.
  run(*p, 0.6);
  EXPECT_NEAR(p->snapshot().get("pump.q_l_min"), 0.0, 1e-12);
  EXPECT_NEAR(p->cylinder_velocity("cyl"), 0.0, 1e-3);
}

TEST(PlantFaults, SealLeakLetsAClosedCentreLoadCreep) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed);
  rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
  auto p = build(rig);
  ASSERT_TRUE(p);
  p->set_pump(false, false);
  ASSERT_TRUE(p->set_node_pressure("cyl.A", 50e5));
  ASSERT_TRUE(p->set_node_pressure("cyl.B", 50e5 * kAreaA / kAreaB));
  run(*p, 0.2);
  const double x1 = p->cylinder_position("cyl");
  ASSERT_TRUE(p->inject({FaultKind::kSealLeak, "cyl", 1000.0}));  // mm^3/s per bar
  run(*p, 1.0);
  // Oil passes B -> A: the rod creeps out until both pressures meet.
  EXPECT_GT(p->cylinder_position("cyl") - x1, 1e-4);
}

TEST(PlantFaults, SuddenLoadChangeMovesAHeldLoad) {
  Rig rig = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kFloat);
  rig.plant["cylinders"][0]["viscous_n_s_m"] = 20000;
  auto p = build(rig);
  ASSERT_TRUE(p);
  p->set_pump(false, false);
  run(*p, 0.1);
  EXPECT_NEAR(p->cylinder_velocity("cyl"), 0.0, 1e-6);
  ASSERT_TRUE(p->inject({FaultKind::kLoadChange, "cyl", 5000.0}));  // pushes the rod in
  run(*p, 0.2);
  EXPECT_LT(p->cylinder_velocity("cyl"), -0.01);
}

TEST(PlantCircuit, ThroughPassageFeedsTheDownstreamValveOnlyWhenUpstreamIsCentred) {
  const core::MachineConfig machine = demo_machine();
  auto p = build(Rig{machine, demo_plant_json()});
  ASSERT_TRUE(p);
  p->set_pump(true, true);
  ASSERT_TRUE(p->set_spool_target("press", 1.0));
  ASSERT_TRUE(p->set_spool_target("clamp", 1.0));  // clamp shifted: through passage closed
  run(*p, 0.15);
  EXPECT_NEAR(p->cylinder_velocity("press_cyl"), 0.0, 1e-3);
  EXPECT_GT(p->cylinder_velocity("clamp_cyl"), 0.1);
  ASSERT_TRUE(p->set_spool_target("clamp", 0.0));  // centred: P carries on to the press
  run(*p, 0.2);
  const double x1 = p->cylinder_position("press_cyl");
  run(*p, 0.2);
  // Mean speed 27.55 L/min on the 63 mm bore: 0.1473 m/s (continuity, check-values 5.2 method).
  EXPECT_NEAR((p->cylinder_position("press_cyl") - x1) / 0.2, 27.55 / 60000.0 / kAreaA, 0.002);
}

TEST(PlantCircuit, PilotOperatedCheckHoldsTheClampAndOpensOnRetract) {
  const core::MachineConfig machine = demo_machine();
  auto p = build(Rig{machine, demo_plant_json()});
  ASSERT_TRUE(p);
  p->set_pump(true, true);
  ASSERT_TRUE(p->set_spool_target("clamp", 1.0));
  run(*p, 0.5);
  const double clamped = p->node_pressure("clamp_cyl.A");
  EXPECT_GT(clamped, 150e5);
  ASSERT_TRUE(p->set_spool_target("clamp", 0.0));
  run(*p, 1.0);
  // Centred (tandem: A and B blocked at the valve; the check holds A).
  EXPECT_NEAR(p->node_pressure("clamp_cyl.A"), clamped, 0.02 * clamped);
  ASSERT_TRUE(p->set_spool_target("clamp", -1.0));  // P -> B pilots the check open
  run(*p, 0.4);
  EXPECT_LT(p->cylinder_position("clamp_cyl"), 0.005);
}

TEST(PlantCircuit, CheckValveHoldsABlockThatAnOnOffValveDrains) {
  MachineBuilder m("block_rig");
  m.coil("drain");
  Rig rig;
  rig.machine = m.config();
  rig.plant = nlohmann::json::parse(R"({
    "pump": {"displacement_cm3": 20, "speed_rpm": 1500, "volumetric_efficiency": 1.0, "line_volume_cm3": 200},
    "relief": {"cracking_bar": 100},
    "volumes": [{"name": "block", "volume_cm3": 500}],
    "check_valves": [{"name": "feed", "from": "pump", "to": "block", "cracking_bar": 1, "rated_flow_l_min": 40}],
    "orifices": [{"name": "pump_bleed", "from": "pump", "to": "tank", "area_mm2": 0.2}],
    "on_off_valves": [{"name": "drain_valve", "coil": "drain", "from": "block", "to": "tank", "rated_flow_l_min": 20}]
  })");
  auto p = build(rig);
  ASSERT_TRUE(p);
  run(*p, 0.5);
  const double charged = p->node_pressure("block");
  EXPECT_GT(charged, 95e5);  // filled through the check up to the relief setting
  p->set_pump(false, false);
  run(*p, 1.0);
  EXPECT_LT(p->node_pressure("pump"), 5e5);                     // the pump line bleeds down
  EXPECT_NEAR(p->node_pressure("block"), charged, 0.01 * charged);  // the check holds the block
  core::OutputImage out{};
  out.coils[0] = true;  // open the normally closed 2/2 valve
  p->apply_outputs(out);
  run(*p, 0.3);
  EXPECT_LT(p->node_pressure("block"), 1e5);
}

}  // namespace
}  // namespace spoolstep::hostsim::test

// Behaviour of one scan and of scan sequences: safe states, stops, inputs.
#include <gtest/gtest.h>

#include <random>

#include "test_rig.hpp"

namespace spoolstep::core {
namespace {

using namespace testing;

TEST(PowerUp, AllOutputsOffAndNoMotionUntilReset) {
  Rig rig(make_test_machine(true));
  ASSERT_TRUE(rig.init_status_ok);
  rig.in.digital[kJogClampExt] = true;  // held through power-up
  rig.in.digital[kAutoSel] = true;
  rig.in.digital[kStart] = true;
  rig.in.commands.pump_start = true;
  for (int i = 0; i < 500; ++i) {
    ASSERT_TRUE(all_outputs_off(rig.scan())) << "scan " << i;
  }
  EXPECT_EQ(rig.diag().state, MachineState::kPowerUp);
}

TEST(PowerUp, ButtonHeldThroughPowerUpIsNotAReset) {
  Rig rig(make_test_machine());
  rig.in.digital[kReset] = true;
  rig.run_ms(100);
  EXPECT_EQ(rig.diag().state, MachineState::kPowerUp);
}

TEST(PowerUp, ResetArmsButDoesNotMove) {
  Rig rig(make_test_machine());
  rig.arm(false);
  EXPECT_EQ(rig.diag().state, MachineState::kManual);
  rig.run_ms(100);
  EXPECT_TRUE(no_valve_driven(rig.out));
}

TEST(Jog, HoldToRunAndReleaseStops) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.scan();
  EXPECT_TRUE(rig.out.coils[kClampY1]);
  rig.in.digital[kJogClampExt] = false;
  rig.scan();
  EXPECT_FALSE(rig.out.coils[kClampY1]) << "release stops in the same scan";
}

TEST(Jog, BothDirectionsAtOnceMeansNeither) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.in.digital[kJogClampRet] = true;
  rig.run_ms(10);
  EXPECT_FALSE(rig.out.coils[kClampY1]);
  EXPECT_FALSE(rig.out.coils[kClampY2]);
}

TEST(Reversal, SolenoidValvePassesThroughCentreForTheDwell) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(20);
  rig.in.digital[kJogClampExt] = false;
  rig.in.digital[kJogClampRet] = true;
  int centred_scans = 0;
  while (!rig.scan().coils[kClampY2] && centred_scans < 1000) {
    EXPECT_FALSE(rig.out.coils[kClampY1]);
    ++centred_scans;
  }
  // Dwell 50 ms at 1 ms scans: the retract coil comes on after 50 centred scans.
  EXPECT_NEAR(centred_scans, 50, 1);
}

TEST(EmergencyStop, OutputsOffInTheSameScan) {
  // IEC 60204-1 9.2.2 stop category 0: immediate removal of power to the actuators;
  // ISO 13850: the emergency stop overrides all other functions in all modes.
  Rig rig(make_test_machine(true));
  rig.arm(false);
  rig.start_pump();
  rig.run_ms(1200);
  rig.set_ma(kPressPressure, 4.0f + 16.0f * 50.0f / 250.0f);  // 50 bar: ready
  rig.run_ms(5);
  ASSERT_EQ(rig.diag().power_unit, PowerUnitState::kReady);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(100);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  ASSERT_TRUE(rig.out.coils[kClampY1]);
  rig.in.digital[kEstopOk] = false;
  EXPECT_TRUE(all_outputs_off(rig.scan())) << "same scan";
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
  EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kEmergencyStop));
}

TEST(EmergencyStop, LatchedUntilReleasedAndReset_ResetDoesNotRestart) {
  // ISO 13850: the command is maintained until reset; reset alone does not restart.
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;  // operator keeps holding jog throughout
  rig.in.digital[kEstopOk] = false;
  rig.run_ms(10);
  rig.press(kReset);
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted) << "reset refused while pressed";
  rig.in.digital[kEstopOk] = true;
  rig.run_ms(10);
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted) << "release alone does not clear";
  EXPECT_TRUE(all_outputs_off(rig.out));
  rig.in.digital[kReset] = true;
  EXPECT_TRUE(no_valve_driven(rig.scan())) << "the reset scan itself moves nothing";
  rig.in.digital[kReset] = false;
  EXPECT_EQ(rig.diag().state, MachineState::kManual);
  rig.run_ms(100);
  EXPECT_TRUE(no_valve_driven(rig.out)) << "a jog held through the reset must be pressed again";
  rig.in.digital[kJogClampExt] = false;
  rig.scan();
  rig.in.digital[kJogClampExt] = true;
  rig.scan();
  EXPECT_TRUE(rig.out.coils[kClampY1]) << "a fresh hold-to-run works";
}

TEST(EmergencyStop, Category1RampsDownThenRemovesPower) {
  MachineConfig c = make_test_machine();
  c.operator_panel.estop_category = StopCategory::kCat1;
  Rig rig(c);
  rig.arm(false);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  const float full = rig.out.prop[kPressYa].value;
  ASSERT_GT(full, 300.0f);
  rig.in.digital[kEstopOk] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kStopping);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f) << "controlled stop keeps metering";
  EXPECT_LT(rig.out.prop[kPressYa].value, full);
  rig.run_ms(60);  // quick stop 50 ms per full scale, jog speed 20 %
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
  EXPECT_TRUE(all_outputs_off(rig.out)) << "then power is removed";
}

TEST(Permissive, LossStopsGuardedMotionWithItsCategory) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  ASSERT_GT(rig.out.prop[kPressYa].value, 0.0f);
  rig.in.digital[kGuardClosed] = false;  // category 1 permissive: quick-stop ramp
  rig.scan();
  EXPECT_TRUE(rig.diag().functions[kPress].blocked);
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f) << "ramping, not cut";
  rig.run_ms(15);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "20 % at 50 ms per full scale: 10 ms";
  EXPECT_EQ(rig.diag().state, MachineState::kManual) << "a permissive does not latch";
  rig.in.digital[kGuardClosed] = true;
  rig.run_ms(50);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f)
      << "closing the guard does not restart a jog that is still held";
  rig.in.commands.jog[kPress] = Direction::kNone;
  rig.scan();
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.scan();
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f) << "a fresh hold-to-run works";
}

TEST(Permissive, Category0CutsAtOnce) {
  MachineConfig c = make_test_machine();
  c.interlocks[kGuardPermissive].stop_category = StopCategory::kCat0;
  Rig rig(c);
  rig.arm(false);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(300);
  rig.in.digital[kGuardClosed] = false;
  rig.scan();
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f);
}

TEST(Permissive, BlocksStart) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kGuardClosed] = false;
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(20);
  EXPECT_FALSE(rig.out.coils[kClampY1]);
  rig.in.digital[kJogClampRet] = true;  // clamp retract is not guarded
  rig.in.digital[kJogClampExt] = false;
  rig.run_ms(100);
  EXPECT_TRUE(rig.out.coils[kClampY2]);
}

TEST(Trip, LatchesUntilResetAndResetDoesNotRestart) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(5);
  ASSERT_TRUE(rig.out.coils[kClampY1]);
  rig.in.digital[kOilLevelOk] = false;
  rig.scan();
  EXPECT_TRUE(all_outputs_off(rig.out)) << "category 0 trip";
  rig.in.digital[kOilLevelOk] = true;  // cause gone, still latched
  rig.run_ms(50);
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
  EXPECT_TRUE(rig.diag().interlock_latched & (1u << kOilTrip));
  EXPECT_FALSE(rig.out.coils[kClampY1]);
  rig.press(kReset);
  EXPECT_EQ(rig.diag().state, MachineState::kManual);
  EXPECT_EQ(rig.diag().interlock_latched, 0u);
  rig.run_ms(100);
  EXPECT_FALSE(rig.out.coils[kClampY1]) << "jog still held, but reset does not restart it";
}

TEST(Trip, ResetRefusedWhileCausePersists) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kOilLevelOk] = false;
  rig.run_ms(5);
  rig.press(kReset);
  EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
}

TEST(Inputs, Ne43FailureCurrentsStopMotion) {
  // NAMUR NE 43 (check-values.md §2): <= 3.6 mA failure low, >= 21 mA failure high;
  // 3.8..20.5 mA valid (saturation outside 4..20).
  struct Case { float ma; bool fault; const char* why; };
  const Case cases[] = {{3.6f, true, "3.6 mA: failure low"},
                        {2.0f, true, "wire break"},
                        {21.0f, true, "21 mA: failure high"},
                        {22.5f, true, "well above"},
                        {3.8f, false, "3.8 mA: low saturation, valid"},
                        {20.5f, false, "20.5 mA: high saturation, valid"},
                        {12.0f, false, "mid scale"}};
  for (const Case& k : cases) {
    Rig rig(make_test_machine());
    rig.arm(false);
    rig.in.commands.jog[kPress] = Direction::kExtend;
    rig.run_ms(100);
    rig.set_ma(kPressPosition, k.ma);
    rig.scan();
    EXPECT_EQ(has_fault(rig.diag(), FaultCode::kAnalogInputFault), k.fault) << k.why;
    EXPECT_EQ(rig.out.prop[kPressYa].value == 0.0f, k.fault) << k.why;
  }
}

TEST(Inputs, Ne43ScalingMatchesReferenceVectors) {
  // check-values.md §2 vectors: PV % = (I - 4) / 16 * 100.
  Rig rig(make_test_machine());
  const float ma[] = {3.8f, 4.0f, 12.0f, 20.0f, 20.5f};
  const float percent[] = {-1.25f, 0.0f, 50.0f, 100.0f, 103.125f};
  for (int i = 0; i < 5; ++i) {
    rig.set_ma(kPressPosition, ma[i]);
    rig.scan();
    EXPECT_NEAR(rig.diag().analog_value[kPressPosition], 5.0f * percent[i], 1e-3f);
  }
}

TEST(Inputs, StaleAnalogAndDigitalImagesFault) {
  {
    Rig rig(make_test_machine());
    rig.arm(false);
    rig.in.analog[kPressPressure].age_us = 60000;  // limit 50 ms
    rig.scan();
    EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kAnalogInputFault));
    EXPECT_EQ(rig.diag().state, MachineState::kFaulted);
  }
  {
    Rig rig(make_test_machine());
    rig.arm(false);
    rig.in.digital_age_us = 50001;
    rig.scan();
    EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kDigitalInputsStale));
  }
  {
    Rig rig(make_test_machine());
    rig.arm(false);
    rig.in.analog[kPressPressure].healthy = false;
    rig.scan();
    EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kAnalogInputFault));
  }
}

TEST(Watchdog, LateScanForcesSafeOutputs) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  rig.run_ms(10);
  ASSERT_TRUE(rig.out.coils[kClampY1]);
  rig.scan(25000);  // watchdog 20 ms
  EXPECT_TRUE(all_outputs_off(rig.out));
  EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kScanWatchdog));
  rig.in.digital[kJogClampExt] = false;
  rig.run_ms(5);
  rig.press(kReset);
  EXPECT_EQ(rig.diag().state, MachineState::kManual) << "cleared once scans are on time";
}

TEST(Time, WrapOfTheMicrosecondCounterIsHarmless) {
  Rig rig(make_test_machine(), 0xFFFFFFFFu - 200000u);  // wraps after 200 ms
  rig.arm(false);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  std::vector<float> values;
  rig.run_ms(400, [&] { values.push_back(rig.out.prop[kPressYa].value); });
  EXPECT_FALSE(has_fault(rig.diag(), FaultCode::kScanWatchdog));
  for (std::size_t i = 1; i < values.size(); ++i) {
    ASSERT_GE(values[i], values[i - 1]) << "ramp monotonic across the wrap at " << i;
  }
}

TEST(ProportionalOutput, DeadbandJumpToCrackCurrentAndFullScaleAtMax) {
  Rig rig(make_test_machine());
  rig.arm(false);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.scan();
  const float first = rig.out.prop[kPressYa].value;
  EXPECT_GT(first, 300.0f) << "first step above zero jumps over the deadband";
  EXPECT_LT(first, 305.0f);
  EXPECT_EQ(rig.out.prop[kPressYa].dither_amplitude_ma, 40.0f);
  EXPECT_EQ(rig.out.prop[kPressYa].dither_frequency_hz, 120.0f);
  rig.run_ms(200);
  // Jog 20 %: crack + 0.2 * (max - crack).
  EXPECT_NEAR(rig.out.prop[kPressYa].value, 300.0f + 0.2f * 500.0f, 1e-3f);
  EXPECT_EQ(rig.out.prop[kPressYb].value, 0.0f);
}

TEST(PowerUnit, UnloadedStartThenLoadThenReady) {
  Rig rig(make_test_machine(true));
  rig.arm(false);
  rig.start_pump();
  EXPECT_TRUE(rig.out.coils[kPumpMotor]);
  EXPECT_FALSE(rig.out.coils[kDump]) << "starts unloaded";
  rig.run_ms(1000);
  EXPECT_TRUE(rig.out.coils[kDump]);
  EXPECT_EQ(rig.diag().power_unit, PowerUnitState::kLoading);
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(10);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "no motion before pressure ready";
  rig.set_ma(kPressPressure, 4.0f + 16.0f * 30.0f / 250.0f);
  rig.run_ms(10);
  EXPECT_EQ(rig.diag().power_unit, PowerUnitState::kReady);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "pressure coming up does not start a held jog";
  rig.in.commands.jog[kPress] = Direction::kNone;
  rig.scan();
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.scan();
  EXPECT_GT(rig.out.prop[kPressYa].value, 0.0f);
}

TEST(PowerUnit, PressureNotReadyInTimeFaults) {
  Rig rig(make_test_machine(true));
  rig.arm(false);
  rig.start_pump();
  rig.run_ms(4100);
  EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kPressureNotReady));
  EXPECT_FALSE(rig.out.coils[kPumpMotor]);
}

TEST(PowerUnit, TripGuardingThePumpBlocksStart) {
  Rig rig(make_test_machine(true));
  rig.arm(false);
  rig.in.digital[kOilLevelOk] = false;
  rig.in.commands.pump_start = true;
  rig.run_ms(10);
  EXPECT_FALSE(rig.out.coils[kPumpMotor]);
}

TEST(DetentedValve, PulsesToShiftAndHoldsWhenPowerIsRemoved) {
  MachineConfig c = make_test_machine();
  c.functions[kClamp].valve = ValveKind::kSolenoid42Detented;
  c.functions[kClamp].centre = ValveCentre::kNotApplicable;
  c.functions[kClamp].detent_pulse_us = 100000;
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kJogClampExt] = true;
  int on = 0;
  rig.run_ms(300, [&] { on += rig.out.coils[kClampY1] ? 1 : 0; });
  EXPECT_NEAR(on, 100, 1) << "one pulse of detent_pulse_us, not a held coil";
  EXPECT_EQ(rig.diag().functions[kClamp].detent_side, Direction::kExtend);
  rig.in.digital[kEstopOk] = false;
  rig.scan();
  EXPECT_EQ(rig.diag().functions[kClamp].detent_side, Direction::kExtend)
      << "a detented spool keeps its side: the core reports it, it cannot centre it";
}

TEST(Invariant, BothSolenoidsNeverOnUnderRandomCommands) {
  // Property test: random jog, mode, guard, e-stop, reset and step inputs for
  // many scans; at no scan are both coils (or both currents) of one valve on,
  // and no valve goes from one side to the other without a centred scan.
  std::mt19937 rng(20261202u);
  for (int run = 0; run < 20; ++run) {
    Rig rig(make_test_machine(run % 2 == 0));
    std::uniform_int_distribution<int> pick(0, 99);
    bool prev_a = false, prev_b = false, prev_ya = false, prev_yb = false;
    for (int scan = 0; scan < 5000; ++scan) {
      const int r = pick(rng);
      if (r < 10) rig.in.digital[kJogClampExt] = !rig.in.digital[kJogClampExt];
      else if (r < 20) rig.in.digital[kJogClampRet] = !rig.in.digital[kJogClampRet];
      else if (r < 30) rig.in.commands.jog[kPress] = static_cast<Direction>(pick(rng) % 3);
      else if (r < 33) rig.in.digital[kReset] = !rig.in.digital[kReset];
      else if (r < 35) rig.in.digital[kAutoSel] = !rig.in.digital[kAutoSel];
      else if (r < 38) rig.in.digital[kStart] = !rig.in.digital[kStart];
      else if (r < 40) rig.in.digital[kGuardClosed] = !rig.in.digital[kGuardClosed];
      else if (r < 41) rig.in.digital[kEstopOk] = !rig.in.digital[kEstopOk];
      else if (r < 46) rig.in.digital[kClampClosed] = !rig.in.digital[kClampClosed];
      else if (r < 50) rig.in.digital[kPressDown] = !rig.in.digital[kPressDown];
      else if (r < 54) rig.in.digital[kPressUp] = !rig.in.digital[kPressUp];
      else if (r < 56) rig.in.commands.pump_start = !rig.in.commands.pump_start;
      else if (r < 58) rig.set_ma(kPressPressure, 4.0f + static_cast<float>(pick(rng)) * 0.16f);
      const OutputImage& out = rig.scan(r == 99 ? 1500 : 1000);
      const bool a = out.coils[kClampY1], b = out.coils[kClampY2];
      const bool ya = out.prop[kPressYa].value > 0.0f, yb = out.prop[kPressYb].value > 0.0f;
      ASSERT_FALSE(a && b) << "run " << run << " scan " << scan;
      ASSERT_FALSE(ya && yb) << "run " << run << " scan " << scan;
      ASSERT_FALSE((prev_a && b) || (prev_b && a)) << "clamp reversed without centre, scan " << scan;
      ASSERT_FALSE((prev_ya && yb) || (prev_yb && ya)) << "press reversed without centre, scan " << scan;
      prev_a = a; prev_b = b; prev_ya = ya; prev_yb = yb;
    }
  }
}

// Runs a fixed scripted scenario and returns the output trace.
std::vector<OutputImage> scripted_trace() {
  Rig rig(make_test_machine(true));
  std::vector<OutputImage> trace;
  auto record = [&] { trace.push_back(rig.out); };
  rig.arm(true);
  rig.in.commands.pump_start = true;
  rig.run_ms(2, record);
  rig.in.commands.pump_start = false;
  rig.run_ms(1000, record);
  rig.set_ma(kPressPressure, 8.0f);
  rig.run_ms(10, record);
  rig.in.digital[kStart] = true;
  rig.run_ms(3, record);
  rig.in.digital[kStart] = false;
  rig.run_ms(50, record);
  rig.in.digital[kClampClosed] = true;
  rig.in.digital[kPressUp] = false;
  rig.run_ms(700, record);
  rig.in.digital[kGuardClosed] = false;
  rig.run_ms(30, record);
  rig.in.digital[kGuardClosed] = true;
  rig.run_ms(300, record);
  return trace;
}

TEST(Determinism, SameInputsSameOutputsBitForBit) {
  const auto first = scripted_trace();
  const auto second = scripted_trace();
  ASSERT_EQ(first.size(), second.size());
  for (std::size_t i = 0; i < first.size(); ++i) {
    ASSERT_EQ(std::memcmp(&first[i], &second[i], sizeof(OutputImage)), 0) << "scan " << i;
  }
}

TEST(Config, InvalidConfigurationHoldsEverythingOff) {
  MachineConfig c = make_test_machine();
  c.functions[kPress].prop_retract = kPressYa;  // one channel, two owners
  Rig rig(c, 0, Rig::Expect::kInvalid);
  EXPECT_FALSE(rig.init_status_ok);
  rig.in.digital[kReset] = true;
  for (int i = 0; i < 20; ++i) EXPECT_TRUE(all_outputs_off(rig.scan()));
  EXPECT_TRUE(has_fault(rig.diag(), FaultCode::kConfigInvalid));
}

TEST(Config, ValidationCatchesBadReferences) {
  struct Case { void (*mutate)(MachineConfig&); StatusCode code; const char* why; };
  const Case cases[] = {
      {[](MachineConfig& c) { c.nodes[0].a = 60; }, StatusCode::kIndexOutOfRange, "digital input beyond count"},
      {[](MachineConfig& c) { c.nodes[7].a = 9; }, StatusCode::kBadOrder, "not reads a later node"},
      {[](MachineConfig& c) { c.functions[kClamp].coil_retract = kPumpMotor; c.power_unit.present = true; c.power_unit.motor_coil = kPumpMotor; }, StatusCode::kOutputShared, "coil with two owners"},
      {[](MachineConfig& c) { c.functions[kPress].current_extend.crack_ma = 900.0f; }, StatusCode::kBadValue, "crack above max"},
      {[](MachineConfig& c) { c.operator_panel.estop_category = StopCategory::kCat2; }, StatusCode::kBadValue, "IEC 60204-1: e-stop is category 0 or 1"},
      {[](MachineConfig& c) { c.transitions[0].to_step = 40; }, StatusCode::kIndexOutOfRange, "transition to a missing step"},
      {[](MachineConfig& c) { c.functions[kPress].ramp_count = 0; }, StatusCode::kBadValue, "proportional function without a ramp"},
      {[](MachineConfig& c) { c.steps[2].actions[1].ramp = 3; }, StatusCode::kIndexOutOfRange, "step uses a ramp the function lacks"},
      {[](MachineConfig& c) { c.functions[kClamp].coil_retract = kNoIndex8; }, StatusCode::kMissingOutput, "4/3 solenoid valve needs two coils"},
  };
  for (const Case& k : cases) {
    MachineConfig c = make_test_machine();
    k.mutate(c);
    const Status s = validate_config(c);
    EXPECT_EQ(s.code(), k.code) << k.why << " (" << s.where() << " " << s.index() << ")";
  }
  EXPECT_TRUE(validate_config(make_test_machine(true)).is_ok());
}

// Soft commands act only where the machine file enables them; a refused one
// is logged once when it is given (the old core OR-ed every soft command in).
TEST(SoftCommands, ACommandTheFileDoesNotEnableIsRefusedAndLogged) {
  MachineConfig c = make_test_machine();
  c.operator_panel.soft_commands = soft_command_bit(SoftCommand::kPumpStart);  // no jog
  Rig rig(c);
  rig.arm(false);
  rig.in.digital[kPressUp] = false;
  rig.in.commands.jog[kPress] = Direction::kExtend;
  rig.run_ms(200);
  EXPECT_EQ(rig.out.prop[kPressYa].value, 0.0f) << "a soft jog the file does not enable moved the ram";
  int refusals = 0;
  for (std::uint32_t i = 0; i < rig.diag().events.size(); ++i) {
    const Event& e = rig.diag().events.at(i);
    if (e.code == EventCode::kSoftCommandRefused) {
      ++refusals;
      EXPECT_EQ(e.subject, static_cast<std::uint8_t>(SoftCommand::kJog));
    }
  }
  EXPECT_EQ(refusals, 1) << "logged once while held, not every scan";
  rig.in.digital[kJogClampExt] = true;  // the physical jog still works
  rig.run_ms(5);
  EXPECT_TRUE(rig.out.coils[kClampY1]);
}

TEST(SoftCommands, AnEnabledCommandActsLikeItsPanelInput) {
  MachineConfig c = make_test_machine();
  c.operator_panel.soft_commands = soft_command_bit(SoftCommand::kReset);
  Rig rig(c);
  rig.scan();
  rig.in.commands.reset = true;
  rig.scan();
  EXPECT_EQ(rig.diag().state, MachineState::kManual);
}

// A soft command never replaces a control the file requires from a
// physical device: a two-hand start, a mode selector.
TEST(SoftCommands, ValidationRefusesSoftCommandsThatReplaceAPhysicalControl) {
  ConfigBuilder b;
  b.c = make_test_machine();
  b.c.operator_panel.cycle_start = b.op(ConditionOp::kTwoHandHeld, 0, 0, "two_hand main");
  b.c.operator_panel.soft_commands = soft_command_bit(SoftCommand::kCycleStart);
  EXPECT_FALSE(validate_config(b.c).is_ok()) << "a soft cycle start replaced the two-hand start";
  MachineConfig c = make_test_machine();  // cycle start is a push button: a soft start may be enabled
  c.operator_panel.soft_commands = soft_command_bit(SoftCommand::kCycleStart);
  EXPECT_TRUE(validate_config(c).is_ok());
  c.operator_panel.soft_commands = soft_command_bit(SoftCommand::kSelectAuto);
  EXPECT_FALSE(validate_config(c).is_ok()) << "a soft select_auto overrode the key switch";
  c.operator_panel.auto_mode = kNoCondition;
  EXPECT_TRUE(validate_config(c).is_ok()) << "no selector: the mode may come from the HMI";
  c.operator_panel.soft_commands = 1u << kSoftCommandCount;
  EXPECT_FALSE(validate_config(c).is_ok()) << "a bit outside the table";
}

TEST(SoftCommands, TheTableNamesEveryCommandOnceInEnumOrder) {
  for (std::size_t i = 0; i < kSoftCommandCount; ++i) {
    EXPECT_EQ(static_cast<std::size_t>(kSoftCommandTable[i].command), i) << kSoftCommandTable[i].name;
    for (std::size_t k = 0; k < i; ++k) EXPECT_STRNE(kSoftCommandTable[i].name, kSoftCommandTable[k].name);
  }
}

TEST(SoftCommands, TheGivenMaskHasExactlyTheBitOfEachCommandSet) {
  for (const SoftCommandRow& row : kSoftCommandTable) {
    OperatorCommands commands;
    if (bool* flag = soft_command_flag(commands, row.command)) {
      *flag = true;
    } else {
      commands.jog[kMaxFunctions - 1] = Direction::kExtend;
    }
    EXPECT_EQ(soft_commands_given(commands), soft_command_bit(row.command)) << row.name;
  }
  EXPECT_EQ(soft_commands_given(OperatorCommands{}), 0u);
}

}  // namespace
}  // namespace spoolstep::core

// The one scan loop, driven through the recording fakes: what reaches the
// outputs at power-up, on an emergency stop, and when a port or the model
// behind them fails. Safe outputs on a failed port follow the hardware
// lifecycle rule of the house style: nothing goes on on stale data.
#include <gtest/gtest.h>

#include <atomic>

#include "spoolstep/io/clock.hpp"
#include "spoolstep/io/fakes.hpp"
#include "spoolstep/runtime/scan_loop.hpp"
#include "test_rig.hpp"

namespace spoolstep {
namespace {

using core::testing::kAutoSel;
using core::testing::kClampY1;
using core::testing::kEstopOk;
using core::testing::kGuardClosed;
using core::testing::kOilLevelOk;
using core::testing::kPressPosition;
using core::testing::kPressPressure;
using core::testing::kPressUp;
using core::testing::kReset;
using core::testing::kStart;
using io::OutputChange;

constexpr std::uint64_t kMs = 1000;

// The test machine at rest: e-stop released, guard closed, ram up, oil ok,
// both transmitters at 4 mA.
void machine_at_rest(core::InputImage& in) {
  in.digital[kEstopOk] = true;
  in.digital[kGuardClosed] = true;
  in.digital[kPressUp] = true;
  in.digital[kOilLevelOk] = true;
  for (std::uint8_t ai : {kPressPressure, kPressPosition}) {
    in.analog[ai].value = 4.0f;
    in.analog[ai].healthy = true;
  }
}

// A button pressed at `at_ms` for 10 ms.
void pulse(io::ScriptedInputPort& port, std::uint64_t at_ms, std::uint8_t di) {
  port.at(at_ms * kMs, [di](core::InputImage& in) { in.digital[di] = true; });
  port.at((at_ms + 10) * kMs, [di](core::InputImage& in) { in.digital[di] = false; });
}

// Reset at 100 ms, automatic at 150 ms, cycle start at 200 ms: the clamp's
// extend coil comes on with the start (the chain's first step).
void start_a_cycle(io::ScriptedInputPort& port) {
  port.at(0, machine_at_rest);
  pulse(port, 100, kReset);
  port.at(150 * kMs, [](core::InputImage& in) { in.digital[kAutoSel] = true; });
  pulse(port, 200, kStart);
}

std::vector<OutputChange> changes_of_coil(const io::RecordingOutputPort& out, std::uint8_t coil) {
  std::vector<OutputChange> found;
  for (const OutputChange& c : out.changes()) {
    if (c.channel == OutputChange::Channel::kCoil && c.index == coil) found.push_back(c);
  }
  return found;
}

class Steps final : public io::Steppable {
 public:
  std::uint64_t advanced_us = 0;
  std::uint64_t fail_after_us = ~0ull;

 private:
  io::PortStatus do_advance(std::uint64_t dt_us) override {
    if (advanced_us + dt_us > fail_after_us) {
      return io::PortStatus::failed(io::PortError::kModelFailed, "at 0.300 s: the model gave up on purpose");
    }
    advanced_us += dt_us;
    return io::PortStatus::ok();
  }
};

struct Loop {
  io::SimulatedClock clock;
  io::ScriptedInputPort input;
  io::RecordingOutputPort output{clock};
  core::MachineConfig machine = core::testing::make_test_machine();
  runtime::LoopResult run(std::uint64_t end_ms, io::Steppable* model = nullptr,
                          const std::atomic<bool>* stop = nullptr) {
    // A test machine the core refuses would test nothing but the refusal.
    EXPECT_TRUE(core::validate_config(machine).is_ok());
    runtime::ScanLoop loop(input, output, clock, model);
    return loop.run(machine, runtime::LoopSchedule{1000, end_ms * kMs}, stop);
  }
};

TEST(ScanLoop, PowerUpKeepsEveryOutputOffUntilResetAndStart) {
  Loop t;
  t.input.at(0, machine_at_rest);
  const runtime::LoopResult r = t.run(500);
  ASSERT_TRUE(r.completed()) << r.error;
  EXPECT_EQ(r.scans, 501u);
  EXPECT_EQ(t.output.writes(), 501u);
  EXPECT_TRUE(t.output.changes().empty()) << "nothing may come on before a reset and a start";
}

TEST(ScanLoop, CycleStartDrivesTheClampInTheScanOfTheStart) {
  Loop t;
  start_a_cycle(t.input);
  const runtime::LoopResult r = t.run(400);
  ASSERT_TRUE(r.completed()) << r.error;
  const auto clamp = changes_of_coil(t.output, kClampY1);
  ASSERT_FALSE(clamp.empty());
  EXPECT_EQ(clamp.front().time_us, 200 * kMs) << "stamped with the simulated clock at the start's scan";
  EXPECT_EQ(clamp.front().value, 1.0f);
}

// IEC 60204-1 9.2.5.4 (emergency stop, from memory): the stop acts at once;
// here, in the very scan the e-stop input opens.
TEST(ScanLoop, EmergencyStopRemovesEveryOutputInTheSameScan) {
  Loop t;
  start_a_cycle(t.input);
  t.input.at(300 * kMs, [](core::InputImage& in) { in.digital[kEstopOk] = false; });
  const runtime::LoopResult r = t.run(400);
  ASSERT_TRUE(r.completed()) << r.error;
  const auto clamp = changes_of_coil(t.output, kClampY1);
  ASSERT_EQ(clamp.size(), 2u);
  EXPECT_EQ(clamp[1].time_us, 300 * kMs);
  EXPECT_EQ(clamp[1].value, 0.0f);
  EXPECT_TRUE(t.output.last_is_all_off());
}

TEST(ScanLoop, InputReadErrorMidCycleWritesSafeOutputsInThatScanAndEndsTheRun) {
  Loop t;
  start_a_cycle(t.input);
  t.input.fail_from(300 * kMs, io::PortError::kTimeout, "the input card did not answer within 20 ms");
  const runtime::LoopResult r = t.run(1000);
  EXPECT_EQ(r.outcome, runtime::LoopOutcome::kInputFailed);
  EXPECT_EQ(r.scans, 300u) << "the core never scans inputs that could not be read";
  EXPECT_EQ(r.ended_at_us, 300 * kMs);
  EXPECT_NE(r.error.find("at 0.300 s: the input card did not answer"), std::string::npos) << r.error;
  ASSERT_FALSE(changes_of_coil(t.output, kClampY1).empty());
  const OutputChange off = changes_of_coil(t.output, kClampY1).back();
  EXPECT_EQ(off.time_us, 300 * kMs) << "safe outputs in the scan of the failure";
  EXPECT_EQ(off.value, 0.0f);
  EXPECT_TRUE(t.output.last_is_all_off());
  EXPECT_EQ(t.output.writes(), 301u) << "300 scans, then the safe image once";
}

TEST(ScanLoop, OutputWriteErrorEndsTheRunAfterOneSafeImage) {
  Loop t;
  start_a_cycle(t.input);
  t.output.fail_from(250 * kMs, io::PortError::kDisconnected, "the rack closed the connection");
  const runtime::LoopResult r = t.run(1000);
  EXPECT_EQ(r.outcome, runtime::LoopOutcome::kOutputFailed);
  EXPECT_EQ(r.scans, 251u);
  EXPECT_NE(r.error.find("the rack closed the connection"), std::string::npos) << r.error;
  EXPECT_NE(r.error.find("writing the safe outputs failed too"), std::string::npos)
      << "the port keeps failing, and the message must say the safe image did not get through: " << r.error;
  EXPECT_TRUE(t.output.last_is_all_off());
}

TEST(ScanLoop, ModelFailureEndsTheRunWithSafeOutputs) {
  Loop t;
  start_a_cycle(t.input);
  Steps model;
  model.fail_after_us = 300 * kMs;
  const runtime::LoopResult r = t.run(1000, &model);
  EXPECT_EQ(r.outcome, runtime::LoopOutcome::kModelFailed);
  EXPECT_EQ(r.scans, 301u);
  EXPECT_EQ(model.advanced_us, 300 * kMs);
  EXPECT_NE(r.error.find("gave up on purpose"), std::string::npos) << r.error;
  EXPECT_TRUE(t.output.last_is_all_off());
}

TEST(ScanLoop, ConfigurationTheCoreRejectsRunsNoScanAndWritesNothing) {
  io::SimulatedClock clock;
  io::ScriptedInputPort input;
  io::RecordingOutputPort output(clock);
  core::MachineConfig machine = core::testing::make_test_machine();
  machine.functions[0].coil_extend = 200;  // no such coil
  ASSERT_FALSE(core::validate_config(machine).is_ok());
  runtime::ScanLoop loop(input, output, clock);
  const runtime::LoopResult r = loop.run(machine, runtime::LoopSchedule{1000, 100 * kMs});
  EXPECT_EQ(r.outcome, runtime::LoopOutcome::kConfigRejected);
  EXPECT_EQ(r.scans, 0u);
  EXPECT_EQ(output.writes(), 0u);
  EXPECT_NE(r.error.find("the control core rejects this configuration"), std::string::npos) << r.error;
}

TEST(ScanLoop, StopRequestWritesSafeOutputsOnce) {
  Loop t;
  start_a_cycle(t.input);
  std::atomic<bool> stop{false};
  t.input.at(320 * kMs, [&stop](core::InputImage&) { stop = true; });
  const runtime::LoopResult r = t.run(1000, nullptr, &stop);
  EXPECT_EQ(r.outcome, runtime::LoopOutcome::kStopRequested);
  EXPECT_EQ(r.ended_at_us, 321 * kMs) << "polled before the next scan";
  EXPECT_TRUE(t.output.last_is_all_off());
}

TEST(ScanLoop, ClockSkewDelaysTheCoreTimeStampButNotTheSchedule) {
  struct Stamps final : runtime::ScanObserver {
    std::vector<std::pair<std::uint64_t, std::uint32_t>> seen;
    void after_scan(const runtime::ScanView& s) override { seen.emplace_back(s.scan_time_us, s.core_now_us); }
  } stamps;
  io::SimulatedClock clock;
  io::ScriptedInputPort input;
  input.at(0, machine_at_rest);
  input.at(3 * kMs, [&clock](core::InputImage&) { clock.add_skew(7 * kMs); });
  io::RecordingOutputPort output(clock);
  runtime::ScanLoop loop(input, output, clock);
  loop.add_observer(stamps);
  const runtime::LoopResult r = loop.run(core::testing::make_test_machine(), runtime::LoopSchedule{1000, 5 * kMs});
  ASSERT_TRUE(r.completed()) << r.error;
  ASSERT_EQ(stamps.seen.size(), 6u);
  EXPECT_EQ(stamps.seen[2], std::make_pair(2 * kMs, std::uint32_t{2000}));
  EXPECT_EQ(stamps.seen[3], std::make_pair(3 * kMs, std::uint32_t{10000}));
  EXPECT_EQ(stamps.seen[5], std::make_pair(5 * kMs, std::uint32_t{12000}));
}

}  // namespace
}  // namespace spoolstep

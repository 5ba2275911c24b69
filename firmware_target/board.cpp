#include "board.hpp"

#include "spoolstep/firmware/cortex_m.hpp"

namespace spoolstep::board {
namespace {

namespace cm = spoolstep::firmware::cortex_m;

// Written by input drivers on a real board; all zero (the safe reading) here.
struct StubInputs {
  std::uint64_t digital;
  std::uint32_t digital_age_us;
  std::uint32_t analog_healthy;
  float analog[core::kMaxAnalogInputs];
  std::uint32_t analog_age_us[core::kMaxAnalogInputs];
};

struct StubOutputs {
  std::uint32_t coils;
  float prop[core::kMaxPropOutputs];
  std::uint32_t config_error;
};

volatile StubInputs g_inputs{};
volatile StubOutputs g_outputs{};
// SysTick interrupts every kTickUs; a scan is due once `period` has passed.
constexpr std::uint32_t kTickUs = 1000;
volatile std::uint32_t g_now_us = 0;
std::uint32_t g_period_us = 1000;
std::uint32_t g_last_scan_us = 0;

}  // namespace

void start_scan_clock(std::uint32_t period_us) {
  // Whole ticks, at least one: the core measures the real interval anyway.
  g_period_us = period_us < kTickUs ? kTickUs : period_us - period_us % kTickUs;
  cm::syst_csr() = 0;
  cm::syst_rvr() = (cm::kMps2SysclkHz / 1000000u) * kTickUs - 1u;
  cm::syst_cvr() = 0;
  g_last_scan_us = g_now_us;
  cm::syst_csr() = cm::kSysTickEnable | cm::kSysTickInterrupt | cm::kSysTickProcessorClock;
}

std::uint32_t wait_for_scan_tick() {
  while (g_now_us - g_last_scan_us < g_period_us) {
    __asm volatile("wfi");
  }
  g_last_scan_us = g_now_us;
  return g_last_scan_us;
}

void read_inputs(core::InputImage& in) {
  for (std::uint32_t i = 0; i < core::kMaxDigitalInputs; ++i) in.digital[i] = ((g_inputs.digital >> i) & 1u) != 0;
  in.digital_age_us = g_inputs.digital_age_us;
  for (std::uint32_t i = 0; i < core::kMaxAnalogInputs; ++i) {
    in.analog[i].value = g_inputs.analog[i];
    in.analog[i].healthy = ((g_inputs.analog_healthy >> i) & 1u) != 0;
    in.analog[i].age_us = g_inputs.analog_age_us[i];
  }
  in.commands = core::OperatorCommands{};  // no HMI on this board
}

void write_outputs(const core::OutputImage& out) {
  std::uint32_t coils = 0;
  for (std::uint32_t i = 0; i < core::kMaxCoils; ++i) coils |= out.coils[i] ? (1u << i) : 0u;
  g_outputs.coils = coils;
  for (std::uint32_t i = 0; i < core::kMaxPropOutputs; ++i) g_outputs.prop[i] = out.prop[i].value;
}

void signal_config_error() { g_outputs.config_error = 1u; }

}  // namespace spoolstep::board

extern "C" void SysTick_Handler() {
  spoolstep::board::g_now_us = spoolstep::board::g_now_us + spoolstep::board::kTickUs;
}

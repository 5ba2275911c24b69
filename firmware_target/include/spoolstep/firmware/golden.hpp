#pragma once
/// Golden vectors: a recorded input sequence of the demo machine, replayed
/// scan by scan on the host and on the target, and a digest of what each
/// scan produced. Shared by the host generator (tests/firmware) and the QEMU
/// replay program (firmware_target), so both read and hash the same way.
/// Core types only: no heap, no exceptions; printing uses C stdio and prints
/// floats as their bit patterns (exact, and newlib-nano needs no float printf).
#include <array>
#include <cstdint>
#include <cstdio>
#include <cstring>

#include "spoolstep/core/controller.hpp"

namespace spoolstep::firmware {

/// Analog channels a frame carries; the demo machine has 4.
inline constexpr std::size_t kGoldenAnalogChannels = 8;

/// Bits of GoldenFrame::commands (OperatorCommands).
inline constexpr std::uint32_t kCmdReset = 1u << 0;
inline constexpr std::uint32_t kCmdCycleStart = 1u << 1;
inline constexpr std::uint32_t kCmdCycleStop = 1u << 2;
inline constexpr std::uint32_t kCmdSelectAuto = 1u << 3;
inline constexpr std::uint32_t kCmdContinuous = 1u << 4;
inline constexpr std::uint32_t kCmdPumpStart = 1u << 5;
inline constexpr std::uint32_t kCmdPumpStop = 1u << 6;
inline constexpr std::uint32_t kCmdStop = 1u << 7;
inline constexpr std::uint32_t kCmdJogShift = 8;  ///< then 2 bits per function: 1 extend, 2 retract

/// `repeat` scans, each `period_us` after the previous one, with these inputs.
struct GoldenFrame {
  std::uint32_t repeat;
  std::uint32_t period_us;
  std::uint64_t digital;         ///< bit i = digital input i
  std::uint32_t digital_age_us;
  std::uint32_t analog_age_us;   ///< same age for every analog channel
  std::uint32_t analog_healthy;  ///< bit i = channel i healthy
  std::uint32_t commands;        ///< kCmd* bits
  std::array<std::uint32_t, kGoldenAnalogChannels> analog_bits;  ///< IEEE-754 bits of each value
};

inline std::uint32_t float_bits(float value) {
  std::uint32_t bits = 0;
  std::memcpy(&bits, &value, sizeof bits);
  return bits;
}

inline float bits_float(std::uint32_t bits) {
  float value = 0.0f;
  std::memcpy(&value, &bits, sizeof value);
  return value;
}

/// Writes a frame's inputs into `in` (channels past the frame's are cleared).
inline void apply_frame(const GoldenFrame& frame, core::InputImage& in) {
  in = core::InputImage{};
  for (std::size_t i = 0; i < core::kMaxDigitalInputs; ++i) in.digital[i] = ((frame.digital >> i) & 1u) != 0;
  in.digital_age_us = frame.digital_age_us;
  for (std::size_t i = 0; i < kGoldenAnalogChannels; ++i) {
    in.analog[i].value = bits_float(frame.analog_bits[i]);
    in.analog[i].healthy = ((frame.analog_healthy >> i) & 1u) != 0;
    in.analog[i].age_us = frame.analog_age_us;
  }
  core::OperatorCommands& c = in.commands;
  c.reset = (frame.commands & kCmdReset) != 0;
  c.cycle_start = (frame.commands & kCmdCycleStart) != 0;
  c.cycle_stop = (frame.commands & kCmdCycleStop) != 0;
  c.select_auto = (frame.commands & kCmdSelectAuto) != 0;
  c.continuous = (frame.commands & kCmdContinuous) != 0;
  c.pump_start = (frame.commands & kCmdPumpStart) != 0;
  c.stop = (frame.commands & kCmdStop) != 0;
  c.pump_stop = (frame.commands & kCmdPumpStop) != 0;
  for (std::size_t f = 0; f < core::kMaxFunctions; ++f) {
    const std::uint32_t jog = (frame.commands >> (kCmdJogShift + 2 * f)) & 3u;
    c.jog[f] = jog == 1u ? core::Direction::kExtend : jog == 2u ? core::Direction::kRetract : core::Direction::kNone;
  }
}

/// The inverse of apply_frame for the fields a frame carries (repeat and
/// period are the caller's).
inline GoldenFrame frame_of(const core::InputImage& in) {
  GoldenFrame frame{};
  for (std::size_t i = 0; i < core::kMaxDigitalInputs; ++i) {
    if (in.digital[i]) frame.digital |= std::uint64_t{1} << i;
  }
  frame.digital_age_us = in.digital_age_us;
  frame.analog_age_us = in.analog[0].age_us;
  for (std::size_t i = 0; i < kGoldenAnalogChannels; ++i) {
    frame.analog_bits[i] = float_bits(in.analog[i].value);
    if (in.analog[i].healthy) frame.analog_healthy |= 1u << i;
  }
  const core::OperatorCommands& c = in.commands;
  frame.commands = (c.reset ? kCmdReset : 0u) | (c.cycle_start ? kCmdCycleStart : 0u) |
                   (c.cycle_stop ? kCmdCycleStop : 0u) | (c.select_auto ? kCmdSelectAuto : 0u) |
                   (c.continuous ? kCmdContinuous : 0u) | (c.pump_start ? kCmdPumpStart : 0u) |
                   (c.pump_stop ? kCmdPumpStop : 0u) | (c.stop ? kCmdStop : 0u);
  for (std::size_t f = 0; f < core::kMaxFunctions; ++f) {
    const std::uint32_t jog = c.jog[f] == core::Direction::kExtend ? 1u : c.jog[f] == core::Direction::kRetract ? 2u : 0u;
    frame.commands |= jog << (kCmdJogShift + 2 * f);
  }
  return frame;
}

/// True when two frames carry the same inputs (repeat and period ignored).
inline bool same_inputs(const GoldenFrame& a, const GoldenFrame& b) {
  return a.digital == b.digital && a.digital_age_us == b.digital_age_us && a.analog_age_us == b.analog_age_us &&
         a.analog_healthy == b.analog_healthy && a.commands == b.commands && a.analog_bits == b.analog_bits;
}

/// FNV-1a, 32 bit: offset basis 2166136261 and prime 16777619 (from memory of
/// the FNV description by Fowler, Noll and Vo; any fixed hash would do, both
/// sides only need to agree).
class Fnv1a {
 public:
  void byte(std::uint8_t b) {
    hash_ ^= b;
    hash_ *= 16777619u;
  }
  void u32(std::uint32_t v) {
    for (int i = 0; i < 4; ++i) byte(static_cast<std::uint8_t>(v >> (8 * i)));
  }
  void f32(float v) { u32(float_bits(v)); }
  std::uint32_t value() const { return hash_; }

 private:
  std::uint32_t hash_ = 2166136261u;
};

/// Digest of one scan's result: every used output channel and the
/// diagnostics (state, step, faults, interlocks, per-function status, scaled
/// analog values, event count), floats by their bits.
inline std::uint32_t scan_digest(const core::MachineConfig& config, const core::OutputImage& out,
                                 const core::Diagnostics& d) {
  Fnv1a h;
  for (std::size_t i = 0; i < config.coil_count; ++i) h.byte(out.coils[i] ? 1u : 0u);
  for (std::size_t i = 0; i < config.prop_output_count; ++i) {
    h.f32(out.prop[i].value);
    h.f32(out.prop[i].dither_amplitude_ma);
    h.f32(out.prop[i].dither_frequency_hz);
  }
  h.byte(static_cast<std::uint8_t>(d.state));
  h.byte(d.auto_selected ? 1u : 0u);
  h.byte(d.active_step);
  h.u32(d.step_elapsed_us);
  h.u32(d.completed_cycles);
  h.byte(d.fault_count);
  h.byte(d.faults_overflowed ? 1u : 0u);
  for (std::size_t i = 0; i < d.fault_count; ++i) {
    const core::Fault& f = d.faults[i];
    h.byte(static_cast<std::uint8_t>(f.code));
    h.byte(f.subject);
    h.u32(f.detail);
    h.byte(static_cast<std::uint8_t>(f.category));
    h.u32(f.raised_at_us);
    h.byte(f.cause_present ? 1u : 0u);
  }
  h.u32(d.interlock_ok);
  h.u32(d.interlock_latched);
  for (std::size_t i = 0; i < config.two_hand_count; ++i) h.byte(d.two_hand_held[i] ? 1u : 0u);
  for (std::size_t i = 0; i < config.analog_input_count; ++i) h.f32(d.analog_value[i]);
  for (std::size_t i = 0; i < config.function_count; ++i) {
    const core::FunctionStatus& s = d.functions[i];
    h.byte(static_cast<std::uint8_t>(s.motion));
    h.byte(static_cast<std::uint8_t>(s.demand));
    h.f32(s.command);
    h.f32(s.target);
    h.byte(static_cast<std::uint8_t>(s.detent_side));
    h.byte(s.blocked ? 1u : 0u);
  }
  h.byte(static_cast<std::uint8_t>(d.power_unit));
  h.u32(d.last_scan_interval_us);
  h.u32(d.events.total);
  return h.value();
}

/// Replays `frame_count` frames from `start_us`: per scan, applies the
/// frame's inputs, advances time by its period, calls `scan(in, now_us, out)`
/// (normally Controller::scan, or a timed wrapper) and then
/// `on_scan(index, now_us, out)`. Returns the number of scans run.
template <typename Scan, typename OnScan>
std::uint32_t replay(const GoldenFrame* frames, std::size_t frame_count, std::uint32_t start_us, Scan&& scan,
                     OnScan&& on_scan) {
  core::InputImage in{};
  core::OutputImage out{};
  std::uint32_t now_us = start_us;
  std::uint32_t index = 0;
  for (std::size_t f = 0; f < frame_count; ++f) {
    apply_frame(frames[f], in);
    for (std::uint32_t r = 0; r < frames[f].repeat; ++r) {
      now_us += frames[f].period_us;
      scan(in, now_us, out);
      on_scan(index, now_us, out);
      ++index;
    }
  }
  return index;
}

/// One line describing a scan's result in full (floats as hex bits), the
/// same on host and target so that a differing scan can be diffed by eye.
inline void print_scan(std::FILE* file, std::uint32_t index, std::uint32_t now_us, const core::MachineConfig& config,
                       const core::OutputImage& out, const core::Diagnostics& d) {
  std::fprintf(file, "scan %lu t=%lu state=%u step=%u faults=%u pu=%u coils=", static_cast<unsigned long>(index),
               static_cast<unsigned long>(now_us), static_cast<unsigned>(d.state), static_cast<unsigned>(d.active_step),
               static_cast<unsigned>(d.fault_count), static_cast<unsigned>(d.power_unit));
  for (std::size_t i = 0; i < config.coil_count; ++i) std::fputc(out.coils[i] ? '1' : '0', file);
  std::fputs(" prop=", file);
  for (std::size_t i = 0; i < config.prop_output_count; ++i) {
    std::fprintf(file, "%s%08lx/%08lx/%08lx", i == 0 ? "" : ",", static_cast<unsigned long>(float_bits(out.prop[i].value)),
                 static_cast<unsigned long>(float_bits(out.prop[i].dither_amplitude_ma)),
                 static_cast<unsigned long>(float_bits(out.prop[i].dither_frequency_hz)));
  }
  std::fputs(" cmd=", file);
  for (std::size_t i = 0; i < config.function_count; ++i) {
    std::fprintf(file, "%s%08lx", i == 0 ? "" : ",", static_cast<unsigned long>(float_bits(d.functions[i].command)));
  }
  std::fprintf(file, " events=%lu digest=%08lx\n", static_cast<unsigned long>(d.events.total),
               static_cast<unsigned long>(scan_digest(config, out, d)));
}

}  // namespace spoolstep::firmware

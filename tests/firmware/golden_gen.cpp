// Records golden vectors for the demo machine on the host: a scripted
// operator and a deliberately crude plant (invented numbers, not a model of
// any real press) drive the host core through a full press cycle, then a
// second cycle with the guard opened (the chain holds; two hands resume it),
// an emergency stop, reset and manual jogging home, and a low-oil trip with
// reset. The inputs of every scan and
// a digest of every scan's result are written as a C++ header that the QEMU
// replay program compiles in; golden_outputs.txt holds every scan in full.
//
// Usage: spoolstep_golden_gen MACHINE.json OUT_DIR
// Exit: 0 written; 1 the scenario did not reach a milestone (message says
// which); 2 bad arguments or machine file; 3 a file could not be written.
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "spoolstep/core/controller.hpp"
#include "spoolstep/firmware/golden.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace {

using namespace spoolstep;
using core::Direction;
using core::MachineState;

// Indices of the demo machine's points, looked up by name.
struct Points {
  std::uint8_t estop_ok, reset_pb, auto_selected, two_hand_left, two_hand_right, guard_door_closed,
      pump_start_pb, pump_stop_ok, clamp_closed_ps, clamp_open_ls, press_top_ls, oil_level_ok, jog_clamp_open_pb,
      jog_press_up_pb;
  std::uint8_t press_pressure, press_position, system_pressure, oil_temperature;
  std::uint8_t pump_motor, dump_valve, clamp_y1, clamp_y2;
  std::uint8_t press_ya, press_yb;
  std::uint8_t clamp, press;
};

[[noreturn]] void fail(int code, const std::string& message) {
  std::fprintf(stderr, "spoolstep_golden_gen: %s\n", message.c_str());
  std::exit(code);
}

template <typename T>
std::uint8_t need(std::optional<T> index, const char* what) {
  if (!index) fail(2, std::string("the demo machine has no point named '") + what + "'");
  return *index;
}

Points find_points(const core::MachineConfig& c) {
  using namespace machine_file;
  Points p{};
  p.estop_ok = need(find_digital_input(c, "estop_ok"), "estop_ok");
  p.reset_pb = need(find_digital_input(c, "reset_pb"), "reset_pb");
  p.auto_selected = need(find_digital_input(c, "auto_selected"), "auto_selected");
  p.two_hand_left = need(find_digital_input(c, "two_hand_left"), "two_hand_left");
  p.two_hand_right = need(find_digital_input(c, "two_hand_right"), "two_hand_right");
  p.guard_door_closed = need(find_digital_input(c, "guard_door_closed"), "guard_door_closed");
  p.pump_start_pb = need(find_digital_input(c, "pump_start_pb"), "pump_start_pb");
  p.pump_stop_ok = need(find_digital_input(c, "pump_stop_ok"), "pump_stop_ok");
  p.clamp_closed_ps = need(find_digital_input(c, "clamp_closed_ps"), "clamp_closed_ps");
  p.clamp_open_ls = need(find_digital_input(c, "clamp_open_ls"), "clamp_open_ls");
  p.press_top_ls = need(find_digital_input(c, "press_top_ls"), "press_top_ls");
  p.oil_level_ok = need(find_digital_input(c, "oil_level_ok"), "oil_level_ok");
  p.jog_clamp_open_pb = need(find_digital_input(c, "jog_clamp_open_pb"), "jog_clamp_open_pb");
  p.jog_press_up_pb = need(find_digital_input(c, "jog_press_up_pb"), "jog_press_up_pb");
  p.press_pressure = need(find_analog_input(c, "press_pressure"), "press_pressure");
  p.press_position = need(find_analog_input(c, "press_position"), "press_position");
  p.system_pressure = need(find_analog_input(c, "system_pressure"), "system_pressure");
  p.oil_temperature = need(find_analog_input(c, "oil_temperature"), "oil_temperature");
  p.pump_motor = need(find_coil(c, "pump_motor"), "pump_motor");
  p.dump_valve = need(find_coil(c, "dump_valve"), "dump_valve");
  p.clamp_y1 = need(find_coil(c, "clamp_y1"), "clamp_y1");
  p.clamp_y2 = need(find_coil(c, "clamp_y2"), "clamp_y2");
  p.press_ya = need(find_prop_output(c, "press_ya"), "press_ya");
  p.press_yb = need(find_prop_output(c, "press_yb"), "press_yb");
  p.clamp = need(find_function(c, "clamp"), "clamp");
  p.press = need(find_function(c, "press"), "press");
  return p;
}

// Crude plant, invented numbers: enough for the sequence to run through.
struct Plant {
  float system_bar = 0.0f;
  float clamp = 0.0f;  // 0 open .. 1 closed
  float press_mm = 0.0f;
  float press_bar = 0.0f;
  float oil_degc = 40.0f;

  void step(const Points& p, const core::OutputImage& out, float dt) {
    const bool motor = out.coils[p.pump_motor];
    const bool loaded = motor && out.coils[p.dump_valve];
    const float system_target = loaded ? 170.0f : (motor ? 5.0f : 0.0f);
    system_bar += (system_target - system_bar) * (dt / 0.2f);
    const bool pressure = system_bar > 50.0f;
    if (pressure && out.coils[p.clamp_y1]) clamp += dt / 0.5f;
    if (pressure && out.coils[p.clamp_y2]) clamp -= dt / 0.5f;
    clamp = clamp < 0.0f ? 0.0f : (clamp > 1.0f ? 1.0f : clamp);
    const float ya = out.prop[p.press_ya].value;
    const float yb = out.prop[p.press_yb].value;
    const float down = pressure && ya > 300.0f ? (ya - 300.0f) / 500.0f : 0.0f;
    const float up = pressure && yb > 300.0f ? (yb - 300.0f) / 500.0f : 0.0f;
    constexpr float kPartMm = 450.0f;  // the ram meets the part here
    if (press_mm >= kPartMm && down > 0.0f) {
      press_bar += 600.0f * down * dt;
      if (press_bar > 210.0f) press_bar = 210.0f;  // relief setting of the demo machine
    } else if (up > 0.0f && press_bar > 20.0f) {
      press_bar -= 6000.0f * up * dt;  // decompression: the ram does not lift yet
    } else {
      press_mm += 300.0f * (down - up) * dt;
      const float moving_bar = down > 0.0f ? 10.0f : 0.0f;
      press_bar += (moving_bar - press_bar) * (dt / 0.05f);
    }
    if (press_bar < 0.0f) press_bar = 0.0f;
    press_mm = press_mm < 0.0f ? 0.0f : (press_mm > kPartMm ? kPartMm : press_mm);
  }
};

float to_ma(const core::AnalogInputConfig& cfg, float value) {
  return 4.0f + 16.0f * (value - cfg.range_min) / (cfg.range_max - cfg.range_min);
}

class Recorder {
 public:
  Recorder(const core::MachineConfig& config, std::FILE* outputs) : config_(config), outputs_(outputs) {
    if (!controller_.init(config_).is_ok()) fail(2, "the core rejects the demo configuration");
  }

  void scan(const core::InputImage& in) {
    now_us_ += kPeriodUs;
    controller_.scan(in, now_us_, out_);
    GoldenFrame frame = firmware::frame_of(in);
    frame.period_us = kPeriodUs;
    frame.repeat = 1;
    if (!frames_.empty() && firmware::same_inputs(frames_.back(), frame) && frames_.back().period_us == kPeriodUs) {
      ++frames_.back().repeat;
    } else {
      frames_.push_back(frame);
    }
    const std::uint32_t digest = firmware::scan_digest(config_, out_, controller_.diagnostics());
    digests_.push_back(digest);
    total_.u32(digest);
    firmware::print_scan(outputs_, static_cast<std::uint32_t>(digests_.size() - 1), now_us_, config_, out_,
                         controller_.diagnostics());
  }

  using GoldenFrame = firmware::GoldenFrame;
  static constexpr std::uint32_t kPeriodUs = 1000;
  const core::Diagnostics& diag() const { return controller_.diagnostics(); }
  const core::OutputImage& out() const { return out_; }
  std::uint32_t now_us() const { return now_us_; }
  const std::vector<GoldenFrame>& frames() const { return frames_; }
  const std::vector<std::uint32_t>& digests() const { return digests_; }
  std::uint32_t total() const { return total_.value(); }

 private:
  const core::MachineConfig& config_;
  std::FILE* outputs_;
  core::Controller controller_;
  core::OutputImage out_{};
  std::uint32_t now_us_ = 0;
  std::vector<GoldenFrame> frames_;
  std::vector<std::uint32_t> digests_;
  firmware::Fnv1a total_;
};

bool has_fault(const core::Diagnostics& d, core::FaultCode code) {
  for (std::uint8_t i = 0; i < d.fault_count; ++i) {
    if (d.faults[i].code == code) return true;
  }
  return false;
}

// The scripted operator. Each helper scans until its condition holds or
// fails the generator after `limit_ms`.
class Script {
 public:
  Script(const core::MachineConfig& config, Recorder& rec) : c_(config), p_(find_points(config)), rec_(rec) {
    in_.digital[p_.estop_ok] = true;
    in_.digital[p_.guard_door_closed] = true;
    in_.digital[p_.pump_stop_ok] = true;
    in_.digital[p_.oil_level_ok] = true;
  }

  void scan() {
    plant_.step(p_, rec_.out(), static_cast<float>(Recorder::kPeriodUs) * 1e-6f);
    in_.digital[p_.clamp_closed_ps] =
        plant_.clamp >= 1.0f && rec_.out().coils[p_.clamp_y1] && plant_.system_bar > 100.0f;
    in_.digital[p_.clamp_open_ls] = plant_.clamp <= 0.0f;
    in_.digital[p_.press_top_ls] = plant_.press_mm <= 3.0f;  // actuated just before the end of stroke
    // The analog card refreshes every 10 scans (keeps the vectors small).
    if (scans_++ % 10 == 0) {
      set_analog(p_.press_pressure, plant_.press_bar);
      set_analog(p_.press_position, plant_.press_mm);
      set_analog(p_.system_pressure, plant_.system_bar);
      set_analog(p_.oil_temperature, plant_.oil_degc);
    }
    rec_.scan(in_);
  }
  void run_ms(std::uint32_t ms) {
    for (std::uint32_t i = 0; i < ms; ++i) scan();
  }
  template <typename Done>
  void until(Done done, std::uint32_t limit_ms, const char* milestone) {
    for (std::uint32_t i = 0; i < limit_ms; ++i) {
      scan();
      if (done()) return;
    }
    fail(1, std::string("scenario stuck before: ") + milestone);
  }
  void pulse(std::uint8_t di, std::uint32_t ms = 50) {
    in_.digital[di] = true;
    run_ms(ms);
    in_.digital[di] = false;
  }
  void set(std::uint8_t di, bool value) { in_.digital[di] = value; }
  void hands(bool held) {
    in_.digital[p_.two_hand_left] = held;
    if (held) run_ms(80);  // the right hand follows, inside the synchronous time
    in_.digital[p_.two_hand_right] = held;
  }
  const core::Diagnostics& diag() const { return rec_.diag(); }
  std::uint8_t step(const char* name) const { return need(machine_file::find_step(c_, name), name); }
  const Points& points() const { return p_; }
  const Plant& plant() const { return plant_; }
  void start_pump() {
    pulse(p_.pump_start_pb);
    until([&] { return diag().power_unit == core::PowerUnitState::kReady; }, 6000, "pump ready");
  }

 private:
  void set_analog(std::uint8_t ai, float value) {
    in_.analog[ai].value = to_ma(c_.analog_inputs[ai], value);
    in_.analog[ai].healthy = true;
    in_.analog[ai].age_us = 0;
  }

  const core::MachineConfig& c_;
  Points p_;
  Recorder& rec_;
  Plant plant_;
  core::InputImage in_{};
  std::uint32_t scans_ = 0;
};

void run_scenario(Script& s) {
  const Points& p = s.points();
  auto state_is = [&](MachineState st) { return [&s, st] { return s.diag().state == st; }; };
  auto step_is = [&](std::uint8_t step) { return [&s, step] { return s.diag().active_step == step; }; };

  // Power-up, reset into manual, pump on.
  s.run_ms(20);
  s.pulse(p.reset_pb);
  s.until(state_is(MachineState::kManual), 100, "manual after reset");
  s.start_pump();

  // Cycle 1: automatic, two hands held until the ram decompresses.
  s.set(p.auto_selected, true);
  s.until(state_is(MachineState::kAutoIdle), 100, "automatic idle");
  s.run_ms(100);
  s.hands(true);
  s.until(state_is(MachineState::kAutoCycle), 200, "cycle 1 started");
  s.until(step_is(s.step("decompress")), 15000, "cycle 1 decompress step");
  s.hands(false);
  s.until([&] { return s.diag().completed_cycles == 1 && s.diag().state == MachineState::kAutoIdle; }, 15000,
          "cycle 1 complete");
  s.run_ms(200);

  // Cycle 2: the guard opens during the fast approach, then an e-stop while pressing.
  s.hands(true);
  s.until(step_is(s.step("fast_approach")), 5000, "cycle 2 fast approach");
  s.run_ms(60);
  s.set(p.guard_door_closed, false);
  s.until(state_is(MachineState::kAutoHeld), 50, "chain held by the open guard");
  s.run_ms(300);
  s.set(p.guard_door_closed, true);
  s.run_ms(200);
  if (s.diag().state != MachineState::kAutoHeld) fail(1, "closing the guard restarted the chain by itself");
  s.hands(false);  // a new cycle start (two hands again) resumes the held step
  s.run_ms(100);
  s.hands(true);
  s.until(state_is(MachineState::kAutoCycle), 200, "cycle 2 resumed");
  s.until(step_is(s.step("press_force")), 5000, "cycle 2 press force");
  s.run_ms(50);
  s.set(p.estop_ok, false);
  s.until(state_is(MachineState::kFaulted), 50, "faulted after e-stop");
  if (!has_fault(s.diag(), core::FaultCode::kEmergencyStop)) fail(1, "no e-stop fault");
  s.hands(false);
  s.run_ms(200);
  s.set(p.estop_ok, true);
  s.set(p.auto_selected, false);
  s.run_ms(100);
  s.pulse(p.reset_pb);
  s.until(state_is(MachineState::kManual), 100, "manual after e-stop reset");
  s.run_ms(50);

  // Manual: pump on, jog the ram up and the clamp open.
  s.start_pump();
  s.set(p.jog_press_up_pb, true);
  s.until([&] { return s.diag().functions[p.press].motion == core::MotionState::kStopped && s.plant().press_mm <= 3.0f; }, 15000, "ram jogged to the top");
  s.run_ms(20);
  s.set(p.jog_press_up_pb, false);
  s.run_ms(200);
  s.set(p.jog_clamp_open_pb, true);
  s.until([&] { return s.plant().clamp <= 0.0f; }, 5000, "clamp jogged open");
  s.run_ms(20);
  s.set(p.jog_clamp_open_pb, false);
  s.run_ms(100);

  // Low oil: the debounced trip latches, the pump stops; restore and reset.
  s.set(p.oil_level_ok, false);
  s.until([&] { return has_fault(s.diag(), core::FaultCode::kTrip); }, 2000, "low-oil trip");
  s.until(state_is(MachineState::kFaulted), 2000, "faulted after the trip");
  s.set(p.oil_level_ok, true);
  s.run_ms(600);  // the debounce must see the level back before a reset clears it
  s.pulse(p.reset_pb);
  s.until(state_is(MachineState::kManual), 100, "manual after the trip reset");
  s.run_ms(300);
}

std::string header_text(const std::string& machine_file, const Recorder& rec) {
  std::ostringstream o;
  o << "// Generated by spoolstep_golden_gen from " << std::filesystem::path(machine_file).filename().string()
    << ": the inputs of a scripted host run of the demo machine (invented plant\n"
       "// and operator, see tests/firmware/golden_gen.cpp) and the digest of every\n"
       "// scan's result on the host core. Do not edit.\n"
       "#pragma once\n#include <cstdint>\n\n#include \"spoolstep/firmware/golden.hpp\"\n\n"
       "namespace spoolstep::golden {\n\n";
  o << "inline constexpr std::uint32_t kStartUs = 0u;\n";
  o << "inline constexpr std::uint32_t kScanCount = " << rec.digests().size() << "u;\n";
  o << "inline constexpr std::uint32_t kTotalDigest = 0x" << std::hex << rec.total() << std::dec << "u;\n\n";
  o << "inline constexpr firmware::GoldenFrame kFrames[] = {\n";
  for (const auto& f : rec.frames()) {
    o << "  {" << f.repeat << "u, " << f.period_us << "u, 0x" << std::hex << f.digital << "ull, " << std::dec
      << f.digital_age_us << "u, " << f.analog_age_us << "u, 0x" << std::hex << f.analog_healthy << "u, 0x"
      << f.commands << "u, {";
    for (std::size_t i = 0; i < f.analog_bits.size(); ++i) o << (i ? ", " : "") << "0x" << f.analog_bits[i] << "u";
    o << std::dec << "}},\n";
  }
  o << "};\n\n/// Digest of each scan's result on the host (firmware::scan_digest).\n";
  o << "inline constexpr std::uint32_t kDigests[] = {\n";
  for (std::size_t i = 0; i < rec.digests().size(); ++i) {
    o << (i % 8 == 0 ? "  " : " ") << "0x" << std::hex << rec.digests()[i] << std::dec << "u,"
      << (i % 8 == 7 ? "\n" : "");
  }
  o << "\n};\n\n}  // namespace spoolstep::golden\n";
  return o.str();
}

void write_file(const std::filesystem::path& path, const std::string& text) {
  const std::filesystem::path temp = path.string() + ".tmp";
  {
    std::ofstream out(temp, std::ios::binary);
    out << text;
    if (!out.flush()) fail(3, "cannot write " + temp.string());
  }
  std::error_code ec;
  std::filesystem::rename(temp, path, ec);
  if (ec) fail(3, "cannot rename " + temp.string() + ": " + ec.message());
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 3) fail(2, "usage: spoolstep_golden_gen MACHINE.json OUT_DIR");
  const std::string machine_path = argv[1];
  const std::filesystem::path out_dir = argv[2];
  const auto loaded = machine_file::load_machine_file(machine_path);
  if (!loaded.ok()) {
    for (const auto& e : loaded.errors) std::fprintf(stderr, "%s\n", e.to_string().c_str());
    fail(2, "cannot load " + machine_path);
  }
  const core::MachineConfig& config = loaded.machine->config;
  if (config.analog_input_count > firmware::kGoldenAnalogChannels) fail(2, "more analog inputs than a frame carries");
  std::error_code ec;
  std::filesystem::create_directories(out_dir, ec);
  const std::filesystem::path outputs_path = out_dir / "golden_outputs.txt";
  std::FILE* outputs = std::fopen((outputs_path.string() + ".tmp").c_str(), "w");
  if (outputs == nullptr) fail(3, "cannot create " + outputs_path.string());
  Recorder rec(config, outputs);
  Script script(config, rec);
  run_scenario(script);
  if (std::fclose(outputs) != 0) fail(3, "cannot write " + outputs_path.string());
  std::filesystem::rename(outputs_path.string() + ".tmp", outputs_path, ec);
  if (ec) fail(3, "cannot rename to " + outputs_path.string());
  write_file(out_dir / "golden_vectors.hpp", header_text(machine_path, rec));
  std::printf("golden: %zu scans in %zu frames, %u cycles, total digest 0x%08x\n", rec.digests().size(),
              rec.frames().size(), static_cast<unsigned>(rec.diag().completed_cycles), rec.total());
  return 0;
}

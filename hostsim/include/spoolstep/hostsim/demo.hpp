#pragma once
/// An invented demo machine (a press with a workpiece clamp) for tests,
/// benchmarks and the reference comparison, plus a small builder for the
/// control part of a machine configuration. INVENTED DEMO DATA: the sizes
/// are plausible, not taken from any real machine.
#include <cstdint>

#include <nlohmann/json.hpp>

#include "spoolstep/core/config.hpp"
#include "spoolstep/hostsim/open_loop.hpp"

namespace spoolstep::hostsim {

/// Fills a core::MachineConfig in code (the real one comes from the
/// machine-file loader). Names longer than core::kMaxNameLength are cut.
class MachineBuilder {
 public:
  explicit MachineBuilder(const char* name);
  std::uint8_t coil(const char* name);
  std::uint8_t prop(const char* name, core::PropUnit unit);
  std::uint8_t digital(const char* name);
  std::uint8_t analog(const char* name, const char* unit, bool current_loop, float at_4ma, float at_20ma);
  /// Adds a function with its outputs: coils "<name>_extend"/"<name>_retract"
  /// for solenoid kinds, channels of the same names for proportional kinds
  /// (one signed channel "<name>_command" for kProportional43SignedCommand).
  std::uint8_t function(const char* name, core::ValveKind kind, core::ValveCentre centre);
  /// Power unit with a motor contactor coil and a dump valve coil.
  void power_unit(const char* motor_coil, const char* dump_coil);
  const core::MachineConfig& config() const { return config_; }
  core::MachineConfig& config() { return config_; }

 private:
  core::MachineConfig config_{};
};

/// The demo machine's control part: functions "clamp" (4/3 solenoid,
/// tandem centre) and "press" (4/3 proportional signed command, tandem
/// centre, supplied through the clamp valve), a power unit, 4-20 mA press
/// pressure and position inputs, switches.
core::MachineConfig demo_machine();

/// The demo machine's "plant" section (invented demo data).
nlohmann::json demo_plant_json();

/// An open-loop press cycle for the demo plant: pump on, clamp, press down
/// to the workpiece, press, return, unclamp (about 4.5 s).
Timeline demo_press_cycle();

}  // namespace spoolstep::hostsim

#pragma once
// How the plant is wired to the core's I/O image (private to hostsim).
#include <cstdint>
#include <string>
#include <vector>

#include "spoolstep/core/capacity.hpp"
#include "spoolstep/core/config.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim {

enum class SensorKind { kPressure, kPosition, kLimitSwitch, kPressureSwitch };

enum class SensorFault { kNone, kWireBreak, kStuck, kDrift, kFailLow, kFailHigh };

struct Plant::Wiring {
  struct Valve {
    std::string function;
    core::FunctionConfig config;  // copy of the core's function entry (kind, channels, currents)
    int spool = -1;
    double held_target = -1.0;    // detented 4/2: last shifted side
  };
  struct OnOff {
    std::string name;
    std::uint8_t coil = core::kNoIndex8;
    int spool = -1;
    bool normally_open = false;
  };
  struct Sensor {
    SensorKind kind = SensorKind::kPressure;
    std::string input_name;
    std::size_t input = 0;
    int node = -1;
    int cylinder = -1;
    double unit_si = 1.0;          // SI value of one engineering unit (bar: 1e5, mm: 1e-3)
    bool current_loop = false;     // 4-20 mA input
    double range_min = 0.0, range_max = 0.0;  // engineering units at 4 and 20 mA
    double threshold_si = 0.0;     // switches
    double hysteresis_si = 0.0;
    bool active_above = true;
    bool on = false;               // switch state
    SensorFault fault = SensorFault::kNone;
    double stuck_value = 0.0;      // engineering units (analog) / 0 or 1 (switch)
    double drift_per_s = 0.0;
    double fault_since_s = 0.0;
  };

  std::vector<Valve> valves;
  std::vector<OnOff> on_off;
  bool has_power_unit = false;
  std::uint8_t motor_coil = core::kNoIndex8;
  std::uint8_t dump_coil = core::kNoIndex8;
  int dump_spool = -1;
  bool dump_normally_open = true;
  std::vector<Sensor> sensors;
  std::vector<std::string> coil_names;
  std::vector<std::string> prop_names;
  std::vector<bool> coil_failed;
  std::vector<bool> prop_failed;
};

}  // namespace spoolstep::hostsim

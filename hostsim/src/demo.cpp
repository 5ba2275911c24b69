#include "spoolstep/hostsim/demo.hpp"

#include <cstring>
#include <string>

namespace spoolstep::hostsim {
namespace {

core::Name make_name(const char* text) {
  core::Name n;
  std::strncpy(n.text.data(), text, core::kMaxNameLength);
  n.text[core::kMaxNameLength] = '\0';
  return n;
}

}  // namespace

MachineBuilder::MachineBuilder(const char* name) { config_.name = make_name(name); }

std::uint8_t MachineBuilder::coil(const char* name) {
  config_.coils[config_.coil_count] = make_name(name);
  return config_.coil_count++;
}

std::uint8_t MachineBuilder::prop(const char* name, core::PropUnit unit) {
  config_.prop_outputs[config_.prop_output_count].name = make_name(name);
  config_.prop_outputs[config_.prop_output_count].unit = unit;
  return config_.prop_output_count++;
}

std::uint8_t MachineBuilder::digital(const char* name) {
  config_.digital_inputs[config_.digital_input_count] = make_name(name);
  return config_.digital_input_count++;
}

std::uint8_t MachineBuilder::analog(const char* name, const char* unit, bool current_loop, float at_4ma,
                                    float at_20ma) {
  core::AnalogInputConfig& a = config_.analog_inputs[config_.analog_input_count];
  a.name = make_name(name);
  a.unit = make_name(unit);
  a.signal = current_loop ? core::AnalogSignal::kCurrent4To20 : core::AnalogSignal::kEngineering;
  a.range_min = at_4ma;
  a.range_max = at_20ma;
  return config_.analog_input_count++;
}

std::uint8_t MachineBuilder::function(const char* name, core::ValveKind kind, core::ValveCentre centre) {
  core::FunctionConfig& f = config_.functions[config_.function_count];
  f.name = make_name(name);
  f.valve = kind;
  f.centre = centre;
  const std::string n = name;
  // The outputs the kind's row in core::kValveKinds names.
  const std::uint8_t drives = core::valve_kind_row(kind)->outputs;
  if (drives & core::kDrivesCoilExtend) f.coil_extend = coil((n + "_extend").c_str());
  if (drives & core::kDrivesCoilRetract) f.coil_retract = coil((n + "_retract").c_str());
  if (drives & core::kDrivesCurrentExtend) {
    f.prop_extend = prop((n + "_extend").c_str(), core::PropUnit::kMilliamp);
    f.current_extend = {200.0f, 800.0f};
  }
  if (drives & core::kDrivesCurrentRetract) {
    f.prop_retract = prop((n + "_retract").c_str(), core::PropUnit::kMilliamp);
    f.current_retract = {200.0f, 800.0f};
  }
  if (drives & core::kDrivesSignedCommand) f.prop_extend = prop((n + "_command").c_str(), core::PropUnit::kPercent);
  return config_.function_count++;
}

void MachineBuilder::power_unit(const char* motor_coil, const char* dump_coil) {
  config_.power_unit.present = true;
  config_.power_unit.motor_coil = coil(motor_coil);
  config_.power_unit.dump_coil = coil(dump_coil);
}

core::MachineConfig demo_machine() {
  MachineBuilder b("demo_press");
  b.power_unit("pump_motor", "dump_valve");
  b.function("clamp", core::ValveKind::kSolenoid43SpringCentred, core::ValveCentre::kTandem);
  b.function("press", core::ValveKind::kProportional43SignedCommand, core::ValveCentre::kTandem);
  b.analog("press_pressure", "bar", true, 0.0f, 250.0f);
  b.analog("press_position", "mm", true, 0.0f, 250.0f);
  b.analog("clamp_pressure", "bar", false, 0.0f, 250.0f);
  b.digital("press_up");
  b.digital("press_on_work");
  b.digital("clamp_closed");
  return b.config();
}

nlohmann::json demo_plant_json() {
  // INVENTED DEMO DATA. The press cylinder is the 63/36 cylinder of
  // check-values section 5; the pump is the 20 cm^3, 1450 rpm, 0.95 pump of
  // section 5.11 (27.55 L/min).
  return nlohmann::json::parse(R"({
    "oil": {"density_kg_m3": 870, "bulk_modulus_bar": 14000, "entrained_air_percent": 0.1},
    "pump": {"displacement_cm3": 20, "speed_rpm": 1450, "volumetric_efficiency": 0.95, "line_volume_cm3": 500,
             "dump_valve": {"rated_flow_l_min": 60, "rated_dp_bar": 5, "switch_time_ms": 20}},
    "relief": {"cracking_bar": 180, "override_bar_per_l_min": 0.2},
    "valves": [
      {"function": "clamp", "rated_flow_l_min": 40, "rated_dp_bar": 10, "overlap_percent": 10,
       "switch_time_ms": 30, "through_line_volume_cm3": 50},
      {"function": "press", "rated_flow_l_min": 40, "rated_dp_bar": 10, "overlap_percent": 10,
       "response": {"order": 2, "natural_hz": 40, "damping": 0.7}, "supply": {"through_of": "clamp"}}
    ],
    "cylinders": [
      {"name": "clamp_cyl", "function": "clamp", "bore_mm": 40, "rod_mm": 22, "stroke_mm": 100,
       "dead_volume_a_cm3": 10, "dead_volume_b_cm3": 10, "line_volume_a_cm3": 30, "line_volume_b_cm3": 30,
       "mass_kg": 20, "coulomb_n": 100, "viscous_n_s_m": 1000,
       "load": {"contact": {"at_mm": 90, "stiffness_n_mm": 20000}},
       "load_holding": {"side": "A", "pilot_ratio": 4, "rated_flow_l_min": 40}},
      {"name": "press_cyl", "function": "press", "bore_mm": 63, "rod_mm": 36, "stroke_mm": 250,
       "dead_volume_a_cm3": 50, "dead_volume_b_cm3": 50, "line_volume_a_cm3": 100, "line_volume_b_cm3": 100,
       "mass_kg": 500, "coulomb_n": 200, "viscous_n_s_m": 2000, "leak_mm3_s_bar": 0,
       "load": {"resisting_force_n": 2000, "contact": {"at_mm": 200, "stiffness_n_mm": 50000}}}
    ],
    "sensors": [
      {"kind": "pressure", "at": "press_cyl.A", "input": "press_pressure"},
      {"kind": "position", "cylinder": "press_cyl", "input": "press_position"},
      {"kind": "pressure", "at": "clamp_cyl.A", "input": "clamp_pressure"},
      {"kind": "limit_switch", "cylinder": "press_cyl", "at_mm": 2, "active": "below", "hysteresis_mm": 1, "input": "press_up"},
      {"kind": "limit_switch", "cylinder": "press_cyl", "at_mm": 200, "active": "above", "hysteresis_mm": 1, "input": "press_on_work"},
      {"kind": "pressure_switch", "at": "clamp_cyl.A", "above_bar": 40, "hysteresis_bar": 5, "input": "clamp_closed"}
    ]
  })");
}

Timeline demo_press_cycle() {
  Timeline t;
  t.pump(0.0, true, true);
  auto spool = [&t](double time, const char* f, double target) { t.spool(time, f, target); };
  spool(0.05, "clamp", 1.0);   // clamp closes on the workpiece
  spool(0.55, "clamp", 0.0);   // centre: the pilot-operated check holds the clamp
  spool(0.60, "press", 1.0);   // press down, full speed
  spool(1.80, "press", 0.3);   // slow approach
  spool(2.40, "press", 0.0);   // hold on the workpiece
  spool(2.50, "press", -1.0);  // return
  spool(3.80, "press", 0.0);
  spool(3.90, "clamp", -1.0);  // unclamp
  spool(4.30, "clamp", 0.0);
  t.end_s = 4.5;
  return t;
}

}  // namespace spoolstep::hostsim

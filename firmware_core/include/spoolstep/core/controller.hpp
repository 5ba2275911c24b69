#pragma once
/// The control core: one call per scan turns inputs, time and the machine
/// configuration into outputs and diagnostics. No heap, no clock, no I/O.
#include <array>
#include <cstdint>

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/io_image.hpp"
#include "spoolstep/core/status.hpp"

namespace spoolstep::core {

/// Checks every index, count, order and range in a configuration.
/// Returns the first problem found, or ok.
Status validate_config(const MachineConfig& config);

class Controller {
 public:
  /// Binds the controller to `config` (which must outlive it) and returns to
  /// power-up state. Returns the validation result; on error the controller
  /// holds every output off and reports kConfigInvalid on every scan.
  Status init(const MachineConfig& config);

  /// One scan at monotonic time `now_us` (wraps modulo 2^32; intervals up to
  /// about 35 minutes are measured correctly). Writes every output channel.
  void scan(const InputImage& inputs, std::uint32_t now_us, OutputImage& outputs);

  /// State after the last scan.
  const Diagnostics& diagnostics() const { return diag_; }

 private:
  struct NodeState {
    bool value = false;
    bool held = false;          // debounce: the stable output
    std::uint32_t timer_us = 0; // elapsed of the running timer
  };
  struct TwoHandState {
    std::uint8_t phase = 0;  // see two_hand.cpp
    std::uint32_t since_first_us = 0;
  };
  struct FunctionRuntime {
    float command = 0.0f;       // ramped signed speed -1..1
    float rate = 0.0f;          // S-curve: d(command)/dt in 1/s
    std::uint32_t dwell_us = 0; // time spent centred since the last motion
    Direction last_side = Direction::kNone;  // side of the last motion, for the reversal dwell
    std::uint32_t pulse_us = 0; // detented: time the current pulse has been on
    Direction pulse_side = Direction::kNone;
  };

  void reset_runtime();
  void evaluate_conditions(const InputImage& inputs, std::uint32_t dt_us);
  bool node(std::uint16_t index) const { return index != kNoCondition && nodes_[index].value; }
  bool rising(std::uint16_t index, bool hmi, bool& previous);
  void check_inputs(const InputImage& inputs, std::uint32_t now_us);
  void raise_fault(FaultCode code, std::uint8_t subject, std::uint16_t detail,
                   StopCategory category, std::uint32_t now_us);
  void clear_faults(std::uint32_t now_us);
  void update_two_hand(const InputImage& inputs, std::uint32_t dt_us, std::uint32_t now_us);
  void update_interlocks(std::uint32_t now_us);
  void update_machine_state(const InputImage& inputs, std::uint32_t now_us);
  void run_sequence(std::uint32_t dt_us, std::uint32_t now_us);
  void update_power_unit(const InputImage& inputs, std::uint32_t dt_us, std::uint32_t now_us);
  void decide_demands(const InputImage& inputs);
  void drive_functions(const InputImage& inputs, std::uint32_t dt_us, std::uint32_t now_us,
                       OutputImage& outputs);
  void write_function_outputs(std::uint8_t index, OutputImage& outputs);
  void set_state(MachineState next, std::uint32_t now_us);
  void log(std::uint32_t now_us, EventCode code, std::uint8_t subject, std::uint16_t detail);
  std::uint16_t first_unmet(std::uint16_t index) const;
  StopCategory worst_active_category() const;
  bool all_stopped() const;

  const MachineConfig* config_ = nullptr;
  bool config_ok_ = false;
  bool first_scan_ = true;
  std::uint32_t previous_now_us_ = 0;
  std::array<NodeState, kMaxConditionNodes> nodes_{};
  std::array<TwoHandState, kMaxTwoHandDevices> two_hand_{};
  std::array<FunctionRuntime, kMaxFunctions> functions_{};
  std::array<float, kMaxFunctions> speed_{};  // demanded |speed| 0..1 this scan
  std::array<std::uint8_t, kMaxFunctions> ramp_{};
  std::array<StopCategory, kMaxFunctions> stop_category_{};  // how a blocked function stops
  bool prev_reset_ = false;
  bool prev_cycle_start_ = false;
  bool prev_pump_start_ = false;
  std::uint32_t blocked_motions_ = 0;
  std::uint32_t permissive_stop_cat0_ = 0;  // motions whose lost permissive stops at once
  std::uint32_t pump_elapsed_us_ = 0;
  Diagnostics diag_{};
};

}  // namespace spoolstep::core

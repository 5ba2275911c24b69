#pragma once
/// The control core: one call per scan turns inputs, time and the machine
/// configuration into outputs and diagnostics. No heap, no clock, no I/O.
#include <array>
#include <cstdint>

#include "spoolstep/core/config.hpp"
#include "spoolstep/core/io_image.hpp"
#include "spoolstep/core/machine_state.hpp"
#include "spoolstep/core/ramp.hpp"
#include "spoolstep/core/two_hand.hpp"
#include "spoolstep/core/status.hpp"

namespace spoolstep::core {

/// Checks every index, count, order and range in a configuration.
/// Returns the first problem found, or ok.
Status validate_config(const MachineConfig& config);

/// Bit per two-hand device that `condition` reads, directly or through the
/// nodes below it; 0 for kNoCondition. Needs nodes that passed validation.
std::uint8_t two_hand_devices_read_by(const MachineConfig& config, std::uint16_t condition);

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
  enum class StopKind : std::uint8_t { kNone = 0, kQuick, kImmediate };
  struct NodeState {
    bool value = false;
    bool held = false;           // debounce: the stable output
    std::uint32_t timer_us = 0;  // elapsed of the node's timer
  };
  struct FunctionRuntime {
    RampState ramp;                            // proportional: signed command and its rate
    std::uint8_t ramp_index = 0;               // ramp of the current or last motion
    Direction side = Direction::kNone;         // side energised / metered in the last scan
    Direction last_side = Direction::kNone;    // last side that was not none
    std::uint32_t centred_us = 0;              // time with side none, for the reversal dwell
    Direction pulse_side = Direction::kNone;   // detented: coil pulse in progress
    std::uint32_t pulse_us = 0;
    Direction demand = Direction::kNone;
    float speed = 0.0f;                        // demanded |speed| 0..1
    StopKind stop = StopKind::kNone;
    bool waiting_reversal = false;
    bool enable_cut = false;  // a category 0 permissive removed this valve's power
    // Manual: a jog direction that must be seen released before it moves
    // again (set on entering manual and when a permissive stopped it).
    bool rearm_extend = true;
    bool rearm_retract = true;
    // Position limits with hysteresis: reached until the position is back
    // inside the window by limit_release_band.
    bool beyond_extend_limit = false;
    bool beyond_retract_limit = false;
    // A motion cut at its end of travel stays off until its demand is
    // released (the jog let go, the step left), however the load rings.
    bool stopped_at_extend_end = false;
    bool stopped_at_retract_end = false;
  };

  void evaluate_conditions(const InputImage& inputs, std::uint32_t dt_us);
  bool node(std::uint16_t index) const { return index != kNoCondition && nodes_[index].value; }
  bool edge(bool value, bool& previous) const;
  void apply_fault_events(std::uint32_t now_us);
  bool initial_step_can_start() const;
  std::uint16_t initial_step_unmet() const;
  void compute_reach();
  void check_inputs(const InputImage& inputs, std::uint32_t now_us);
  void accept_soft_commands(const OperatorCommands& requested, std::uint32_t now_us);
  void raise_fault(FaultCode code, std::uint8_t subject, std::uint16_t detail,
                   StopCategory category, std::uint32_t now_us);
  void update_two_hand(const InputImage& inputs, std::uint32_t dt_us, std::uint32_t now_us);
  void update_interlocks(std::uint32_t now_us);
  void update_machine_state(std::uint32_t now_us);
  void apply_event(MachineEvent event, std::uint32_t now_us);
  void run_sequence(std::uint32_t dt_us, std::uint32_t now_us);
  void update_power_unit(std::uint32_t dt_us, std::uint32_t now_us);
  void decide_demands(const InputImage& inputs, std::uint32_t now_us);
  void update_limits(std::uint8_t index);
  bool at_end(std::uint8_t index, const InputImage& inputs, Direction side) const;
  bool in_slowdown(std::uint8_t index, const InputImage& inputs, Direction side) const;
  void drive_function(std::uint8_t index, std::uint32_t dt_us);
  void write_outputs(OutputImage& outputs) const;
  void enforce_output_invariants(OutputImage& outputs, std::uint32_t now_us);
  void log(std::uint32_t now_us, EventCode code, std::uint8_t subject, std::uint16_t detail);
  std::uint16_t first_unmet(std::uint16_t index) const;
  bool any_fault() const { return diag_.fault_count > 0 || diag_.faults_overflowed; }
  StopCategory worst_category() const;
  bool power_removed() const;
  bool all_stopped() const;

  const MachineConfig* config_ = nullptr;
  bool config_ok_ = false;
  bool first_scan_ = true;
  std::uint32_t previous_now_us_ = 0;
  std::array<NodeState, kMaxConditionNodes> nodes_{};
  std::array<TwoHandStep, kMaxTwoHandDevices> two_hand_{};
  std::array<FunctionRuntime, kMaxFunctions> functions_{};
  bool prev_reset_ = false;
  bool prev_cycle_start_ = false;
  bool prev_pump_start_ = false;
  std::uint8_t cycle_start_devices_ = 0;  // two-hand devices the cycle start condition reads
  std::uint8_t holding_devices_ = 0;      // of those, the ones held when the running cycle was started
  OperatorCommands commands_{};           // the soft commands of this scan the file enables
  std::uint16_t refused_commands_ = 0;    // bit per SoftCommand refused in the previous scan
  std::uint32_t blocked_motions_ = 0;    // motions held off by a permissive
  std::uint32_t immediate_motions_ = 0;  // of those, the ones whose permissive stops in category 0
  std::uint32_t pump_elapsed_us_ = 0;
  bool supervision_raised_ = false;
  bool continuous_command_ = false;
  bool overflow_this_scan_ = false;    // a fault could not be recorded in this scan
  bool end_cycle_requested_ = false;   // cycle stop seen; survives a hold
  bool operator_stop_ = false;         // the operator stop is pressed in this scan
  std::uint8_t frozen_scans_ = 0;      // consecutive scans without time passing
  std::uint32_t stopping_us_ = 0;      // time spent in kStopping
  std::uint32_t stopping_scans_ = 0;
  std::uint32_t stop_limit_us_ = 0;    // longest allowed controlled stop (from the quick-stop times)
  std::array<std::uint32_t, kMaxSteps> reach_{};  // motions the chain can still demand from each step
  Diagnostics diag_{};
};

}  // namespace spoolstep::core

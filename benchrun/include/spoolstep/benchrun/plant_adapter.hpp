#pragma once
/// The hydraulic plant model (hostsim) behind the bench loop's PlantPort,
/// and the facts the scenario loader needs about it.
#include <memory>

#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::benchrun {

/// A PlantPort over `plant` (which must outlive it). Its signals are the
/// plant snapshot's columns, prefixed "plant.".
class PlantAdapter final : public PlantPort {
 public:
  explicit PlantAdapter(hostsim::Plant& plant);
  /// Set when the plant's integrator gave up during the run.
  const std::optional<std::string>& integrator_error() const { return integrator_error_; }

 private:
  std::vector<Signal> do_signals() const override { return signals_; }
  void do_read_inputs(core::InputImage& inputs) const override { plant_.read_inputs(inputs); }
  void do_sample(std::vector<double>& values) const override;
  void do_apply_outputs(const core::OutputImage& outputs) override { plant_.apply_outputs(outputs); }
  void do_advance(double dt_s) override;
  std::optional<std::string> do_inject(const nlohmann::json& fault) override;

  hostsim::Plant& plant_;
  std::vector<Signal> signals_;
  std::optional<std::string> integrator_error_;
};

/// What the scenario loader must know about `plant`: which inputs it drives,
/// its signal names, and how to check a plant fault object.
PlantFacts plant_facts(const hostsim::Plant& plant, const core::MachineConfig& machine,
                       const std::vector<Signal>& signals);

}  // namespace spoolstep::benchrun

#pragma once
/// The hydraulic plant model (hostsim) as a bench backend: an input port
/// (its sensors), an output port (its valves and pump), a steppable model,
/// a trace source and a fault target; and the facts the scenario loader
/// needs about it.
#include <memory>

#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::benchrun {

/// The plant behind the loop (`plant` must outlive it). Its trace signals
/// are the plant snapshot's columns, prefixed "plant.". advance() fails when
/// the integrator gives up or any state becomes non-finite: a plant in that
/// state must not feed another scan.
class PlantAdapter final : public io::InputPort,
                           public io::OutputPort,
                           public io::Steppable,
                           public TraceSource,
                           public FaultTarget {
 public:
  explicit PlantAdapter(hostsim::Plant& plant);
  /// Every capability of the adapter, as one backend.
  BenchBackend backend() { return BenchBackend{this, this, this, this, this}; }

 private:
  io::PortStatus do_read(core::InputImage& inputs, std::uint64_t) override {
    plant_.read_inputs(inputs);
    return io::PortStatus::ok();
  }
  io::PortStatus do_write(const core::OutputImage& outputs, std::uint64_t) override {
    plant_.apply_outputs(outputs);
    return io::PortStatus::ok();
  }
  io::PortStatus do_advance(std::uint64_t dt_us) override;
  std::vector<Signal> do_signals() const override { return signals_; }
  void do_sample(std::vector<double>& values) const override;
  std::optional<std::string> do_inject(const nlohmann::json& fault) override;

  hostsim::Plant& plant_;
  std::vector<Signal> signals_;
};

/// What the scenario loader must know about `plant`: which inputs it drives,
/// its signal names, and how to check a plant fault object.
PlantFacts plant_facts(const hostsim::Plant& plant, const core::MachineConfig& machine,
                       const std::vector<Signal>& signals);

}  // namespace spoolstep::benchrun

#pragma once
/// Shared steps of the commands that run a machine: load the machine file
/// and the scenario, print every error the same way, run with progress.
#include <filesystem>
#include <initializer_list>
#include <iostream>
#include <memory>
#include <string>

#include "spoolstep/benchrun/runner.hpp"
#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/core/controller.hpp"
#include "spoolstep/hostsim/plant.hpp"
#include "spoolstep/machine_file/machine_file.hpp"
#include "spoolstep/runtime/scan_loop.hpp"

namespace spoolstep::cli {

/// Loads a machine file; prints every error to stderr and returns null on failure.
inline std::unique_ptr<machine_file::LoadedMachine> load_machine_or_report(const std::string& path,
                                                                           const char* command) {
  machine_file::LoadResult result = machine_file::load_machine_file(path);
  if (!result.ok()) {
    for (const auto& e : result.errors) std::cerr << "spoolstep " << command << ": " << e.to_string() << "\n";
    return nullptr;
  }
  return std::move(result.machine);
}

/// True when the machine file's plant section (if it has one) builds; prints
/// every problem otherwise. A command that does not run the plant (replay)
/// still refuses a file whose plant section is broken, so that one file gets
/// one answer from every command.
/// Each problem line starts with `prefix`; `consequence` ("nothing written"),
/// when given, closes the list with a count.
inline bool plant_section_ok_or_report(const machine_file::LoadedMachine& machine, const std::string& path,
                                       const std::string& prefix, const char* consequence = nullptr) {
  if (machine.plant.is_null()) return true;
  hostsim::BuildResult built = hostsim::build_plant(machine.plant, machine.config, path);
  const auto* errors = std::get_if<std::vector<hostsim::PlantError>>(&built);
  if (errors == nullptr) return true;
  for (const auto& e : *errors) std::cerr << prefix << e.to_string() << "\n";
  if (consequence != nullptr) {
    std::cerr << path << ": " << errors->size() << " error" << (errors->size() == 1 ? "" : "s")
              << " in the plant section; " << consequence << "\n";
  }
  return false;
}

/// Loads a scenario against a machine; prints every error and returns null on failure.
inline std::unique_ptr<benchrun::Scenario> load_scenario_or_report(const std::string& path,
                                                                   const core::MachineConfig& machine,
                                                                   const benchrun::PlantFacts* plant,
                                                                   const char* command) {
  benchrun::ScenarioLoad result = benchrun::load_scenario_file(path, machine, plant);
  if (!result.ok()) {
    for (const auto& e : result.errors) std::cerr << "spoolstep " << command << ": " << e.to_string() << "\n";
    return nullptr;
  }
  return std::move(result.scenario);
}

/// True when `output` names the same file as one of `inputs` (an output
/// must never overwrite what the command reads).
inline bool overwrites_an_input(const std::string& output, std::initializer_list<std::string> inputs) {
  std::error_code ec;
  for (const std::string& input : inputs) {
    if (std::filesystem::exists(output, ec) && std::filesystem::equivalent(output, input, ec)) return true;
  }
  return false;
}

/// Progress lines on stderr, one per tenth of the run.
inline benchrun::RunOptions progress_on_stderr(const char* command) {
  benchrun::RunOptions options;
  options.progress = [command](double done_s, double total_s) {
    std::cerr << "spoolstep " << command << ": " << static_cast<int>(100.0 * done_s / total_s + 0.5) << "% ("
              << done_s << " of " << total_s << " s simulated)\n";
  };
  return options;
}

}  // namespace spoolstep::cli

// `spoolstep check MACHINE.json [--summary] [--reference] [--plant-reference]`: loads a machine
// file and reports every problem in it, or a one-line verdict and, on
// request, a summary of what the core will run.
#include <iostream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "spoolstep/core/controller.hpp"
#include "spoolstep/hostsim/plant.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::cli {
namespace {

struct CheckOptions {
  std::string machine_file;
  bool summary = false;
  bool reference = false;
  bool plant_reference = false;
};

int run_check(const CheckOptions& options) {
  if (options.plant_reference) {
    // The copy between the markers in docs/plant-model.md is this text.
    std::cout << hostsim::plant_parameter_table_markdown();
    if (options.machine_file.empty() && !options.reference) return kExitOk;
  }
  if (options.reference) {
    machine_file::write_parameter_reference(std::cout);
    if (options.machine_file.empty()) return kExitOk;
    std::cout << "\n";
  }
  if (options.machine_file.empty()) {
    std::cerr << "spoolstep check: give a machine file (or --reference alone for the parameter reference)\n";
    return kExitBadInput;
  }
  const auto result = machine_file::load_machine_file(options.machine_file);
  if (!result.ok()) {
    for (const auto& error : result.errors) std::cerr << error.to_string() << "\n";
    std::cerr << fmt::format("{}: {} error{}; nothing loaded\n", options.machine_file, result.errors.size(),
                             result.errors.size() == 1 ? "" : "s");
    return kExitBadInput;
  }
  const auto& c = result.machine->config;
  // The plant section (read by the bench) is checked here too, so that a
  // machine file that passes check also runs on the bench.
  std::vector<std::string> unsensed;  // analog inputs no plant sensor drives
  if (!result.machine->plant.is_null()) {
    hostsim::BuildResult built = hostsim::build_plant(result.machine->plant, c, options.machine_file);
    if (auto* errors = std::get_if<std::vector<hostsim::PlantError>>(&built)) {
      for (const auto& e : *errors) std::cerr << e.to_string() << "\n";
      std::cerr << fmt::format("{}: {} error{} in the plant section; nothing loaded\n", options.machine_file,
                               errors->size(), errors->size() == 1 ? "" : "s");
      return kExitBadInput;
    }
    const hostsim::Plant& plant = *std::get<std::unique_ptr<hostsim::Plant>>(built);
    for (std::size_t i = 0; i < c.analog_input_count; ++i) {
      if (!plant.drives_analog_input(i)) unsensed.emplace_back(machine_file::name_view(c.analog_inputs[i].name));
    }
  }
  std::cout << fmt::format(
      "{}: ok ({} functions, {} interlocks, {} steps, {} transitions, {} digital + {} analog inputs, "
      "{} coils + {} proportional outputs, {} condition nodes)\n",
      options.machine_file, c.function_count, c.interlock_count, c.step_count, c.transition_count,
      c.digital_input_count, c.analog_input_count, c.coil_count, c.prop_output_count, c.node_count);
  for (const std::string& name : unsensed) {
    // Not an error (an oil thermometer may well be left out of the model),
    // but a bench run reads such an input only as a scenario sets it.
    std::cout << fmt::format("note: analog input '{}' has no sensor in the plant section: on the bench it reads "
                             "what a scenario sets, else the bottom of its range\n", name);
  }
  for (const std::string& warning : machine_file::configuration_warnings(c)) {
    std::cout << "warning: " << warning << "\n";
  }
  if (options.summary) std::cout << "\n" << machine_file::summarize(c);
  return kExitOk;
}

const bool kRegistered = register_command(Command{
    "check",
    [](CLI::App& sub) {
      auto options = std::make_shared<CheckOptions>();
      sub.add_option("MACHINE", options->machine_file, "Machine file (.json) to check");
      sub.add_flag("--summary", options->summary, "Also print a readable summary of the loaded machine");
      sub.add_flag("--reference", options->reference, "Print the machine-file parameter reference (Markdown)");
      sub.add_flag("--plant-reference", options->plant_reference,
                   "Print the parameter table of the plant section (Markdown, as in docs/plant-model.md)");
      sub.footer("Exit codes: 0 ok, 2 the machine file (control part or plant section) has errors, each printed to "
                 "stderr with its JSON path (a configuration the control core itself rejects included).");
      return [options] { return run_check(*options); };
    },
    "Check a machine file and report every problem in it"});

}  // namespace
}  // namespace spoolstep::cli

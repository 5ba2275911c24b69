// spoolstep: one program, one subcommand per job. Each subcommand registers
// itself from its own cmd_*.cpp file (see command_registry.hpp).
#include <algorithm>
#include <exception>
#include <iostream>
#include <map>
#include <string>

#include "command_registry.hpp"

namespace spoolstep::cli {

std::vector<Command>& command_registry() {
  static std::vector<Command> commands;
  return commands;
}

bool register_command(Command command) {
  command_registry().push_back(std::move(command));
  return true;
}

}  // namespace spoolstep::cli

int main(int argc, char** argv) {
  using namespace spoolstep::cli;
  CLI::App app{
      "spoolstep: check, run and bench hydraulic machine control logic.\n"
      "Not a safety-rated control system: emergency stop and safety functions must be\n"
      "hardwired and designed to ISO 13849 / IEC 62061 and local codes."};
  app.require_subcommand(1);
  auto& commands = command_registry();
  std::sort(commands.begin(), commands.end(),
            [](const Command& a, const Command& b) { return a.name < b.name; });
  std::map<CLI::App*, std::function<int()>> runners;
  for (auto& command : commands) {
    CLI::App* sub = app.add_subcommand(command.name, command.description);
    runners[sub] = command.setup(*sub);
  }
  // A first word that is no command gets named, with the commands there are
  // (the parser alone would only say that a subcommand is required).
  if (argc > 1 && argv[1][0] != '-') {
    const std::string first = argv[1];
    const bool known = std::any_of(commands.begin(), commands.end(),
                                   [&first](const Command& c) { return c.name == first; });
    if (!known) {
      std::string names;
      for (const auto& c : commands) names += (names.empty() ? "" : ", ") + c.name;
      std::cerr << "spoolstep: unknown command '" << first << "'; the commands are " << names
                << " (spoolstep --help)\n";
      return kExitBadInput;
    }
  }
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& error) {
    const int code = app.exit(error);
    return code == 0 ? kExitOk : kExitBadInput;
  }
  for (auto& [sub, run] : runners) {
    if (sub->parsed()) {
      try {
        return run();
      } catch (const std::exception& error) {
        std::cerr << "spoolstep " << sub->get_name() << ": internal error: " << error.what() << "\n";
        return kExitInternal;
      }
    }
  }
  return kExitBadInput;
}

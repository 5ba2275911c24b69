#pragma once
/// Subcommands of the `spoolstep` program register themselves here; each
/// lives in its own cmd_*.cpp so that parts of the project can add commands
/// without touching one another.
#include <functional>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

namespace spoolstep::cli {

/// Exit codes scripts can rely on.
inline constexpr int kExitOk = 0;
inline constexpr int kExitFailed = 1;      ///< the job ran and its verdict is "fail" (an expectation, a check)
inline constexpr int kExitBadInput = 2;    ///< a file or argument is invalid; nothing was written
inline constexpr int kExitInternal = 3;    ///< an unexpected error (I/O, bug)

struct Command {
  std::string name;
  /// Adds the subcommand's options to `sub` and returns the function that runs it.
  std::function<std::function<int()>(CLI::App& sub)> setup;
  std::string description;
};

/// All registered commands, in registration order.
std::vector<Command>& command_registry();

/// Registers a command; used as `static const bool kRegistered = register_command({...});`.
bool register_command(Command command);

}  // namespace spoolstep::cli

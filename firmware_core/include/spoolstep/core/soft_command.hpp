#pragma once
/// Soft operator commands (OperatorCommands, from an HMI, a command channel
/// or a test script): the one table of their names, and the mask a machine
/// file enables them with. A command the file does not enable is refused by
/// the core (EventCode::kSoftCommandRefused) and acts as if it were not given.
#include <cstddef>
#include <cstdint>

#include "spoolstep/core/io_image.hpp"

namespace spoolstep::core {

enum class SoftCommand : std::uint8_t {
  kReset = 0,
  kCycleStart,
  kCycleStop,
  kSelectAuto,
  kContinuous,
  kPumpStart,
  kPumpStop,
  kStop,
  kJog,  ///< hold-to-run per function (OperatorCommands::jog)
};
inline constexpr std::size_t kSoftCommandCount = 9;

struct SoftCommandRow {
  SoftCommand command;
  const char* name;     ///< as machine files and scenarios write it
  const char* meaning;  ///< one line for references and messages
};

// clang-format off
inline constexpr SoftCommandRow kSoftCommandTable[kSoftCommandCount] = {
  {SoftCommand::kReset,      "reset",       "reset (rising edge), OR-ed with operator.reset"},
  {SoftCommand::kCycleStart, "cycle_start", "cycle start (rising edge); refused by the loader where a two-hand device starts the cycle"},
  {SoftCommand::kCycleStop,  "cycle_stop",  "stop at the end of the cycle"},
  {SoftCommand::kSelectAuto, "select_auto", "select automatic; refused by the loader where operator.auto_mode names a selector"},
  {SoftCommand::kContinuous, "continuous",  "continuous cycling"},
  {SoftCommand::kPumpStart,  "pump_start",  "pump start (rising edge)"},
  {SoftCommand::kPumpStop,   "pump_stop",   "pump stop"},
  {SoftCommand::kStop,       "stop",        "operator stop (category 2)"},
  {SoftCommand::kJog,        "jog",         "hold-to-run jog of a function in manual mode"},
};
// clang-format on

static_assert(kSoftCommandCount <= 16, "the enable mask is 16 bits");

/// Bit of `command` in OperatorConfig::soft_commands.
constexpr std::uint16_t soft_command_bit(SoftCommand command) {
  return static_cast<std::uint16_t>(1u << static_cast<unsigned>(command));
}

/// Name of `command` from kSoftCommandTable ("?" for a value outside it).
constexpr const char* soft_command_name(SoftCommand command) {
  const auto i = static_cast<std::size_t>(command);
  return i < kSoftCommandCount ? kSoftCommandTable[i].name : "?";
}

/// The flag of an on/off soft command in `commands`; nullptr for kJog (a
/// per-function direction, not a flag) and for values outside the table.
constexpr bool* soft_command_flag(OperatorCommands& commands, SoftCommand command) {
  switch (command) {
    case SoftCommand::kReset: return &commands.reset;
    case SoftCommand::kCycleStart: return &commands.cycle_start;
    case SoftCommand::kCycleStop: return &commands.cycle_stop;
    case SoftCommand::kSelectAuto: return &commands.select_auto;
    case SoftCommand::kContinuous: return &commands.continuous;
    case SoftCommand::kPumpStart: return &commands.pump_start;
    case SoftCommand::kPumpStop: return &commands.pump_stop;
    case SoftCommand::kStop: return &commands.stop;
    case SoftCommand::kJog: return nullptr;
  }
  return nullptr;
}

/// The mask of the soft commands given in `commands` (a jog of any function
/// counts as kJog).
constexpr std::uint16_t soft_commands_given(const OperatorCommands& commands) {
  unsigned given = 0;
  if (commands.reset) given |= soft_command_bit(SoftCommand::kReset);
  if (commands.cycle_start) given |= soft_command_bit(SoftCommand::kCycleStart);
  if (commands.cycle_stop) given |= soft_command_bit(SoftCommand::kCycleStop);
  if (commands.select_auto) given |= soft_command_bit(SoftCommand::kSelectAuto);
  if (commands.continuous) given |= soft_command_bit(SoftCommand::kContinuous);
  if (commands.pump_start) given |= soft_command_bit(SoftCommand::kPumpStart);
  if (commands.pump_stop) given |= soft_command_bit(SoftCommand::kPumpStop);
  if (commands.stop) given |= soft_command_bit(SoftCommand::kStop);
  for (const Direction d : commands.jog) {
    if (d != Direction::kNone) given |= soft_command_bit(SoftCommand::kJog);
  }
  return static_cast<std::uint16_t>(given);
}

}  // namespace spoolstep::core

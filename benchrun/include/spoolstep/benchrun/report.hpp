#pragma once
/// The files a bench run leaves behind: summary.json and a self-contained
/// report.html, written into an output directory that appears whole or not
/// at all.
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "spoolstep/benchrun/fault_log.hpp"
#include "spoolstep/benchrun/sinks.hpp"
#include "spoolstep/core/config.hpp"

namespace spoolstep::benchrun {

/// The caution every report carries.
extern const char* const kSafetyCaution;

struct RunReport {
  std::string machine_path;
  std::string scenario_path;
  std::string scenario_description;
  const core::MachineConfig* machine = nullptr;
  double duration_s = 0.0;
  std::uint64_t scans = 0;
  bool completed = false;
  std::string run_error;
  std::vector<ExpectationResult> expectations;
  std::vector<FaultEntry> faults;  ///< every fault the core raised, in order
  std::vector<NoticeEntry> notices;  ///< refused starts and commands, in order
  const FigureCollector* figures = nullptr;
  const PlotCollector* plots = nullptr;
};

/// summary.json: each expectation's result and the key figures.
nlohmann::json summary_json(const RunReport& report);

/// report.html: inline SVG plots (positions, pressures, valve commands and
/// spool positions, the step timeline), the results and the caution.
std::string report_html(const RunReport& report);


}  // namespace spoolstep::benchrun

#pragma once
/// Consumers of a run's rows: file writers, the expectation checker, the
/// figure collector and the plot collector for the report.
#include <map>
#include <ostream>
#include <string>
#include <vector>

#include "spoolstep/benchrun/scenario.hpp"
#include "spoolstep/benchrun/trace.hpp"
#include "spoolstep/core/config.hpp"

namespace spoolstep::benchrun {

/// Writes every row as CSV: a header of signal names (with units), then
/// one line per scan, numbers printed the same way on every run.
class CsvTraceWriter final : public TraceSink {
 public:
  explicit CsvTraceWriter(std::ostream& out) : out_(out) {}
  void begin(const std::vector<Signal>& signals) override;
  void row(double t_s, const std::vector<double>& values) override;
  void end(double) override {}

 private:
  std::ostream& out_;
};

/// Writes digital and integer signals as an IEEE 1364 Value Change Dump
/// (timescale 1 us), for any waveform viewer.
class VcdWriter final : public TraceSink {
 public:
  VcdWriter(std::ostream& out, std::string scope) : out_(out), scope_(std::move(scope)) {}
  void begin(const std::vector<Signal>& signals) override;
  void row(double t_s, const std::vector<double>& values) override;
  void end(double t_end_s) override;

 private:
  std::ostream& out_;
  std::string scope_;
  std::vector<int> columns_;   // signal index of each dumped variable
  std::vector<std::string> ids_;
  std::vector<bool> is_integer_;
  std::vector<double> last_;
  bool first_ = true;
};

struct ExpectationResult {
  std::string name;
  std::string kind;
  bool passed = false;
  std::string detail;  ///< what was observed
};

/// Checks a scenario's expectations while the rows stream by.
class ExpectationChecker final : public TraceSink {
 public:
  ExpectationChecker(const Scenario& scenario, const core::MachineConfig& machine);
  void begin(const std::vector<Signal>& signals) override;
  void row(double t_s, const std::vector<double>& values) override;
  void end(double t_end_s) override;
  const std::vector<ExpectationResult>& results() const { return results_; }
  bool all_passed() const;

 private:
  struct Live {
    int column = -1;
    int input_column = -1;
    bool done = false;
    bool failed = false;
    double observed_min = 1e300;
    double observed_max = -1e300;
    double first_time = -1.0;
    double fail_time = 0.0;
    double off_since = -1.0;  // still_while_off: when the input last went off
    bool ever_off = false;    // still_while_off: the input was off at least once past the grace
    double previous_step = -1.0;  // step_reached: the step of the previous row
    double safe_since = -1.0;     // safe_within: first all-off sample in time
    double relapse_time = -1.0;   // safe_within: a valve came on again during the hold
    double last_value = 0.0;
    std::uint64_t not_finite = 0;  // samples that were NaN or infinite (each one a failure)
  };
  const Scenario& scenario_;
  const core::MachineConfig& machine_;
  std::vector<Live> live_;
  std::vector<int> valve_columns_;
  int state_column_ = -1;
  int step_column_ = -1;
  std::vector<ExpectationResult> results_;
  double last_row_s_ = -1.0;
};

/// Key figures of a run: cycle times, peak of every pressure signal, top
/// speed of every velocity signal.
class FigureCollector final : public TraceSink {
 public:
  void begin(const std::vector<Signal>& signals) override;
  void row(double t_s, const std::vector<double>& values) override;
  void end(double) override {}
  struct Peak {
    std::string signal, unit;
    double value = 0.0;
    double at_s = 0.0;
  };
  const std::vector<double>& cycle_times_s() const { return cycle_times_; }
  const std::vector<Peak>& peak_pressures() const { return pressures_; }
  const std::vector<Peak>& top_speeds() const { return speeds_; }

 private:
  std::vector<int> pressure_columns_, speed_columns_;
  std::vector<Peak> pressures_, speeds_;
  std::vector<double> cycle_times_;
  int step_column_ = -1;
  int cycles_column_ = -1;
  double last_cycles_ = 0.0;
  double cycle_start_s_ = -1.0;
  double last_step_ = 0.0;
};

/// Keeps a reduced copy of the run for plots: per bucket of rows, the
/// minimum and maximum of each signal, so peaks survive the reduction.
class PlotCollector final : public TraceSink {
 public:
  PlotCollector(double duration_s, double period_s, std::size_t max_points = 1500);
  void begin(const std::vector<Signal>& signals) override;
  void row(double t_s, const std::vector<double>& values) override;
  void end(double) override;
  const std::vector<Signal>& signals() const { return signals_; }
  /// Time stamps and, per signal, the reduced values (two points per bucket).
  const std::vector<double>& times() const { return times_; }
  const std::vector<std::vector<double>>& series() const { return series_; }

 private:
  void flush();
  std::size_t rows_per_bucket_ = 1;
  std::vector<Signal> signals_;
  std::vector<double> times_;
  std::vector<std::vector<double>> series_;
  std::vector<double> bucket_min_, bucket_max_;
  std::vector<double> bucket_min_t_, bucket_max_t_;
  std::size_t in_bucket_ = 0;
};

/// Prints one line per change of a digital or integer signal, naming
/// machine states and steps (for runs without a plant).
class ChangePrinter final : public TraceSink {
 public:
  ChangePrinter(std::ostream& out, const core::MachineConfig& machine) : out_(out), machine_(machine) {}
  void begin(const std::vector<Signal>& signals) override;
  void row(double t_s, const std::vector<double>& values) override;
  void end(double) override {}

 private:
  std::string describe(std::size_t column, double value) const;
  std::ostream& out_;
  const core::MachineConfig& machine_;
  std::vector<Signal> signals_;
  std::vector<double> last_;
  bool first_ = true;
};

/// True for the units a pressure transducer reports in (bar, mbar, Pa, kPa, MPa, psi).
bool is_pressure_unit(const std::string& unit);

/// Name of a machine state as scenarios and reports write it.
const char* state_name(std::uint8_t state);

}  // namespace spoolstep::benchrun

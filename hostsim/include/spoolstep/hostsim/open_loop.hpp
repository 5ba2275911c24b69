#pragma once
/// The pure-plant API: drive a plant with a prescribed command timeline (no
/// control core), record a trace, and write the same case as JSON for the
/// independent reference integrator in tools/ref/plant_ref.py.
#include <string>
#include <vector>

#include <nlohmann/json_fwd.hpp>

#include "spoolstep/hostsim/plant.hpp"

namespace spoolstep::hostsim {

/// One command change at a time instant.
struct TimelineEvent {
  enum class What { kSpool, kPump, kFault };
  double time_s = 0.0;
  What what = What::kSpool;
  std::string function;   ///< kSpool: function whose spool target changes
  double target = 0.0;    ///< kSpool: -1..1
  bool running = false;   ///< kPump
  bool loaded = false;    ///< kPump: dump valve closed
  PlantFault fault;       ///< kFault
};

struct Timeline {
  std::vector<TimelineEvent> events;  ///< in time order
  double end_s = 0.0;
  /// Appends a spool target change of `function`'s valve at `time_s`.
  void spool(double time_s, const char* function, double target) {
    TimelineEvent e;
    e.time_s = time_s;
    e.what = TimelineEvent::What::kSpool;
    e.function = function;
    e.target = target;
    events.push_back(e);
  }
  /// Appends a pump state change at `time_s`.
  void pump(double time_s, bool running, bool loaded) {
    TimelineEvent e;
    e.time_s = time_s;
    e.what = TimelineEvent::What::kPump;
    e.running = running;
    e.loaded = loaded;
    events.push_back(e);
  }
};

/// The network inputs in force from start_s on.
struct InputSegment {
  double start_s = 0.0;
  NetworkInputs inputs;
};

/// Samples of every snapshot column at each period boundary.
struct Trace {
  std::vector<InputSegment> segments;  ///< inputs as they changed, for the reference case
  std::vector<std::string> names;
  std::vector<double> time_s;
  std::vector<std::vector<double>> rows;
  /// Column index of a name, or -1.
  int column(const std::string& name) const;
  /// One column as a series.
  std::vector<double> series(const std::string& name) const;
};

/// Runs the plant from its present time through the timeline with the given
/// period; events take effect at the first period boundary at or after their
/// time. Records a snapshot after every period (and one at the start).
/// Returns false if the integrator failed (the trace ends there).
bool run_open_loop(Plant& plant, const Timeline& timeline, double period_s, Trace& trace);

/// The network, the state y0 the run started from, the piecewise-constant
/// inputs recorded in `trace` and its sample times, as JSON for
/// tools/ref/plant_ref.py (which integrates the same equations on its own).
nlohmann::json reference_case(const Network& net, const std::vector<double>& y0, const Trace& trace,
                              double rtol, double atol);

}  // namespace spoolstep::hostsim

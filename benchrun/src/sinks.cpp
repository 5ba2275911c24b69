#include "spoolstep/benchrun/sinks.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "spoolstep/core/io_image.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {
namespace {

// Fixed, locale-free number format: the same run prints the same bytes.
std::string number(double v) {
  if (v == 0.0) return "0";  // also folds -0
  return fmt::format("{:.9g}", v);
}

}  // namespace

bool is_pressure_unit(const std::string& unit) {
  for (const char* u : {"bar", "mbar", "Pa", "kPa", "MPa", "psi"}) {
    if (unit == u) return true;
  }
  return false;
}

const char* state_name(std::uint8_t state) {
  static const char* const kNames[] = {"power_up",       "manual",    "auto_idle", "auto_cycle",
                                       "auto_end_cycle", "auto_held", "stopping",  "faulted"};
  static_assert(sizeof(kNames) / sizeof(kNames[0]) == core::kMachineStateCount);
  return state < core::kMachineStateCount ? kNames[state] : "unknown";
}

// ------------------------------------------------------------------ CSV --

void CsvTraceWriter::begin(const std::vector<Signal>& signals) {
  // RFC 4180: a header field holding a comma, quote or line break is quoted,
  // with quotes doubled (units come from the machine file as free text).
  auto field = [](const std::string& text) {
    if (text.find_first_of(",\"\r\n") == std::string::npos) return text;
    std::string quoted = "\"";
    for (char c : text) quoted += c == '"' ? std::string("\"\"") : std::string(1, c);
    return quoted + "\"";
  };
  out_ << "t_s";
  for (const Signal& s : signals) out_ << ',' << field(s.unit.empty() ? s.name : s.name + "[" + s.unit + "]");
  out_ << '\n';
}

void CsvTraceWriter::row(double t_s, const std::vector<double>& values) {
  // One buffer per row: formatting straight into the stream value by value
  // costs more than the simulation itself.
  fmt::memory_buffer line;
  fmt::format_to(std::back_inserter(line), "{:.6f}", t_s);
  for (double v : values) {
    if (v == 0.0) {
      line.append(std::string_view(",0"));  // also folds -0
    } else {
      fmt::format_to(std::back_inserter(line), ",{:.9g}", v);
    }
  }
  line.push_back('\n');
  out_.write(line.data(), static_cast<std::streamsize>(line.size()));
}

// ------------------------------------------------------------------ VCD --

void VcdWriter::begin(const std::vector<Signal>& signals) {
  // IEEE 1364-2005 clause 18: header, one scope, variables, then changes.
  out_ << "$comment spoolstep bench run $end\n$timescale 1 us $end\n";
  out_ << "$scope module " << scope_ << " $end\n";
  for (std::size_t i = 0; i < signals.size(); ++i) {
    const Signal& s = signals[i];
    if (s.kind == SignalKind::kAnalog) continue;
    // Identifier codes: printable ASCII 33..126, base 94.
    std::string id;
    std::size_t n = columns_.size();
    do {
      id += static_cast<char>(33 + n % 94);
      n /= 94;
    } while (n != 0);
    std::string name = s.name;
    std::replace(name.begin(), name.end(), '.', '_');
    const bool integer = s.kind == SignalKind::kInteger;
    if (!s.value_names.empty()) {
      // A waveform viewer shows the number; the comment says what it means.
      out_ << "$comment " << name << " values:";
      for (std::size_t v = 0; v < s.value_names.size(); ++v) out_ << ' ' << v << '=' << s.value_names[v];
      out_ << " $end\n";
    }
    out_ << "$var " << (integer ? "integer 32 " : "wire 1 ") << id << ' ' << name << " $end\n";
    columns_.push_back(static_cast<int>(i));
    ids_.push_back(id);
    is_integer_.push_back(integer);
  }
  out_ << "$upscope $end\n$enddefinitions $end\n";
  last_.assign(columns_.size(), 0.0);
}

void VcdWriter::row(double t_s, const std::vector<double>& values) {
  std::string changes;
  for (std::size_t k = 0; k < columns_.size(); ++k) {
    const double v = values[static_cast<std::size_t>(columns_[k])];
    if (!first_ && v == last_[k]) continue;
    last_[k] = v;
    if (is_integer_[k]) {
      auto x = static_cast<unsigned long long>(v < 0 ? 0 : v);
      std::string bits;
      do {
        bits.insert(bits.begin(), static_cast<char>('0' + (x & 1u)));
        x >>= 1u;
      } while (x != 0);
      changes += "b" + bits + " " + ids_[k] + "\n";
    } else {
      changes += (v != 0.0 ? "1" : "0") + ids_[k] + "\n";
    }
  }
  if (changes.empty()) return;
  const auto t_us = static_cast<long long>(std::llround(t_s * 1e6));
  out_ << '#' << t_us << '\n';
  if (first_) out_ << "$dumpvars\n" << changes << "$end\n";
  else out_ << changes;
  first_ = false;
}

void VcdWriter::end(double t_end_s) {
  out_ << '#' << static_cast<long long>(std::llround(t_end_s * 1e6)) << '\n';
}

// --------------------------------------------------------- expectations --

ExpectationChecker::ExpectationChecker(const Scenario& scenario, const core::MachineConfig& machine)
    : scenario_(scenario), machine_(machine) {}

void ExpectationChecker::begin(const std::vector<Signal>& signals) {
  live_.assign(scenario_.expectations.size(), Live{});
  state_column_ = find_signal(signals, "state");
  step_column_ = find_signal(signals, "step");
  valve_columns_.clear();
  // Valve outputs are the coils and channels the functions own (not the pump).
  for (std::uint8_t f = 0; f < machine_.function_count; ++f) {
    const core::FunctionConfig& fn = machine_.functions[f];
    for (std::uint8_t coil : {fn.coil_extend, fn.coil_retract}) {
      if (coil != core::kNoIndex8)
        valve_columns_.push_back(find_signal(signals, "coil." + std::string(machine_file::name_view(machine_.coils[coil]))));
    }
    for (std::uint8_t ch : {fn.prop_extend, fn.prop_retract}) {
      if (ch != core::kNoIndex8)
        valve_columns_.push_back(find_signal(signals, "out." + std::string(machine_file::name_view(machine_.prop_outputs[ch].name))));
    }
  }
  for (std::size_t k = 0; k < scenario_.expectations.size(); ++k) {
    const Expectation& x = scenario_.expectations[k];
    if (!x.signal.empty()) live_[k].column = find_signal(signals, x.signal);
    if (x.kind == Expectation::Kind::kStillWhileOff) {
      live_[k].input_column = find_signal(signals, "di." + std::string(machine_file::name_view(machine_.digital_inputs[x.input])));
    }
  }
}

void ExpectationChecker::row(double t_s, const std::vector<double>& v) {
  const double eps = 1e-9;
  last_row_s_ = t_s;
  for (std::size_t k = 0; k < live_.size(); ++k) {
    const Expectation& x = scenario_.expectations[k];
    Live& l = live_[k];
    if (l.done) continue;
    switch (x.kind) {
      case Expectation::Kind::kStepReached: {
        // Reached means entered: a step active from the first row (the
        // initial step) has not been reached by anything the run did.
        const double step = v[static_cast<std::size_t>(step_column_)];
        if (step == x.step && l.previous_step >= 0.0 && l.previous_step != x.step && t_s <= x.before_s + eps) {
          l.first_time = t_s;
          l.done = true;
        }
        l.previous_step = step;
        break;
      }
      case Expectation::Kind::kStateAt:
        if (t_s + eps >= x.at_s) {
          l.last_value = v[static_cast<std::size_t>(state_column_)];
          l.first_time = t_s;
          l.done = true;
        }
        break;
      case Expectation::Kind::kStaysWithin:
        if (t_s + eps >= x.from_s && t_s <= x.to_s + eps) {
          const double y = v[static_cast<std::size_t>(l.column)];
          // NaN compares false with every limit: a non-finite sample is a
          // failure of its own, never "within".
          if (!std::isfinite(y)) {
            ++l.not_finite;
            if (!l.failed) { l.failed = true; l.last_value = y; l.fail_time = t_s; }
            break;
          }
          if (y < l.observed_min) l.observed_min = y;
          if (y > l.observed_max) { l.observed_max = y; l.first_time = t_s; }
          if ((y < x.min || y > x.max) && !l.failed) { l.failed = true; l.last_value = y; l.fail_time = t_s; }
        }
        break;
      case Expectation::Kind::kStillWhileOff:
        if (v[static_cast<std::size_t>(l.input_column)] != 0.0) {
          l.off_since = -1.0;
        } else if (l.off_since < 0.0) {
          l.off_since = t_s;
        }
        if (l.off_since >= 0.0 && (t_s - l.off_since) * 1e3 + eps >= x.grace_ms) {
          l.ever_off = true;
          const double y = std::fabs(v[static_cast<std::size_t>(l.column)]);
          if (!std::isfinite(y)) ++l.not_finite;
          else if (y > l.observed_max) l.observed_max = y;
          if ((!std::isfinite(y) || y > x.tolerance) && !l.failed) { l.failed = true; l.fail_time = t_s; l.last_value = y; }
        }
        break;
      case Expectation::Kind::kSafeWithin:
        if (t_s + eps >= x.at_s) {
          bool safe = true;
          for (int c : valve_columns_) safe = safe && (c < 0 || v[static_cast<std::size_t>(c)] == 0.0);
          if (l.safe_since < 0.0) {
            if (safe) l.safe_since = t_s;
          } else if (!safe) {
            l.relapse_time = t_s;  // came on again during the hold
            l.done = true;
          } else if ((t_s - l.safe_since) * 1e3 + eps >= x.hold_ms) {
            l.done = true;
          }
          if (l.safe_since >= 0.0) l.first_time = l.safe_since;
        }
        break;
      case Expectation::Kind::kFinalWithin:
        l.last_value = v[static_cast<std::size_t>(l.column)];
        if (!std::isfinite(l.last_value)) ++l.not_finite;
        break;
    }
  }
}

void ExpectationChecker::end(double t_end_s) {
  results_.clear();
  t_end_s = last_row_s_ >= 0.0 ? last_row_s_ : t_end_s;  // the time actually simulated
  // A run that ended before the scenario's end has not shown what the
  // expectations over the whole run ask: those fail rather than pass on
  // the part that ran.
  // (a completed run's last row is less than one period before the end).
  const double period_s = static_cast<double>(machine_.safety.scan_period_us == 0 ? 1000 : machine_.safety.scan_period_us) * 1e-6;
  const bool ended_early = t_end_s + period_s <= scenario_.duration_s + 1e-9;
  const std::string early = fmt::format("the run ended at {:.3f} s, before the scenario's end at {:.3f} s", t_end_s,
                                        scenario_.duration_s);
  for (std::size_t k = 0; k < live_.size(); ++k) {
    const Expectation& x = scenario_.expectations[k];
    const Live& l = live_[k];
    ExpectationResult r;
    r.name = x.name;
    switch (x.kind) {
      case Expectation::Kind::kStepReached:
        r.kind = "step_reached";
        r.passed = l.done;
        r.detail = l.done ? fmt::format("reached at {:.3f} s (limit {:.3f} s)", l.first_time, x.before_s)
                          : fmt::format("not reached by {:.3f} s", std::min(x.before_s, t_end_s));
        break;
      case Expectation::Kind::kStateAt:
        r.kind = "state_at";
        r.passed = l.done && l.last_value == x.state;
        r.detail = l.done ? fmt::format("state {} at {:.3f} s (expected {})", state_name(static_cast<std::uint8_t>(l.last_value)), l.first_time, state_name(x.state))
                          : "the run ended before that time";
        break;
      case Expectation::Kind::kStaysWithin:
        r.kind = "stays_within";
        r.passed = !l.failed && l.observed_max >= l.observed_min && (x.to_s > 1e299 || x.to_s <= t_end_s + 1e-9);
        if (x.to_s > 1e299 && ended_early) {
          r.passed = false;
          r.detail = early;
          break;
        }
        if (x.to_s < 1e299 && x.to_s > t_end_s + 1e-9) {
          r.detail = fmt::format("the run ended at {:.3f} s, before the window's end at {:.3f} s", t_end_s, x.to_s);
          break;
        }
        r.detail = l.observed_max < l.observed_min
                       ? (l.not_finite > 0 ? fmt::format("{}: every sample in the window was NaN or infinite", x.signal)
                                           : std::string("no samples in the time window"))
                   : fmt::format("{} ranged {} .. {} (allowed {} .. {}){}", x.signal, number(l.observed_min), number(l.observed_max),
                                 x.min < -1e299 ? "-inf" : number(x.min), x.max > 1e299 ? "inf" : number(x.max),
                                 l.failed ? fmt::format(", first out at {:.3f} s", l.fail_time) : "");
        if (l.not_finite > 0) r.detail += fmt::format("; {} samples were not finite (NaN or infinity)", l.not_finite);
        break;
      case Expectation::Kind::kStillWhileOff:
        r.kind = "still_while_off";
        r.passed = !l.failed && l.ever_off && !ended_early;
        if (ended_early) {
          r.detail = early;
          break;
        }
        if (!l.ever_off) {
          r.detail = fmt::format("{} was never off (past the grace time): nothing was checked",
                                 machine_file::name_view(machine_.digital_inputs[x.input]));
          break;
        }
        r.detail = fmt::format("largest |{}| while {} was off (after {} ms): {} (tolerance {}){}", x.signal,
                               machine_file::name_view(machine_.digital_inputs[x.input]), number(x.grace_ms),
                               l.observed_max < 0 ? "0 (never off)" : number(l.observed_max), number(x.tolerance),
                               l.failed ? fmt::format(", first exceeded at {:.3f} s", l.fail_time) : "");
        if (l.not_finite > 0) r.detail += fmt::format("; {} samples were not finite (NaN or infinity)", l.not_finite);
        break;
      case Expectation::Kind::kSafeWithin: {
        r.kind = "safe_within";
        const double took_ms = std::max(0.0, (l.safe_since - x.at_s) * 1e3);
        if (l.safe_since < 0.0) {
          r.detail = "valve outputs never all off";
        } else if (l.relapse_time >= 0.0) {
          r.detail = fmt::format("valve outputs off {:.1f} ms after {:.3f} s, but on again at {:.3f} s", took_ms,
                                 x.at_s, l.relapse_time);
        } else if (!l.done) {
          r.detail = fmt::format("valve outputs off {:.1f} ms after {:.3f} s; the run ended before {} ms of hold",
                                 took_ms, x.at_s, number(x.hold_ms));
        } else {
          r.passed = took_ms <= x.within_ms + 1e-6;
          r.detail = fmt::format("valve outputs off {:.1f} ms after {:.3f} s (limit {} ms) and stayed off {} ms",
                                 took_ms, x.at_s, number(x.within_ms), number(x.hold_ms));
        }
        break;
      }
      case Expectation::Kind::kFinalWithin:
        r.kind = "final_within";
        r.passed = std::isfinite(l.last_value) && l.last_value >= x.min && l.last_value <= x.max && !ended_early;
        if (ended_early) {
          r.detail = early;
          break;
        }
        r.detail = fmt::format("{} = {} at the end (allowed {} .. {})", x.signal, number(l.last_value),
                               x.min < -1e299 ? "-inf" : number(x.min), x.max > 1e299 ? "inf" : number(x.max));
        break;
    }
    results_.push_back(std::move(r));
  }
}

bool ExpectationChecker::all_passed() const {
  return std::all_of(results_.begin(), results_.end(), [](const ExpectationResult& r) { return r.passed; });
}

// -------------------------------------------------------------- figures --

void FigureCollector::begin(const std::vector<Signal>& signals) {
  step_column_ = find_signal(signals, "step");
  cycles_column_ = find_signal(signals, "cycles");
  for (std::size_t i = 0; i < signals.size(); ++i) {
    const Signal& s = signals[i];
    const bool pressure = s.group == SignalGroup::kPressure ||
                          (s.group == SignalGroup::kInput && is_pressure_unit(s.unit));
    if (pressure) {
      pressure_columns_.push_back(static_cast<int>(i));
      pressures_.push_back(Peak{s.name, s.unit, -1e300, 0.0});
    } else if (s.group == SignalGroup::kVelocity) {
      speed_columns_.push_back(static_cast<int>(i));
      speeds_.push_back(Peak{s.name, s.unit, 0.0, 0.0});
    }
  }
}

void FigureCollector::row(double t_s, const std::vector<double>& v) {
  for (std::size_t k = 0; k < pressure_columns_.size(); ++k) {
    const double p = v[static_cast<std::size_t>(pressure_columns_[k])];
    if (p > pressures_[k].value) pressures_[k] = Peak{pressures_[k].signal, pressures_[k].unit, p, t_s};
  }
  for (std::size_t k = 0; k < speed_columns_.size(); ++k) {
    const double s = std::fabs(v[static_cast<std::size_t>(speed_columns_[k])]);
    if (s > speeds_[k].value) speeds_[k] = Peak{speeds_[k].signal, speeds_[k].unit, s, t_s};
  }
  // A cycle runs from leaving the initial step to the chain's own return to
  // it (the core counts those); a reset after a fault also returns to the
  // initial step but ends no cycle.
  const double step = v[static_cast<std::size_t>(step_column_)];
  const double cycles = v[static_cast<std::size_t>(cycles_column_)];
  if (last_step_ == 0.0 && step != 0.0) cycle_start_s_ = t_s;
  if (cycles > last_cycles_ && cycle_start_s_ >= 0.0) {
    cycle_times_.push_back(t_s - cycle_start_s_);
    cycle_start_s_ = step != 0.0 ? t_s : -1.0;
  }
  if (step == 0.0 && cycles == last_cycles_) cycle_start_s_ = -1.0;  // back without completing: not a cycle
  last_step_ = step;
  last_cycles_ = cycles;
}

// ---------------------------------------------------------------- plots --

PlotCollector::PlotCollector(double duration_s, double period_s, std::size_t max_points) {
  const double rows = duration_s / period_s + 1.0;
  const double per = std::ceil(rows / static_cast<double>(max_points / 2));
  rows_per_bucket_ = per < 1.0 ? 1 : static_cast<std::size_t>(per);
}

void PlotCollector::begin(const std::vector<Signal>& signals) {
  signals_ = signals;
  series_.assign(signals.size(), {});
  bucket_min_.assign(signals.size(), 0.0);
  bucket_max_.assign(signals.size(), 0.0);
  bucket_min_t_.assign(signals.size(), 0.0);
  bucket_max_t_.assign(signals.size(), 0.0);
}

void PlotCollector::row(double t_s, const std::vector<double>& v) {
  for (std::size_t i = 0; i < v.size(); ++i) {
    if (in_bucket_ == 0 || v[i] < bucket_min_[i]) { bucket_min_[i] = v[i]; bucket_min_t_[i] = t_s; }
    if (in_bucket_ == 0 || v[i] > bucket_max_[i]) { bucket_max_[i] = v[i]; bucket_max_t_[i] = t_s; }
  }
  if (in_bucket_ == 0) times_.push_back(t_s);
  ++in_bucket_;
  if (in_bucket_ == rows_per_bucket_) {
    times_.push_back(t_s);
    flush();
  }
}

void PlotCollector::flush() {
  // Two points per bucket: its minimum and maximum, earlier one first.
  for (std::size_t i = 0; i < series_.size(); ++i) {
    const bool min_first = bucket_min_t_[i] <= bucket_max_t_[i];
    series_[i].push_back(min_first ? bucket_min_[i] : bucket_max_[i]);
    series_[i].push_back(min_first ? bucket_max_[i] : bucket_min_[i]);
  }
  in_bucket_ = 0;
}

void PlotCollector::end(double t_end_s) {
  if (in_bucket_ != 0) {
    times_.push_back(t_end_s);
    flush();
  }
}

// -------------------------------------------------------------- changes --

void ChangePrinter::begin(const std::vector<Signal>& signals) {
  signals_ = signals;
  last_.assign(signals.size(), 0.0);
}

std::string ChangePrinter::describe(std::size_t column, double value) const {
  const Signal& s = signals_[column];
  if (s.name == "state") return state_name(static_cast<std::uint8_t>(value));
  if (s.name == "pump") {
    static const char* const kPump[] = {"off", "starting_unloaded", "loading", "ready"};
    const auto i = static_cast<std::size_t>(value);
    return i < 4 ? kPump[i] : "?";
  }
  if (s.name == "step") {
    const auto i = static_cast<std::size_t>(value);
    return i < machine_.step_count ? std::string(machine_file::name_view(machine_.steps[i].name)) : "?";
  }
  if (s.kind == SignalKind::kDigital) return value != 0.0 ? "on" : "off";
  return number(value);
}

void ChangePrinter::row(double t_s, const std::vector<double>& v) {
  for (std::size_t i = 0; i < v.size(); ++i) {
    const Signal& s = signals_[i];
    if (s.kind == SignalKind::kAnalog) continue;
    if (first_ || v[i] != last_[i]) {
      out_ << fmt::format("{:10.3f} s  {:<28} {}\n", t_s, s.name, describe(i, v[i]));
      last_[i] = v[i];
    }
  }
  first_ = false;
}

}  // namespace spoolstep::benchrun

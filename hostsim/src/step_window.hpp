#pragma once
// The stretch of time the plant has already integrated ahead of the core
// under the present inputs (private to hostsim). In a quiet stretch the
// integrator's steps grow past the scan period; instead of cutting every
// step at the period, the plant integrates several periods at once and the
// core's scans read the state between the step points. When the core
// changes an output inside the window, the rest of the window is dropped
// and integration restarts from the state read at that scan.
//
// Between two step points the state is interpolated linearly. For ROS2 that
// is within the tolerance by construction: its error estimate, the
// difference to the embedded first-order solution, is about h^2 |y''| / 2
// per state and is held below the tolerance, while a straight line between
// the ends of a step misses the solution inside by at most h^2 |y''| / 8,
// a quarter of it (common practice, no source). A straight line also stays
// between the ends of a step across a stiff transient, where a cubic
// through the end slopes overshoots (a stiff pressure's slope at a step
// point is its stiffness times the solver's error, not the slope of the
// solution), and it keeps every linear invariant of the state: the oil
// balance holds inside a window as at the step points.
#include <cstddef>
#include <vector>

namespace spoolstep::hostsim {

class StepWindow {
 public:
  /// `reserve_points`: step points held without allocating (more grow the
  /// buffers once, to the working size of the run).
  explicit StepWindow(std::size_t state_size, std::size_t reserve_points = 256) : n_(state_size) {
    t_.reserve(reserve_points);
    y_.reserve(reserve_points * n_);
  }

  void clear() {
    t_.clear();
    y_.clear();
    cursor_ = 0;
  }
  bool empty() const { return t_.empty(); }
  double end_time() const { return t_.back(); }
  std::size_t points() const { return t_.size(); }

  /// Starts a window at (t, y); then add() every accepted step in order.
  void start(double t, const double* y) {
    clear();
    add(t, y);
  }
  void add(double t, const double* y) {
    t_.push_back(t);
    y_.insert(y_.end(), y, y + n_);
  }

  /// Moves the read position to time t (t_0 <= t <= end_time(), never
  /// backwards): calls visit(y) for every step point passed on the way
  /// (t_previous < t_i <= t), in order, then writes y(t) to out, a step
  /// point itself where t is one.
  template <class Visit>
  void read_up_to(double t, Visit&& visit, double* out) {
    while (cursor_ + 1 < t_.size() && t_[cursor_ + 1] <= t) {
      ++cursor_;
      visit(&y_[cursor_ * n_]);
    }
    const double* y0 = &y_[cursor_ * n_];
    if (t <= t_[cursor_] || cursor_ + 1 >= t_.size()) {
      for (std::size_t k = 0; k < n_; ++k) out[k] = y0[k];
      return;
    }
    const double* y1 = &y_[(cursor_ + 1) * n_];
    const double s = (t - t_[cursor_]) / (t_[cursor_ + 1] - t_[cursor_]);
    for (std::size_t k = 0; k < n_; ++k) out[k] = y0[k] + s * (y1[k] - y0[k]);
  }

 private:
  std::size_t n_;
  std::vector<double> t_;   // step points
  std::vector<double> y_;   // n_ per point
  std::size_t cursor_ = 0;  // the step point at or before the last read
};

}  // namespace spoolstep::hostsim

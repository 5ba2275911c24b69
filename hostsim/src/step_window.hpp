#pragma once
// The stretch of time the plant has already integrated ahead of the core
// under the present inputs (private to hostsim). In a quiet stretch the
// integrator's steps grow past the scan period; instead of cutting every
// step at the period, the plant integrates several periods at once and the
// core's scans read the state between the step points by interpolation.
// When the core changes an output inside the window, the rest of the window
// is dropped and integration restarts from the interpolated state at that
// scan.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <utility>
#include <vector>

namespace spoolstep::hostsim {

class StepWindow {
 public:
  /// atol: per-state absolute tolerances, rtol the relative one (they judge
  /// whether the slopes fit a step, see interpolate()).
  StepWindow(std::vector<double> atol, double rtol) : n_(atol.size()), atol_(std::move(atol)), rtol_(rtol) {}

  void clear() {
    t_.clear();
    y_.clear();
    f_.clear();
    f_known_.clear();
    shape_.clear();
    last_ = 0;
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
    f_.resize(f_.size() + n_);
    f_known_.push_back(0);
    shape_.push_back(kShapeUnknown);
  }

  /// Calls visit(y) for every step point with t_from < t_i <= t_to, in order.
  template <class Visit>
  void visit_points(double t_from, double t_to, Visit&& visit) const {
    for (std::size_t i = 1; i < t_.size(); ++i) {
      if (t_[i] > t_from && t_[i] <= t_to) visit(&y_[i * n_]);
    }
  }

  /// y(t) for t_0 <= t <= end_time(): a step point itself where t is one,
  /// else cubic Hermite between the two points around t, with the slopes
  /// f(t_i, y_i) evaluated through rhs(t, y, dydt) when first needed.
  /// Hermite interpolation is exact for cubics; its error, h^4/384 times
  /// the fourth derivative, stays well under the step's own local error
  /// where the error control let the step grow (common practice, no
  /// source). A step across a stiff transient is right at its ends, but
  /// there the end slopes say nothing of the inside (h f can be a hundred
  /// times the change over the step) and the cubic would overshoot, showing
  /// a peak that never was: such a step is interpolated linearly, which
  /// stays between its ends. Both forms are linear in the points and
  /// slopes, so linear invariants of the state (the oil balance) hold
  /// inside the window as well.
  template <class Rhs>
  void interpolate(double t, Rhs&& rhs, double* out) {
    if (last_ >= t_.size() || t_[last_] > t) last_ = 0;
    while (last_ + 1 < t_.size() && t_[last_ + 1] < t) ++last_;
    const std::size_t i = last_;
    const double* y0 = &y_[i * n_];
    if (t <= t_[i] || i + 1 >= t_.size()) {
      for (std::size_t k = 0; k < n_; ++k) out[k] = y0[k];
      return;
    }
    const double* y1 = &y_[(i + 1) * n_];
    if (t >= t_[i + 1]) {
      for (std::size_t k = 0; k < n_; ++k) out[k] = y1[k];
      return;
    }
    const double* f0 = slope(i, rhs);
    const double* f1 = slope(i + 1, rhs);
    const double h = t_[i + 1] - t_[i];
    const double s = (t - t_[i]) / h;
    if (shape_[i] == kShapeUnknown) shape_[i] = slopes_fit(y0, y1, f0, f1, h) ? kShapeCubic : kShapeLinear;
    if (shape_[i] == kShapeLinear) {
      for (std::size_t k = 0; k < n_; ++k) out[k] = y0[k] + s * (y1[k] - y0[k]);
      return;
    }
    const double s2 = s * s;
    const double s3 = s2 * s;
    const double h00 = 2.0 * s3 - 3.0 * s2 + 1.0;
    const double h10 = (s3 - 2.0 * s2 + s) * h;
    const double h01 = -2.0 * s3 + 3.0 * s2;
    const double h11 = (s3 - s2) * h;
    for (std::size_t k = 0; k < n_; ++k) out[k] = h00 * y0[k] + h10 * f0[k] + h01 * y1[k] + h11 * f1[k];
  }

  /// Whether the interval starting at step point i was interpolated
  /// linearly (for tests); false while it is still undecided.
  bool linear_between(std::size_t i) const { return i < shape_.size() && shape_[i] == kShapeLinear; }

 private:
  static constexpr char kShapeUnknown = 0;
  static constexpr char kShapeCubic = 1;
  static constexpr char kShapeLinear = 2;

  // Over a step the error control accepted, h f at either end differs from
  // the change y1 - y0 by about h^2 |y''| / 2, the size of the step's error
  // estimate: within the tolerance. Off by more than twice the change plus
  // the tolerance, the step crossed something its ends do not show.
  bool slopes_fit(const double* y0, const double* y1, const double* f0, const double* f1, double h) const {
    for (std::size_t k = 0; k < n_; ++k) {
      const double change = y1[k] - y0[k];
      const double miss = std::fabs(h * f0[k] - change) + std::fabs(h * f1[k] - change);
      const double scale = atol_[k] + rtol_ * std::max(std::fabs(y0[k]), std::fabs(y1[k]));
      if (!(miss <= 2.0 * (std::fabs(change) + scale))) return false;
    }
    return true;
  }

  template <class Rhs>
  const double* slope(std::size_t i, Rhs& rhs) {
    double* f = &f_[i * n_];
    if (!f_known_[i]) {
      rhs(t_[i], &y_[i * n_], f);
      f_known_[i] = 1;
    }
    return f;
  }

  std::size_t n_;
  std::vector<double> atol_;
  double rtol_;
  std::vector<double> t_;    // step points
  std::vector<double> y_;    // n_ per point
  std::vector<double> f_;    // n_ per point, valid where f_known_
  std::vector<char> f_known_;
  std::vector<char> shape_;  // per interval from point i: unknown, cubic or linear
  std::size_t last_ = 0;     // interval of the last lookup (scans move forward)
};

}  // namespace spoolstep::hostsim

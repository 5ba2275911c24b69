#include "spoolstep/hostsim/integrator.hpp"

#include <algorithm>
#include <cmath>
#include <utility>

#include <boost/numeric/odeint/stepper/rosenbrock4.hpp>
#include <boost/numeric/odeint/stepper/rosenbrock4_controller.hpp>

namespace spoolstep::hostsim {
namespace {

namespace odeint = boost::numeric::odeint;
using UVec = boost::numeric::ublas::vector<double>;
using UMat = boost::numeric::ublas::matrix<double>;

constexpr double kMinStep = 1e-12;    // s; below this the step size has collapsed
constexpr double kFirstStep = 1e-5;   // s; first trial step after a restart

bool time_dependent(const Network& net) {
  for (const Cylinder& c : net.cylinders) {
    if (!c.force_profile.empty()) return true;
  }
  return false;
}

/// Which rows of f each dynamic state (column) can change, read off the
/// network's structure (a superset of the nonzeros of J, whatever the
/// state). The compressed-oil accumulator's row is left out: it depends on
/// everything and is derived from the other rows (see Evaluator).
std::vector<std::vector<std::size_t>> jacobian_pattern(const Network& net, const StateLayout& L) {
  std::vector<std::vector<std::size_t>> rows(L.pumped);
  auto add = [&rows](int col, int row) {
    if (col >= 0 && row >= 0) rows[static_cast<std::size_t>(col)].push_back(static_cast<std::size_t>(row));
  };
  auto node_row = [&L](int node) { return node < 0 ? -1 : L.node_state[static_cast<std::size_t>(node)]; };
  const int returned = static_cast<int>(L.returned);
  for (std::size_t i = 0; i < net.nodes.size(); ++i) {
    add(node_row(static_cast<int>(i)), node_row(static_cast<int>(i)));  // bulk modulus, cavitation
  }
  for (const Element& e : net.elements) {
    // The flow depends on both end pressures, a pilot pressure and a spool.
    const int cols[4] = {node_row(e.from), node_row(e.to), node_row(e.pilot),
                         e.kind == ElementKind::kSpoolEdge
                             ? static_cast<int>(L.spool_state[static_cast<std::size_t>(e.spool)])
                             : -1};
    const bool to_fixed = net.nodes[static_cast<std::size_t>(e.to)].fixed;
    const bool from_fixed = net.nodes[static_cast<std::size_t>(e.from)].fixed;
    for (const int c : cols) {
      add(c, node_row(e.from));
      add(c, node_row(e.to));
      if (to_fixed || from_fixed) add(c, returned);
    }
  }
  if (net.pump.node >= 0) {
    add(node_row(net.pump.node), node_row(net.pump.node));
    add(node_row(net.pump.node), static_cast<int>(L.pumped));
  }
  for (std::size_t c = 0; c < net.cylinders.size(); ++c) {
    const Cylinder& cyl = net.cylinders[c];
    const int x = static_cast<int>(L.first_cylinder + 2 * c);
    const int v = x + 1;
    const int a = node_row(cyl.node_a);
    const int b = node_row(cyl.node_b);
    for (const int col : {x, v, a, b}) {  // chamber volumes and dV/dt, force, piston leak
      add(col, a);
      add(col, b);
      add(col, v);
    }
    add(v, x);  // dx/dt = v
  }
  for (std::size_t s = 0; s < net.spools.size(); ++s) {
    const int k = static_cast<int>(L.spool_state[s]);
    add(k, k);
    if (net.spools[s].dynamics == SpoolDynamics::kSecondOrder) {
      add(k, k + 1);
      add(k + 1, k);
      add(k + 1, k + 1);
    }
  }
  for (auto& r : rows) {
    std::sort(r.begin(), r.end());
    r.erase(std::unique(r.begin(), r.end()), r.end());
  }
  return rows;
}

/// Shared part: the right-hand side and a finite-difference Jacobian over
/// the dynamic states (the accumulators feed nothing back, so their columns
/// are zero).
class Evaluator {
 public:
  Evaluator(const Network& net, const StateLayout& layout)
      : rhs_(net, layout), n_(layout.size), n_dyn_(layout.pumped), f0_(n_), f1_(n_), x_(n_),
        time_dependent_(time_dependent(net)), rows_of_(jacobian_pattern(net, layout)),
        pumped_(layout.pumped), returned_(layout.returned), compressed_(layout.compressed),
        displaced_(layout.pumped, 0.0) {
    // Column groups: states that change no common row are perturbed together
    // (greedy, in state order, so deterministic).
    std::vector<std::vector<bool>> used;
    for (std::size_t j = 0; j < n_dyn_; ++j) {
      std::size_t g = 0;
      for (; g < groups_.size(); ++g) {
        bool clash = false;
        for (const std::size_t r : rows_of_[j]) clash = clash || used[g][r];
        if (!clash) break;
      }
      if (g == groups_.size()) {
        groups_.emplace_back();
        used.emplace_back(n_, false);
      }
      groups_[g].push_back(j);
      for (const std::size_t r : rows_of_[j]) used[g][r] = true;
    }
    // d(compressed)/dt = d(pumped)/dt - d(returned)/dt - sum (A_A - A_B) v
    // in state units (cm^3/s, v in mm/s).
    for (std::size_t c = 0; c < net.cylinders.size(); ++c) {
      displaced_[layout.first_cylinder + 2 * c + 1] =
          (net.cylinders[c].area_a_m2 - net.cylinders[c].area_b_m2) * kLengthScale / kVolumeScale;
    }
  }

  /// J (dense, row-major n x n) by finite differences with grouped columns:
  /// one right-hand side per group of states that change no common row
  /// (about half as many as states), each entry exactly the one a single
  /// column difference gives. The compressed-oil row is not differenced but
  /// derived from the identity d(compressed)/dt = d(pumped)/dt -
  /// d(returned)/dt - sum (A_A - A_B) v, so that the oil balance invariant
  /// holds for J exactly as for f (a grouped difference could not separate
  /// that row, which depends on every state). f0 = f(t, y) on return.
  /// Every call writes the same entries (the pattern is fixed when the
  /// network is built), so `jac` must hold zeros everywhere else: zero it
  /// once, not on every call (a dense fill was a few per cent of a run).
  void grouped_jacobian(const NetworkInputs& in, double t, const double* y, double* jac) {
    ++stats.jacobians;
    std::copy(y, y + n_, x_.begin());
    rhs(in, t, x_.data(), f0_.data());
    for (const std::vector<std::size_t>& group : groups_) {
      for (const std::size_t j : group) {
        const double xj = x_[j];
        x_[j] = xj + 1.5e-8 * std::max(std::fabs(xj), 1.0);
      }
      rhs(in, t, x_.data(), f1_.data());
      for (const std::size_t j : group) {
        const double xj = y[j];
        const double hh = x_[j] - xj;
        x_[j] = xj;
        for (const std::size_t r : rows_of_[j]) jac[r * n_ + j] = (f1_[r] - f0_[r]) / hh;
      }
    }
    for (std::size_t j = 0; j < n_dyn_; ++j) {
      jac[compressed_ * n_ + j] = jac[pumped_ * n_ + j] - jac[returned_ * n_ + j] - displaced_[j];
    }
  }

  void rhs(const NetworkInputs& in, double t, const double* y, double* dydt) {
    ++stats.rhs_calls;
    rhs_(in, t, y, dydt);
  }

  /// J(i, j) stored through set(i, j, value); f0 = f(t, y) on return.
  template <class Set>
  void jacobian(const NetworkInputs& in, double t, const double* y, Set&& set, double* dfdt) {
    ++stats.jacobians;
    std::copy(y, y + n_, x_.begin());
    rhs(in, t, x_.data(), f0_.data());
    for (std::size_t j = 0; j < n_; ++j) {
      if (j >= n_dyn_) {
        for (std::size_t i = 0; i < n_; ++i) set(i, j, 0.0);
        continue;
      }
      const double xj = x_[j];
      const double h = 1.5e-8 * std::max(std::fabs(xj), 1.0);
      x_[j] = xj + h;
      const double hh = x_[j] - xj;
      rhs(in, t, x_.data(), f1_.data());
      x_[j] = xj;
      for (std::size_t i = 0; i < n_; ++i) set(i, j, (f1_[i] - f0_[i]) / hh);
    }
    if (dfdt != nullptr) {
      if (time_dependent_) {
        const double ht = 1e-7;
        rhs(in, t + ht, x_.data(), f1_.data());
        for (std::size_t i = 0; i < n_; ++i) dfdt[i] = (f1_[i] - f0_[i]) / ht;
      } else {
        std::fill(dfdt, dfdt + n_, 0.0);
      }
    }
  }
  const std::vector<double>& f0() const { return f0_; }
  std::size_t size() const { return n_; }

  SolverStats stats;

 private:
  NetworkRhs rhs_;
  std::size_t n_;
  std::size_t n_dyn_;
  std::vector<double> f0_, f1_, x_;
  bool time_dependent_;
  std::vector<std::vector<std::size_t>> rows_of_;  // per dynamic state: rows it can change
  std::vector<std::vector<std::size_t>> groups_;   // states perturbed together
  std::size_t pumped_, returned_, compressed_;
  std::vector<double> displaced_;  // per dynamic state: d(displaced volume rate)/d(state)
};

// ---------------------------------------------------------------------------
class OdeintRosenbrock4 final : public Integrator {
 public:
  OdeintRosenbrock4(const Network& net, const StateLayout& layout, const SolverSettings& s)
      : eval_(net, layout), controller_(s.atol, s.rtol), x_(layout.size), dfdt_(layout.size) {}

  bool do_advance(const NetworkInputs& in, std::vector<double>& y, double t, double t_end,
                  const std::function<void(double, const std::vector<double>&)>& on_step) override {
    in_ = &in;
    std::copy(y.begin(), y.end(), x_.begin());
    auto system = std::make_pair(Rhs{this}, Jac{this});
    double h = h_ > 0.0 ? h_ : kFirstStep;
    while (t_end - t > 1e-12 * std::max(1.0, std::fabs(t_end))) {
      const double remaining = t_end - t;
      const bool last = h >= remaining;
      double dt = last ? remaining : h;
      const auto result = controller_.try_step(system, x_, t, dt);
      if (result == odeint::success) {
        ++eval_.stats.accepted;
        if (last) {
          t = t_end;
          h = std::max(h, dt);
        } else {
          h = dt;
        }
        std::copy(x_.begin(), x_.end(), y.begin());
        if (on_step) on_step(t, y);
      } else {
        ++eval_.stats.rejected;
        h = dt;
        if (h < kMinStep) {
          h_ = 0.0;
          return false;
        }
      }
    }
    h_ = h;
    std::copy(x_.begin(), x_.end(), y.begin());
    return true;
  }
  const SolverStats& do_stats() const override { return eval_.stats; }
  double do_step_hint() const override { return h_; }
  void do_restart() override { h_ = 0.0; }
  void do_inputs_changed() override {}  // a fresh Jacobian every step anyway

 private:
  struct Rhs {
    OdeintRosenbrock4* self;
    void operator()(const UVec& x, UVec& dxdt, double t) const {
      self->eval_.rhs(*self->in_, t, &x(0), &dxdt(0));
    }
  };
  struct Jac {
    OdeintRosenbrock4* self;
    void operator()(const UVec& x, UMat& j, double t, UVec& dfdt) const {
      self->eval_.jacobian(*self->in_, t, &x(0),
                           [&j](std::size_t r, std::size_t c, double v) { j(r, c) = v; }, &dfdt(0));
    }
  };

  Evaluator eval_;
  odeint::rosenbrock4_controller<odeint::rosenbrock4<double>> controller_;
  UVec x_;
  UVec dfdt_;
  const NetworkInputs* in_ = nullptr;
  double h_ = 0.0;
};

// Rows of a sparse matrix that is rebuilt often (J's nonzeros, the factors of
// W): sized once for the dense worst case, so a rebuild writes entries in
// place instead of growing vectors.
struct SparseRows {
  std::vector<std::size_t> start{0};  // row i is [start[i], start[i + 1])
  std::vector<std::size_t> col;
  std::vector<double> val;
  std::size_t nnz = 0;
  std::size_t rows = 0;

  void begin(std::size_t max_rows, std::size_t max_nonzeros) {
    if (start.size() < max_rows + 1) start.resize(max_rows + 1);
    if (col.size() < max_nonzeros) {
      col.resize(max_nonzeros);
      val.resize(max_nonzeros);
    }
    nnz = 0;
    rows = 0;
    start[0] = 0;
  }
  void add(std::size_t c, double v) {
    col[nnz] = c;
    val[nnz] = v;
    ++nnz;
  }
  void end_row() { start[++rows] = nnz; }
  /// sum over row i of val * x[col]
  double row_dot(std::size_t i, const std::vector<double>& x) const {
    double s = 0.0;
    for (std::size_t q = start[i]; q < start[i + 1]; ++q) s += val[q] * x[col[q]];
    return s;
  }
};

// ---------------------------------------------------------------------------
// ROS2: W k1 = f(y); W k2 = f(y + h k1) - 2 k1; y1 = y + h (3/2 k1 + 1/2 k2),
// W = I - gamma h J, gamma = 1 + 1/sqrt(2). Embedded first order solution
// y + h k1 for the error estimate. Second order for any W (checked by
// expansion: y1 = y + h f + h^2/2 f' f whatever J is), so J and the LU of W
// can be reused.
class Ros2 final : public Integrator {
 public:
  Ros2(const Network& net, const StateLayout& layout, const SolverSettings& s)
      : eval_(net, layout),
        n_(layout.size),
        rtol_(relative_tolerances(net, layout, s)),
        atol_(absolute_tolerances(net, layout, s)),
        jac_(n_ * n_),
        lu_(n_ * n_), piv_(n_), m_(layout.pumped), k1_(n_), k2_(n_), y1_(n_), f_(n_), f0_(n_), ynew_(n_) {}

  bool do_advance(const NetworkInputs& in, std::vector<double>& y, double t, double t_end,
                  const std::function<void(double, const std::vector<double>&)>& on_step) override {
    double h = h_ > 0.0 ? h_ : kFirstStep;
    // f0_ = f(t, y) is known after a Jacobian (its base point) and after a
    // rejected step (same t and y), so it is not evaluated again then.
    bool f0_known = false;
    while (t_end - t > 1e-12 * std::max(1.0, std::fabs(t_end))) {
      const double remaining = t_end - t;
      const bool last = h >= remaining * (1.0 - 1e-9);
      // The rest of the period is split into equal steps no longer than h:
      // step sizes then repeat from period to period (period/1, period/2,
      // ...), so the LU factors of W are reused instead of being redone
      // for a short last step in every period.
      double dt = remaining;
      if (!last) {
        const double pieces = std::ceil(remaining / h * (1.0 - 1e-9));
        dt = remaining / pieces;
      }
      if (jac_age_ < 0) {
        eval_.grouped_jacobian(in, t, y.data(), jac_.data());
        jac_age_ = 0;
        jac_miss_sum_ = 0.0;
        h_lu_ = 0.0;
        std::copy(eval_.f0().begin(), eval_.f0().end(), f0_.begin());
        f0_known = true;
        // Nonzeros of J by row, for the Jacobian check's product J k1.
        j_.begin(n_, n_ * n_);
        for (std::size_t r = 0; r < n_; ++r) {
          for (std::size_t c = 0; c < n_; ++c) {
            if (jac_[r * n_ + c] != 0.0) j_.add(c, jac_[r * n_ + c]);
          }
          j_.end_row();
        }
      }
      if (!(dt >= kLuLow * h_lu_ && dt <= kLuHigh * h_lu_)) factor(dt);
      const double hs = dt;
      if (!f0_known) eval_.rhs(in, t, y.data(), f0_.data());
      f0_known = true;
      solve(f0_, k1_);
      for (std::size_t i = 0; i < n_; ++i) y1_[i] = y[i] + hs * k1_[i];
      eval_.rhs(in, t + hs, y1_.data(), f_.data());
      // Jacobian check: f(y + h k1) - f(y) - h J k1 is what the reused J
      // misses along this step; times gamma h it is the error the stale J
      // puts into the step. The error estimate cannot see it (both
      // solutions share W), so a reused J that misses by more than the
      // tolerance is refreshed and the step redone.
      double jac_miss = 0.0;
      if (jac_age_ > 0) {
        for (std::size_t i = 0; i < n_; ++i) {
          const double jk = j_.row_dot(i, k1_);
          const double miss = kGamma * hs * (f_[i] - f0_[i] - hs * jk);
          const double sc = atol_[i] + rtol_[i] * std::fabs(y[i]);
          jac_miss = std::max(jac_miss, std::fabs(miss) / sc);
        }
      }
      if (jac_miss > kJacobianMissReject || !std::isfinite(jac_miss)) {
        ++eval_.stats.rejected;
        jac_age_ = -1;  // same step again with a fresh Jacobian
        continue;
      }
      for (std::size_t i = 0; i < n_; ++i) f_[i] -= 2.0 * k1_[i];
      solve(f_, k2_);
      double err = 0.0;
      for (std::size_t i = 0; i < n_; ++i) {
        ynew_[i] = y[i] + hs * (1.5 * k1_[i] + 0.5 * k2_[i]);
        const double e = hs * 0.5 * (k1_[i] + k2_[i]);
        const double sc = atol_[i] + rtol_[i] * std::max(std::fabs(y[i]), std::fabs(ynew_[i]));
        err = std::max(err, std::fabs(e) / sc);
      }
      // What a stale Jacobian misses is often the same way step after step
      // (a node linearised with its relief open, after the relief closed),
      // so the misses add up where the error estimate cannot see them:
      // their sum since the last Jacobian is held to the tolerance.
      if (jac_miss_sum_ + jac_miss > kJacobianMissRefresh) jac_age_ = kMaxJacobianAge;  // fresh one for the next step
      if (err <= 1.0 && std::isfinite(err)) {
        ++eval_.stats.accepted;
        jac_miss_sum_ += jac_miss;
        std::copy(ynew_.begin(), ynew_.end(), y.begin());
        f0_known = false;
        t = last ? t_end : t + hs;
        if (on_step) on_step(t, y);
        ++jac_age_;
        if (jac_age_ > kMaxJacobianAge) jac_age_ = -1;
        double fac = err > 0.0 ? 0.9 / std::sqrt(err) : 2.0;
        fac = std::min(kMaxGrowth, std::max(1.0, fac));
        // Small increases are not worth a new factorisation.
        const double proposal = fac < 1.2 ? hs : hs * fac;
        h = last ? std::max(h, proposal) : proposal;
      } else {
        ++eval_.stats.rejected;
        const double fac = std::isfinite(err) ? std::max(0.2, 0.9 / std::sqrt(err)) : 0.2;
        h = hs * fac;
        if (jac_age_ > 0 && jac_miss > kRejectRefresh) jac_age_ = -1;  // a fresh Jacobian first
        if (h < kMinStep) {
          h_ = 0.0;
          return false;
        }
      }
    }
    h_ = h;
    return true;
  }
  const SolverStats& do_stats() const override { return eval_.stats; }
  double do_step_hint() const override { return h_; }
  void do_restart() override {
    h_ = 0.0;
    jac_age_ = -1;
  }
  // A stale Jacobian can hide errors from the estimate (a spool whose rate
  // saturates after a command step would crawl), so input changes that alter
  // df/dy refresh it (the plant leaves out those that cannot).
  void do_inputs_changed() override { jac_age_ = -1; }

 private:
  // Tuned on the demo press cycle against the Radau reference
  // (docs/plant-model.md): a Jacobian older than 100 steps is refreshed
  // (the Jacobian check below catches a stale one much earlier where it
  // matters; 20 cost a Jacobian every 20 quiet periods for nothing), a
  // factorisation is reused while the step stays within 10 % of the step it
  // was made for (any W keeps the order; the margin keeps the stability),
  // and the step grows by at most 2x per step.
  static constexpr int kMaxJacobianAge = 100;
  static constexpr double kLuLow = 0.9;
  static constexpr double kLuHigh = 1.1;
  static constexpr double kMaxGrowth = 2.0;
  static constexpr double kJacobianMissReject = 3.0;   // in units of the tolerance
  static constexpr double kJacobianMissRefresh = 1.0;
  static constexpr double kRejectRefresh = 0.5;
  static constexpr double kGamma = 1.0 + 0.70710678118654752440;

  // W = I - gamma h J is block lower triangular: the accumulators (pumped,
  // returned, compressed oil; the last states) feed nothing back, so their
  // columns of J are zero and their block of W is the identity. Only the
  // dynamic block (m = n - 3 states) is factorised; the accumulators follow
  // from k_acc = b_acc + gamma h J_acc k_dyn. Partial pivoting stays inside
  // the dynamic block (before, an accumulator row could win a pivot search
  // and fill the factors in).
  void factor(double h) {
    ++eval_.stats.factorisations;
    h_lu_ = h;
    const std::size_t m = m_;
    for (std::size_t r = 0; r < m; ++r) {
      for (std::size_t c = 0; c < m; ++c) lu_[r * m + c] = -kGamma * h * jac_[r * n_ + c];
      lu_[r * m + r] += 1.0;
    }
    // Doolittle LU with partial pivoting, in place.
    for (std::size_t k = 0; k < m; ++k) {
      std::size_t p = k;
      double best = std::fabs(lu_[k * m + k]);
      for (std::size_t i = k + 1; i < m; ++i) {
        const double v = std::fabs(lu_[i * m + k]);
        if (v > best) {
          best = v;
          p = i;
        }
      }
      piv_[k] = p;
      if (p != k) {
        for (std::size_t j = 0; j < m; ++j) std::swap(lu_[k * m + j], lu_[p * m + j]);
      }
      const double d = lu_[k * m + k];
      if (d == 0.0) continue;
      for (std::size_t i = k + 1; i < m; ++i) {
        double& lik = lu_[i * m + k];
        if (lik == 0.0) continue;
        lik /= d;
        const double* rk = &lu_[k * m];
        double* ri = &lu_[i * m];
        for (std::size_t j = k + 1; j < m; ++j) ri[j] -= lik * rk[j];
      }
    }
    compress(h);
  }

  // The factors are stored again as sparse rows (W = I - gamma h J is
  // sparse, and so mostly are its factors): the two solves per step then
  // cost a fraction of dense triangular solves. The row exchanges become one
  // gather (perm_), and the accumulator rows gamma h J_acc are kept sparse.
  void compress(double h) {
    const std::size_t m = m_;
    l_.begin(m, m * m);
    u_.begin(m, m * m);
    a_.begin(n_ - m, (n_ - m) * m);
    diag_inv_.resize(m);
    perm_.resize(m);
    for (std::size_t i = 0; i < m; ++i) perm_[i] = i;
    for (std::size_t k = 0; k < m; ++k) std::swap(perm_[k], perm_[piv_[k]]);
    for (std::size_t i = 0; i < m; ++i) {
      const double* ri = &lu_[i * m];
      for (std::size_t j = 0; j < i; ++j) {
        if (ri[j] != 0.0) l_.add(j, ri[j]);
      }
      l_.end_row();
      for (std::size_t j = i + 1; j < m; ++j) {
        if (ri[j] != 0.0) u_.add(j, ri[j]);
      }
      u_.end_row();
      diag_inv_[i] = 1.0 / ri[i];
    }
    for (std::size_t r = m; r < n_; ++r) {
      for (std::size_t c = 0; c < m; ++c) {
        const double v = jac_[r * n_ + c];
        if (v != 0.0) a_.add(c, kGamma * h * v);
      }
      a_.end_row();
    }
  }

  void solve(const std::vector<double>& b, std::vector<double>& x) const {
    const std::size_t m = m_;
    for (std::size_t i = 0; i < m; ++i) x[i] = b[perm_[i]];
    // Subtracted term by term in the order stored (not via row_dot): the
    // rounding, and so the trace, stays as it was.
    for (std::size_t i = 1; i < m; ++i) {
      double s = x[i];
      for (std::size_t q = l_.start[i]; q < l_.start[i + 1]; ++q) s -= l_.val[q] * x[l_.col[q]];
      x[i] = s;
    }
    for (std::size_t i = m; i-- > 0;) {
      double s = x[i];
      for (std::size_t q = u_.start[i]; q < u_.start[i + 1]; ++q) s -= u_.val[q] * x[u_.col[q]];
      x[i] = s * diag_inv_[i];
    }
    for (std::size_t r = m; r < n_; ++r) {
      double s = b[r];
      for (std::size_t q = a_.start[r - m]; q < a_.start[r - m + 1]; ++q) s += a_.val[q] * x[a_.col[q]];
      x[r] = s;
    }
  }

  Evaluator eval_;
  std::size_t n_;
  std::vector<double> rtol_;  // per state
  std::vector<double> atol_;  // per state
  std::vector<double> jac_, lu_;
  std::vector<std::size_t> piv_;
  std::size_t m_;  // dynamic states: the accumulators are the last n_ - m_
  std::vector<std::size_t> perm_;
  SparseRows l_, u_, a_, j_;  // factors of W (L strict lower, U strict upper), gamma h J_acc, J
  std::vector<double> diag_inv_;
  std::vector<double> k1_, k2_, y1_, f_, f0_, ynew_;
  double h_ = 0.0;
  double h_lu_ = 0.0;
  int jac_age_ = -1;
  double jac_miss_sum_ = 0.0;  // Jacobian check misses of the accepted steps since the last Jacobian
};

}  // namespace

std::vector<double> absolute_tolerances(const Network& net, const StateLayout& layout,
                                        const SolverSettings& settings) {
  std::vector<double> atol(layout.size, settings.atol);
  for (std::size_t c = 0; c < net.cylinders.size(); ++c) {
    atol[layout.first_cylinder + 2 * c + 1] = settings.velocity_atol_mm_s;
  }
  // A spool rate error e moves the spool by about e / w over the response
  // time 1/w: scaled so, the rate weighs like the position (stroke/s against
  // stroke fraction would otherwise ask for w times more accuracy).
  for (std::size_t s = 0; s < net.spools.size(); ++s) {
    if (net.spools[s].dynamics == SpoolDynamics::kSecondOrder) {
      atol[layout.spool_state[s] + 1] = settings.atol * net.spools[s].natural_rad_s;
    }
  }
  return atol;
}

std::vector<double> relative_tolerances(const Network& net, const StateLayout& layout,
                                        const SolverSettings& settings) {
  std::vector<double> rtol(layout.size, settings.rtol);
  // A position's size is its distance from the retracted end, which says
  // nothing about how exactly it must be known: 0.1 % of 400 mm would let
  // every step miss by 0.4 mm. Positions take the absolute tolerance alone.
  for (std::size_t c = 0; c < net.cylinders.size(); ++c) rtol[layout.first_cylinder + 2 * c] = 0.0;
  return rtol;
}

std::unique_ptr<Integrator> make_integrator(const Network& net, const StateLayout& layout,
                                            const SolverSettings& settings) {
  switch (settings.method) {
    case SolverMethod::kRos2:
      return std::make_unique<Ros2>(net, layout, settings);
    case SolverMethod::kOdeintRosenbrock4:
      break;
  }
  return std::make_unique<OdeintRosenbrock4>(net, layout, settings);
}

}  // namespace spoolstep::hostsim

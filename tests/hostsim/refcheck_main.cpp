// Process-level check against an independent reference: the demo press
// cycle (open loop) integrated here and by tools/ref/plant_ref.py, which
// solves the same equations with scipy's solve_ivp, method Radau, at
// rtol 1e-8. Limits from the project brief: positions within 0.5 mm,
// pressure RMS error at most 1 % of the relief setting, peak pressures
// within 2 %.
//
// Usage: hostsim_refcheck PYTHON SCRIPT WORKDIR [--reuse] [--solver METHOD RTOL ATOL]
//                        [--machine FILE]
//   --reuse   keep WORKDIR/reference.json from an earlier run (same case)
//   --solver  integrate here with another method/tolerances (for measuring)
//   --velocity-atol  after --solver: the cylinder velocity tolerance (mm/s)
//   --window  after --solver: the most periods one integration window covers
//   --machine the plant of this machine file (the README's demo press cell)
//             with its own open-loop timeline, instead of the in-code demo
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include <sys/wait.h>

#include <nlohmann/json.hpp>

#include "spoolstep/hostsim/demo.hpp"
#include "spoolstep/machine_file/machine_file.hpp"

using namespace spoolstep::hostsim;

namespace {

nlohmann::json g_solver;  // empty: the plant section's default
std::unique_ptr<spoolstep::machine_file::LoadedMachine> g_machine;  // set by --machine

std::unique_ptr<Plant> demo_plant() {
  nlohmann::json pj = g_machine ? g_machine->plant : demo_plant_json();
  if (!g_solver.is_null()) pj["solver"] = g_solver;
  auto res = g_machine ? build_plant(pj, g_machine->config, g_machine->source_path)
                       : build_plant(pj, demo_machine(), "demo");
  if (auto* errs = std::get_if<std::vector<PlantError>>(&res)) {
    for (const auto& e : *errs) std::fprintf(stderr, "%s\n", e.to_string().c_str());
    return nullptr;
  }
  return std::move(std::get<std::unique_ptr<Plant>>(res));
}

// An open-loop timeline for the press cell of config/press_cell.json: pump
// loaded, clamp closes, the ram runs down at full opening onto the part,
// presses against the relief valve, decompresses through the bleed centre,
// returns, and the clamp opens (invented, like the machine).
Timeline press_cell_cycle() {
  Timeline t;
  t.pump(0.0, true, true);
  auto spool = [&t](double time, const char* f, double target) { t.spool(time, f, target); };
  spool(0.05, "clamp", 1.0);
  spool(0.60, "press", 1.0);   // down at full opening: the pump limits the speed
  spool(4.00, "press", 0.0);   // on the part since about 3.8 s; centre: the bleed vents the cap side
  spool(4.60, "press", -1.0);  // return
  spool(8.10, "press", 0.0);
  spool(8.20, "clamp", -1.0);  // unclamp
  spool(8.70, "clamp", 0.0);
  t.end_s = 9.0;
  return t;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 4) {
    std::fprintf(stderr, "usage: hostsim_refcheck PYTHON SCRIPT WORKDIR [--reuse] [--solver METHOD RTOL ATOL [--velocity-atol MM_S] [--window PERIODS]]\n");
    return 2;
  }
  bool reuse = false;
  for (int i = 4; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--reuse") {
      reuse = true;
    } else if (a == "--machine" && i + 1 < argc) {
      auto loaded = spoolstep::machine_file::load_machine_file(argv[++i]);
      if (!loaded.ok()) {
        for (const auto& e : loaded.errors) std::fprintf(stderr, "%s\n", e.to_string().c_str());
        return 2;
      }
      g_machine = std::move(loaded.machine);
    } else if (a == "--solver" && i + 3 < argc) {
      g_solver = {{"method", argv[i + 1]}, {"rtol", std::atof(argv[i + 2])}, {"atol", std::atof(argv[i + 3])}};
      i += 3;
    } else if (a == "--velocity-atol" && i + 1 < argc && g_solver.is_object()) {
      g_solver["velocity_atol_mm_s"] = std::atof(argv[++i]);
    } else if (a == "--window" && i + 1 < argc && g_solver.is_object()) {
      g_solver["max_window_periods"] = std::atoi(argv[++i]);
    } else {
      std::fprintf(stderr, "hostsim_refcheck: unknown argument %s\n", a.c_str());
      return 2;
    }
  }
  const std::string python = argv[1], script = argv[2];
  const std::filesystem::path dir = argv[3];
  std::filesystem::create_directories(dir);
  const double period = 1e-3;
  const double relief_bar = g_machine ? g_machine->plant.at("relief").at("cracking_bar").get<double>()
                                      : 180.0;  // demo_plant_json relief cracking
  const Timeline timeline = g_machine ? press_cell_cycle() : demo_press_cycle();

  auto plant = demo_plant();
  if (!plant) return 1;
  const std::vector<double> y0 = plant->state();
  Trace trace;
  if (!run_open_loop(*plant, timeline, period, trace)) {
    std::fprintf(stderr, "hostsim_refcheck: the C++ integration failed\n");
    return 1;
  }
  // Wall time of the C++ run: best of 5 repetitions.
  double cpp_wall = 1e9;
  for (int rep = 0; rep < 5; ++rep) {
    auto p = demo_plant();
    Trace t;
    const auto t0 = std::chrono::steady_clock::now();
    (void)run_open_loop(*p, timeline, period, t);
    cpp_wall = std::min(cpp_wall, std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
  }

  const auto case_path = dir / "case.json";
  const auto result_path = dir / "reference.json";
  {
    std::ofstream out(case_path);
    out << reference_case(plant->network(), y0, trace, 1e-8, 1e-6).dump();
  }
  {
    // This side's trace, for plotting against the reference.
    std::ofstream out(dir / "here.json");
    out << nlohmann::json{{"names", trace.names}, {"time_s", trace.time_s}, {"rows", trace.rows}}.dump();
  }
  if (!reuse) std::filesystem::remove(result_path);
  const std::string cmd = "\"" + python + "\" \"" + script + "\" \"" + case_path.string() + "\" \"" +
                          result_path.string() + "\"";
  const int rc = reuse && std::filesystem::exists(result_path) ? 0 : std::system(cmd.c_str());
  if (rc != 0) {
    const int code = WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
    if (code == 127) {
      std::fprintf(stderr, "hostsim_refcheck: FAILED: %s not found; install Debian's python3 and python3-scipy\n",
                   python.c_str());
    } else if (code == 3) {
      std::fprintf(stderr,
                   "hostsim_refcheck: FAILED: %s has no scipy. Install Debian's python3-scipy "
                   "(apt-get install python3-scipy); CI installs it.\n",
                   python.c_str());
    } else {
      std::fprintf(stderr, "hostsim_refcheck: FAILED: the reference script exited with %d (%s)\n", code,
                   cmd.c_str());
    }
    return 1;
  }
  nlohmann::json ref;
  try {
    std::ifstream in(result_path);
    ref = nlohmann::json::parse(in);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "hostsim_refcheck: cannot read %s: %s\n", result_path.string().c_str(), e.what());
    return 1;
  }
  const auto names = ref.at("names").get<std::vector<std::string>>();
  const auto rows = ref.at("rows").get<std::vector<std::vector<double>>>();
  if (rows.size() != trace.rows.size()) {
    std::fprintf(stderr, "hostsim_refcheck: %zu reference samples, %zu here\n", rows.size(), trace.rows.size());
    return 1;
  }
  bool ok = true;
  std::printf("%-24s %12s %12s %12s %12s\n", "column", "max |err|", "rms err", "peak here", "peak ref");
  for (std::size_t k = 0; k < names.size(); ++k) {
    const std::string& n = names[k];
    const bool is_pressure = n.size() > 6 && n.substr(n.size() - 6) == ".p_bar";
    const bool is_position = n.size() > 5 && n.substr(n.size() - 5) == ".x_mm";
    if (!is_pressure && !is_position) continue;
    const int c = trace.column(n);
    if (c < 0) {
      std::fprintf(stderr, "hostsim_refcheck: no column %s here\n", n.c_str());
      return 1;
    }
    double max_err = 0.0, sq = 0.0, peak_here = -1e300, peak_ref = -1e300;
    for (std::size_t i = 0; i < rows.size(); ++i) {
      const double a = trace.rows[i][static_cast<std::size_t>(c)];
      const double b = rows[i][k];
      max_err = std::max(max_err, std::fabs(a - b));
      sq += (a - b) * (a - b);
      peak_here = std::max(peak_here, a);
      peak_ref = std::max(peak_ref, b);
    }
    const double rms = std::sqrt(sq / static_cast<double>(rows.size()));
    std::string verdict = "ok";
    if (is_position && max_err > 0.5) verdict = "FAIL: position error above 0.5 mm";
    if (is_pressure && rms > 0.01 * relief_bar) verdict = "FAIL: pressure RMS error above 1 % of relief";
    // Peaks are compared where there is a peak worth the name (10 % of relief).
    if (is_pressure && peak_ref > 0.1 * relief_bar && std::fabs(peak_here - peak_ref) > 0.02 * peak_ref) {
      verdict = "FAIL: peak pressure differs by more than 2 %";
    }
    if (verdict != "ok") ok = false;
    std::printf("%-24s %12.4g %12.4g %12.4g %12.4g  %s\n", n.c_str(), max_err, rms, peak_here, peak_ref,
                verdict.c_str());
  }
  const double ref_wall = ref.at("wall_s").get<double>();
  const double sim_s = trace.time_s.back() - trace.time_s.front();
  std::printf("simulated %.3f s; here %.4f s wall (%.0fx real time, %zu steps), reference %.2f s wall "
              "(%s, %d rhs calls): speed ratio %.0fx\n",
              sim_s, cpp_wall, sim_s / cpp_wall, plant->solver_stats().accepted, ref_wall,
              ref.at("method").get<std::string>().c_str(), ref.at("stats").at("nfev").get<int>(), ref_wall / cpp_wall);
  std::printf(ok ? "hostsim_refcheck: PASSED\n" : "hostsim_refcheck: FAILED\n");
  return ok ? 0 : 1;
}

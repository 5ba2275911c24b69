// The plant section loader: every error names file, JSON pointer, reason and
// fix; unknown fields are errors; nothing is built when anything is wrong.
#include <gtest/gtest.h>

#include <fstream>
#include <sstream>
#include <string>

#include "rig.hpp"

namespace spoolstep::hostsim::test {
namespace {

using core::ValveCentre;
using core::ValveKind;

std::vector<PlantError> errors_of(const Rig& rig) {
  auto res = build_plant(rig.plant, rig.machine, "machine.json");
  if (auto* e = std::get_if<std::vector<PlantError>>(&res)) return *e;
  return {};
}

bool has_error(const std::vector<PlantError>& errors, const std::string& path, const std::string& words) {
  for (const auto& e : errors) {
    if (e.json_path == path && e.reason.find(words) != std::string::npos) return true;
  }
  return false;
}

std::string all(const std::vector<PlantError>& errors) {
  std::string s;
  for (const auto& e : errors) s += e.to_string() + "\n";
  return s;
}

Rig valid() { return single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kClosed); }

TEST(PlantConfig, ValidSectionBuilds) {
  EXPECT_TRUE(errors_of(valid()).empty());
  EXPECT_TRUE(errors_of(Rig{demo_machine(), demo_plant_json()}).empty());
}

TEST(PlantConfig, UnknownFieldIsAnErrorNamingPathAndFix) {
  Rig rig = valid();
  rig.plant["cylinders"][0]["bore"] = 63;
  const auto errors = errors_of(rig);
  ASSERT_TRUE(has_error(errors, "/plant/cylinders/0/bore", "unknown field")) << all(errors);
  const std::string m = errors[0].to_string();
  EXPECT_NE(m.find("machine.json: /plant/cylinders/0/bore"), std::string::npos) << m;
  EXPECT_NE(m.find("bore_mm"), std::string::npos) << "the fix lists the known fields: " << m;
}

TEST(PlantConfig, TypoInAFieldNameGetsDidYouMean) {
  Rig rig = valid();
  rig.plant["cylinders"][0]["bore_mn"] = 63;
  const auto errors = errors_of(rig);
  ASSERT_TRUE(has_error(errors, "/plant/cylinders/0/bore_mn", "unknown field")) << all(errors);
  EXPECT_EQ(errors[0].hint, "Did you mean 'bore_mm'?") << all(errors);
  // One diagnostic wording for every document: the hint reads as a sentence.
  EXPECT_NE(errors[0].to_string().find("machine.json: /plant/cylinders/0/bore_mn: unknown field \"bore_mn\". Did you mean 'bore_mm'?"),
            std::string::npos) << errors[0].to_string();
}

TEST(PlantConfig, MissingRequiredFieldAndOutOfRangeValue) {
  Rig rig = valid();
  rig.plant["cylinders"][0].erase("mass_kg");
  rig.plant["valves"][0]["overlap_percent"] = 60;
  rig.plant["oil"]["density_kg_m3"] = "heavy";
  const auto errors = errors_of(rig);
  EXPECT_TRUE(has_error(errors, "/plant/cylinders/0/mass_kg", "missing required")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/valves/0/overlap_percent", "outside the range")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/oil/density_kg_m3", "expected a number")) << all(errors);
}

TEST(PlantConfig, EveryFunctionNeedsAValveAndACylinder) {
  Rig rig = valid();
  rig.plant["valves"] = nlohmann::json::array();
  rig.plant["cylinders"][0]["function"] = "nope";
  const auto errors = errors_of(rig);
  EXPECT_TRUE(has_error(errors, "/plant/valves", "has no valve entry")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/cylinders/0/function", "no function named")) << all(errors);
}

TEST(PlantConfig, ValveFieldsMustFitTheKindAndCentreFromTheMachineFile) {
  Rig rig = valid();
  rig.plant["valves"][0]["response"] = {{"order", 1}};
  rig.plant["valves"][0]["bleed_orifice_mm2"] = 1.0;
  const auto errors = errors_of(rig);
  EXPECT_TRUE(has_error(errors, "/plant/valves/0/response", "only proportional valves")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/valves/0/bleed_orifice_mm2", "only a bleed centre")) << all(errors);

  Rig bleed = single_cylinder(ValveKind::kSolenoid43SpringCentred, ValveCentre::kBleed);
  EXPECT_TRUE(has_error(errors_of(bleed), "/plant/valves/0/bleed_orifice_mm2", "needs the bleed orifice"));
}

TEST(PlantConfig, ThroughPassageNeedsAnUpstreamCentreThatPassesP) {
  core::MachineConfig machine = demo_machine();
  machine.functions[0].centre = ValveCentre::kClosed;  // clamp
  const auto errors = errors_of(Rig{machine, demo_plant_json()});
  EXPECT_TRUE(has_error(errors, "/plant/valves/1/supply/through_of", "does not pass P on")) << all(errors);
}

TEST(PlantConfig, SensorsMustNameExistingInputsAndNodes) {
  Rig rig = valid();
  rig.plant["sensors"] = nlohmann::json::parse(R"([
    {"kind": "pressure", "at": "cyl.C", "input": "p_a"},
    {"kind": "pressure", "at": "pump", "input": "no_input"},
    {"kind": "limit_switch", "cylinder": "cyl", "at_mm": 10, "input": "at_end"},
    {"kind": "thermometer", "input": "x"}
  ])");
  const auto errors = errors_of(rig);
  EXPECT_TRUE(has_error(errors, "/plant/sensors/0/at", "no node named")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/sensors/1/input", "no analog input")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/sensors/2/active", "needs this field")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/sensors/3/kind", "not one of the allowed values")) << all(errors);
}

// A switching point or a workpiece the rod can never reach would read the
// same all run long: refused, as an initial position off the stroke is.
TEST(PlantConfig, SwitchPointsAndWorkpiecesMustBeOnTheStroke) {
  Rig rig = valid();
  rig.plant["sensors"] = nlohmann::json::parse(
      R"([{"kind": "limit_switch", "cylinder": "cyl", "at_mm": 700, "active": "above", "input": "at_end"}])");
  rig.plant["cylinders"][0]["load"] = {{"contact", {{"at_mm", 600}, {"stiffness_n_mm", 1e5}}}};
  const auto errors = errors_of(rig);
  EXPECT_TRUE(has_error(errors, "/plant/sensors/0/at_mm", "off the cylinder's stroke (0 .. 500 mm)")) << all(errors);
  EXPECT_TRUE(has_error(errors, "/plant/cylinders/0/load/contact/at_mm", "beyond the stroke")) << all(errors);
  rig.plant["sensors"][0]["at_mm"] = 500;
  rig.plant["cylinders"][0]["load"]["contact"]["at_mm"] = 450;
  EXPECT_TRUE(errors_of(rig).empty()) << all(errors_of(rig));
}

TEST(PlantConfig, WrongJsonTypesNeverThrow) {
  Rig rig = valid();
  rig.plant["valves"] = 5;
  rig.plant["pump"] = nlohmann::json::array();
  const auto errors = errors_of(rig);
  EXPECT_FALSE(errors.empty());
  Rig top = valid();
  top.plant = "not an object";
  EXPECT_TRUE(has_error(errors_of(top), "/plant", "expected a JSON object"));
}

TEST(PlantConfig, ParameterTableRendersForTheDocs) {
  const std::string table = plant_parameter_table_markdown();
  EXPECT_NE(table.find("| valves[] | overlap_percent | number | % | 0 | 0 .. 45 |"), std::string::npos) << table;
}

TEST(PlantConfig, DocsCarryTheCurrentParameterTable) {
  std::ifstream in(std::string(SPOOLSTEP_SOURCE_DIR) + "/docs/plant-model.md");
  ASSERT_TRUE(in) << "docs/plant-model.md not found";
  std::stringstream doc;
  doc << in.rdbuf();
  const std::string text = doc.str();
  const std::string begin = "<!-- parameter-table:begin -->\n";
  const auto b = text.find(begin);
  const auto e = text.find("<!-- parameter-table:end -->");
  ASSERT_NE(b, std::string::npos);
  ASSERT_NE(e, std::string::npos);
  EXPECT_EQ(text.substr(b + begin.size(), e - b - begin.size()), plant_parameter_table_markdown())
      << "regenerate the table in docs/plant-model.md with: spoolstep check --plant-reference";
}

}  // namespace
}  // namespace spoolstep::hostsim::test

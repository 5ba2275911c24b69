#pragma once
/// The valve kinds and centre types, and one table of each: every fact about
/// a kind (its machine-file name, which outputs it needs and owns, how many
/// positions it has, whether it meters) and every centre's port connections
/// (ISO 1219 letters) is written here once. The validator, the loader, the
/// summary, the exporter and the plant model all read these rows; a new kind
/// is a new row plus the code that is truly new (how the core drives it and
/// how the plant moves its spool).
#include <cstddef>
#include <cstdint>

namespace spoolstep::core {

/// The valve that drives a function. Port letters follow ISO 1219: the extend
/// side connects P to A, the retract side P to B.
enum class ValveKind : std::uint8_t {
  /// 4/3 double solenoid, spring-centred: off = centre. Shifts fully, cannot ramp.
  kSolenoid43SpringCentred = 0,
  /// 4/2 double solenoid, detented: holds its last position when both coils
  /// are off. The core shifts it with a coil pulse and remembers the side;
  /// a stop cannot move it back, so the actuator holds (or completes) its stroke.
  kSolenoid42Detented = 1,
  /// 4/2 single solenoid, spring return: coil on = extend, off = retract
  /// position. "Stopped" therefore means the spring position (retract side).
  kSolenoid42SpringReturn = 2,
  /// 4/3 proportional with two solenoids, each driven by a current in mA.
  kProportional43TwoSolenoid = 3,
  /// 4/3 proportional with one signed command channel in percent (valves
  /// with on-board electronics): +100 % full extend, -100 % full retract.
  kProportional43SignedCommand = 4,
};

/// Flow paths of a 4/3 spool in its centre position (common practice, no
/// source); the connections are in kCentres below.
enum class ValveCentre : std::uint8_t {
  kNotApplicable = 0,  ///< 4/2 valves have no centre
  kClosed,        ///< P, T, A, B all blocked
  kTandem,        ///< P to T, A and B blocked
  kFloat,         ///< P blocked, A and B to T
  kOpen,          ///< P, T, A and B all joined
  kBleed,         ///< P blocked, A and B bleed to T through small orifices (a throttled float;
                  ///< catalogues differ on which of float and bleed they call a "motor" spool)
  kRegenerative,  ///< P, A and B joined, T blocked
};

/// Output fields of a FunctionConfig a valve kind drives (bits).
enum ValveOutputBits : std::uint8_t {
  kDrivesCoilExtend = 1u << 0,       ///< FunctionConfig::coil_extend
  kDrivesCoilRetract = 1u << 1,      ///< FunctionConfig::coil_retract
  kDrivesCurrentExtend = 1u << 2,    ///< FunctionConfig::prop_extend, a channel in mA
  kDrivesCurrentRetract = 1u << 3,   ///< FunctionConfig::prop_retract, a channel in mA
  kDrivesSignedCommand = 1u << 4,    ///< FunctionConfig::prop_extend, one channel in percent
};

struct ValveKindRow {
  ValveKind kind;
  const char* key;          ///< the machine file's name ("solenoid_4_3_spring_centred")
  const char* symbol;       ///< the enumerator, as the exporter writes it
  const char* text;         ///< for people ("4/3 solenoid, spring-centred")
  std::uint8_t positions;   ///< spool positions: 2 or 3
  bool has_centre;          ///< a 4/3 valve: the machine file names its centre
  bool meters;              ///< proportional: the spool is metered, so it can and must be ramped
  bool detented;            ///< holds its last position with both coils off (needs a pulse time)
  std::uint8_t outputs;     ///< ValveOutputBits: exactly these output fields are set, the others are not
};

inline constexpr ValveKindRow kValveKinds[] = {
    {ValveKind::kSolenoid43SpringCentred, "solenoid_4_3_spring_centred", "kSolenoid43SpringCentred",
     "4/3 solenoid, spring-centred", 3, true, false, false, kDrivesCoilExtend | kDrivesCoilRetract},
    {ValveKind::kSolenoid42Detented, "solenoid_4_2_detented", "kSolenoid42Detented", "4/2 solenoid, detented", 2,
     false, false, true, kDrivesCoilExtend | kDrivesCoilRetract},
    {ValveKind::kSolenoid42SpringReturn, "solenoid_4_2_spring_return", "kSolenoid42SpringReturn",
     "4/2 solenoid, spring return", 2, false, false, false, kDrivesCoilExtend},
    {ValveKind::kProportional43TwoSolenoid, "proportional_4_3_two_solenoid", "kProportional43TwoSolenoid",
     "4/3 proportional, two solenoids", 3, true, true, false, kDrivesCurrentExtend | kDrivesCurrentRetract},
    {ValveKind::kProportional43SignedCommand, "proportional_4_3_signed", "kProportional43SignedCommand",
     "4/3 proportional, signed command", 3, true, true, false, kDrivesSignedCommand},
};
inline constexpr std::size_t kValveKindCount = sizeof(kValveKinds) / sizeof(kValveKinds[0]);

/// The row of `kind`, or null for a value outside the enum (a corrupt configuration).
constexpr const ValveKindRow* valve_kind_row(ValveKind kind) {
  const auto i = static_cast<std::size_t>(kind);
  return i < kValveKindCount ? &kValveKinds[i] : nullptr;
}

/// True for valve kinds whose spool is metered (and so can be ramped).
constexpr bool is_proportional(ValveKind kind) {
  const ValveKindRow* row = valve_kind_row(kind);
  return row != nullptr && row->meters;
}

/// Port connections of a spool in its centre position (ISO 1219 letters).
struct CentreRow {
  ValveCentre centre;
  const char* key;     ///< the machine file's name ("tandem"); "none" for 4/2 valves
  const char* symbol;  ///< the enumerator, as the exporter writes it
  const char* text;    ///< for people ("tandem centre")
  bool p_to_t;         ///< P passes on to T (or to a downstream valve's through passage)
  bool p_to_a;
  bool p_to_b;
  bool a_to_t;         ///< A vents to T (full area, or the bleed orifice when `throttled`)
  bool b_to_t;
  bool throttled;      ///< A and B vent through small orifices only (bleed)
};

inline constexpr CentreRow kCentres[] = {
    {ValveCentre::kNotApplicable, "none", "kNotApplicable", "no centre (4/2)", false, false, false, false, false, false},
    {ValveCentre::kClosed, "closed", "kClosed", "closed centre", false, false, false, false, false, false},
    {ValveCentre::kTandem, "tandem", "kTandem", "tandem centre", true, false, false, false, false, false},
    {ValveCentre::kFloat, "float", "kFloat", "float centre", false, false, false, true, true, false},
    {ValveCentre::kOpen, "open", "kOpen", "open centre", true, true, true, false, false, false},
    {ValveCentre::kBleed, "bleed", "kBleed", "bleed centre", false, false, false, true, true, true},
    {ValveCentre::kRegenerative, "regenerative", "kRegenerative", "regenerative centre", false, true, true, false,
     false, false},
};
inline constexpr std::size_t kCentreCount = sizeof(kCentres) / sizeof(kCentres[0]);

/// The row of `centre`, or null for a value outside the enum.
constexpr const CentreRow* centre_row(ValveCentre centre) {
  const auto i = static_cast<std::size_t>(centre);
  return i < kCentreCount ? &kCentres[i] : nullptr;
}

/// True when a centred valve traps oil in A and B (neither vents to T): a
/// load-holding valve behind it may not close, and a fast stop spikes.
constexpr bool traps_a_and_b(ValveCentre centre) {
  const CentreRow* row = centre_row(centre);
  return row != nullptr && !row->a_to_t && !row->b_to_t && !row->p_to_a && !row->p_to_b;
}

namespace detail {
constexpr bool valve_rows_in_enum_order() {
  for (std::size_t i = 0; i < kValveKindCount; ++i) {
    if (static_cast<std::size_t>(kValveKinds[i].kind) != i) return false;
  }
  return true;
}
constexpr bool centre_rows_in_enum_order() {
  for (std::size_t i = 0; i < kCentreCount; ++i) {
    if (static_cast<std::size_t>(kCentres[i].centre) != i) return false;
  }
  return true;
}
}  // namespace detail
static_assert(detail::valve_rows_in_enum_order(), "kValveKinds rows must follow the ValveKind enum");
static_assert(detail::centre_rows_in_enum_order(), "kCentres rows must follow the ValveCentre enum");

}  // namespace spoolstep::core

#pragma once
/// Compile-time capacities of the control core. Every fixed-size table in the
/// core is sized by one of these; the host loader rejects a machine file that
/// needs more, naming the capacity. Raise a value here and rebuild to grow.
#include <cstddef>
#include <cstdint>

namespace spoolstep::core {

inline constexpr std::size_t kMaxDigitalInputs = 64;
inline constexpr std::size_t kMaxAnalogInputs = 16;
inline constexpr std::size_t kMaxCoils = 32;          ///< on/off outputs (solenoids, motor contactor)
inline constexpr std::size_t kMaxPropOutputs = 8;     ///< proportional channels (mA or %)
inline constexpr std::size_t kMaxFunctions = 8;       ///< hydraulic axes, each one directional valve
inline constexpr std::size_t kMaxRampsPerFunction = 4;
inline constexpr std::size_t kMaxConditionNodes = 192;
inline constexpr std::size_t kMaxConditionChildren = 256;  ///< child slots of all/any nodes, all conditions together
inline constexpr std::size_t kMaxInterlocks = 32;
inline constexpr std::size_t kMaxTwoHandDevices = 2;
inline constexpr std::size_t kMaxSteps = 32;
inline constexpr std::size_t kMaxTransitions = 48;
inline constexpr std::size_t kMaxActionsPerStep = 4;
inline constexpr std::size_t kMaxActiveFaults = 16;
inline constexpr std::size_t kEventLogCapacity = 64;
inline constexpr std::size_t kMaxNameLength = 23;  ///< characters, without the terminating NUL

/// Motions are numbered function * 2 + direction; guards are a bit mask over
/// motions plus one bit for the power unit, so the mask must fit 32 bits.
inline constexpr std::size_t kMotionCount = kMaxFunctions * 2;
inline constexpr std::uint32_t kPowerUnitGuardBit = 1u << kMotionCount;
inline constexpr std::uint32_t kAllMotionBits = kPowerUnitGuardBit - 1u;  ///< every motion, not the power unit
static_assert(kMotionCount + 1 <= 32, "guard mask must fit in 32 bits");
static_assert(kMaxConditionNodes < 0xFFFFu, "condition indices are 16-bit with 0xFFFF as 'none'");
static_assert(kMaxDigitalInputs < 0xFFu && kMaxCoils < 0xFFu && kMaxPropOutputs < 0xFFu,
              "I/O indices are 8-bit with 0xFF as 'none'");

inline constexpr std::uint8_t kNoIndex8 = 0xFF;
inline constexpr std::uint16_t kNoCondition = 0xFFFF;

}  // namespace spoolstep::core

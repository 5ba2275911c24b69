#pragma once
/// The 4-20 mA current loop in one place: the NAMUR NE 43 signal levels and
/// the linear scaling between loop current and engineering value. The core's
/// input checks, the plant's transmitters and the bench's scenario inputs all
/// use these, so a threshold or a scaling can never differ between them.
namespace spoolstep::core {

/// NAMUR NE 43 (check-values.md section 2; 3.6 mA and 21 mA [SRC], inclusive
/// bounds from memory of the NE 43 figure): a current at or below
/// kNe43FailLowMa or at or above kNe43FailHighMa signals a failed transmitter;
/// a measurement saturates at kNe43SaturationLowMa .. kNe43SaturationHighMa.
inline constexpr float kNe43FailLowMa = 3.6f;
inline constexpr float kNe43FailHighMa = 21.0f;
inline constexpr float kNe43SaturationLowMa = 3.8f;
inline constexpr float kNe43SaturationHighMa = 20.5f;
/// The live-zero loop: range_min at 4 mA, range_max at 20 mA.
inline constexpr float kLoopZeroMa = 4.0f;
inline constexpr float kLoopSpanMa = 16.0f;

/// Engineering value of loop current `ma` for a range_min .. range_max input.
constexpr float engineering_from_loop(float ma, float range_min, float range_max) {
  return range_min + (ma - kLoopZeroMa) / kLoopSpanMa * (range_max - range_min);
}

/// Loop current (mA) of engineering value `value` (host side, in double).
constexpr double loop_from_engineering(double value, double range_min, double range_max) {
  return static_cast<double>(kLoopZeroMa) +
         static_cast<double>(kLoopSpanMa) * (value - range_min) / (range_max - range_min);
}

}  // namespace spoolstep::core

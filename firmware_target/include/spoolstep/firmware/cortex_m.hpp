#pragma once
/// The few Cortex-M4 system registers the target programs touch. Addresses
/// and bits: ARMv7-M Architecture Reference Manual, B3.3 (SysTick) and B3.2
/// (System Control Space).
#include <cstdint>

namespace spoolstep::firmware::cortex_m {

inline volatile std::uint32_t& reg(std::uintptr_t address) {
  return *reinterpret_cast<volatile std::uint32_t*>(address);
}

inline volatile std::uint32_t& syst_csr() { return reg(0xE000E010u); }  ///< SysTick control and status
inline volatile std::uint32_t& syst_rvr() { return reg(0xE000E014u); }  ///< reload value (24 bits)
inline volatile std::uint32_t& syst_cvr() { return reg(0xE000E018u); }  ///< current value, counts down

inline constexpr std::uint32_t kSysTickEnable = 1u << 0;
inline constexpr std::uint32_t kSysTickInterrupt = 1u << 1;
inline constexpr std::uint32_t kSysTickProcessorClock = 1u << 2;
inline constexpr std::uint32_t kSysTickMask = 0x00FFFFFFu;

/// System clock of QEMU's mps2-an386 model: 25 MHz (from memory of QEMU's
/// hw/arm/mps2.c; the cost program calibrates against it rather than trusting it).
inline constexpr std::uint32_t kMps2SysclkHz = 25000000u;

}  // namespace spoolstep::firmware::cortex_m

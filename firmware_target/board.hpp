#pragma once
/// The board layer of the production image: a scan clock from SysTick and a
/// stub I/O layer. The stub reads a RAM block where a real board's input
/// drivers would put their values (all zero here: e-stop open, every analog
/// channel unhealthy, so the core holds every output off) and writes the
/// outputs to another block where output drivers would pick them up. The
/// core itself never touches any of this: time and inputs go in, outputs
/// come out.
#include <cstdint>

#include "spoolstep/core/io_image.hpp"

namespace spoolstep::board {

/// Starts the scan clock: SysTick ticks every millisecond, a scan is due
/// every `period_us` (rounded down to whole milliseconds, at least one).
void start_scan_clock(std::uint32_t period_us);

/// Sleeps until the next scan is due; returns the monotonic time in us
/// (wraps modulo 2^32, as the core expects).
std::uint32_t wait_for_scan_tick();

/// Fills `in` from the stub input block.
void read_inputs(core::InputImage& in);

/// Copies `out` to the stub output block.
void write_outputs(const core::OutputImage& out);

/// Records that the configuration was rejected (the core then holds every
/// output off and reports kConfigInvalid; a real board would light a lamp).
void signal_config_error();

}  // namespace spoolstep::board

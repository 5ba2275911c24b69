# Warning sets for spoolstep's own targets. Third-party headers come in as
# SYSTEM includes (imported targets), so these never fire on them.
add_library(spoolstep_warnings INTERFACE)
add_library(spoolstep::warnings ALIAS spoolstep_warnings)
target_compile_options(spoolstep_warnings INTERFACE -Wall -Wextra -Wpedantic -Wshadow)
if(SPOOLSTEP_WERROR)
  target_compile_options(spoolstep_warnings INTERFACE -Werror)
endif()

# The core adds -Wconversion and the embedded restrictions.
add_library(spoolstep_core_flags INTERFACE)
add_library(spoolstep::core_flags ALIAS spoolstep_core_flags)
target_compile_options(spoolstep_core_flags INTERFACE
  -Wall -Wextra -Wpedantic -Wshadow -Wconversion -Wsign-conversion -Wdouble-promotion
  -fno-exceptions -fno-rtti
  # Host and target must round identically: no fused multiply-add contraction.
  -ffp-contract=off)
if(SPOOLSTEP_WERROR)
  target_compile_options(spoolstep_core_flags INTERFACE -Werror)
endif()

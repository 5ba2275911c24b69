# CMake toolchain file: Debian 12's arm-none-eabi GCC for a Cortex-M4F
# (single-precision FPU, hard-float ABI), newlib-nano, QEMU mps2-an386 as
# the emulator for tests. Use it through the `cortex-m4f` preset, or
#   cmake -S . -B build/cortex-m4f -G Ninja \
#     -DCMAKE_TOOLCHAIN_FILE=cmake/arm-none-eabi-cortex-m4f.cmake -DCMAKE_BUILD_TYPE=MinSizeRel
# Verified settings: /work/shared/reference/ecosystem.md section 5.
set(CMAKE_SYSTEM_NAME Generic)
set(CMAKE_SYSTEM_PROCESSOR arm)

find_program(SPOOLSTEP_ARM_GCC arm-none-eabi-gcc)
find_program(SPOOLSTEP_ARM_GXX arm-none-eabi-g++)
if(NOT SPOOLSTEP_ARM_GCC OR NOT SPOOLSTEP_ARM_GXX)
  message(FATAL_ERROR
    "arm-none-eabi-gcc/g++ not found. On Debian 12: apt-get install gcc-arm-none-eabi "
    "libnewlib-arm-none-eabi libstdc++-arm-none-eabi-newlib")
endif()
set(CMAKE_C_COMPILER ${SPOOLSTEP_ARM_GCC})
set(CMAKE_CXX_COMPILER ${SPOOLSTEP_ARM_GXX})
set(CMAKE_ASM_COMPILER ${SPOOLSTEP_ARM_GCC})

# The compiler checks cannot link a bare-metal executable without our linker
# script (ecosystem.md 5.5): let them build a static library instead.
set(CMAKE_TRY_COMPILE_TARGET_TYPE STATIC_LIBRARY)

# Selects the thumb/v7e-m+fp/hard multilib (ecosystem.md 5.1).
set(SPOOLSTEP_CPU_FLAGS "-mcpu=cortex-m4 -mthumb -mfloat-abi=hard -mfpu=fpv4-sp-d16")
set(CMAKE_C_FLAGS_INIT "${SPOOLSTEP_CPU_FLAGS} -ffunction-sections -fdata-sections")
# -fno-threadsafe-statics: single-threaded bare metal, no guard-acquire calls.
set(CMAKE_CXX_FLAGS_INIT
  "${SPOOLSTEP_CPU_FLAGS} -ffunction-sections -fdata-sections -fno-exceptions -fno-rtti -fno-threadsafe-statics")
set(CMAKE_ASM_FLAGS_INIT "${SPOOLSTEP_CPU_FLAGS}")
# newlib-nano; each target adds nosys.specs (production) or rdimon.specs
# (QEMU test images), its linker script and, for firmware, the heap guard.
set(CMAKE_EXE_LINKER_FLAGS_INIT "--specs=nano.specs -Wl,--gc-sections")

# Never pick up host libraries, headers or packages (Boost, GTest, ...).
set(CMAKE_FIND_ROOT_PATH_MODE_PROGRAM NEVER)
set(CMAKE_FIND_ROOT_PATH_MODE_LIBRARY ONLY)
set(CMAKE_FIND_ROOT_PATH_MODE_INCLUDE ONLY)
set(CMAKE_FIND_ROOT_PATH_MODE_PACKAGE ONLY)

# add_test(NAME x COMMAND x) runs the ELF under QEMU with semihosting; the
# image path lands after -kernel. A faulting image never exits, so every
# target test needs a TIMEOUT (ecosystem.md 5.4).
find_program(SPOOLSTEP_QEMU_ARM qemu-system-arm)
if(SPOOLSTEP_QEMU_ARM)
  set(CMAKE_CROSSCOMPILING_EMULATOR
    ${SPOOLSTEP_QEMU_ARM} -M mps2-an386 -nographic -monitor none -serial none
    -semihosting-config enable=on,target=native -kernel)
endif()

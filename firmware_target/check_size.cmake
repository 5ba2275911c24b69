# Size budget of the production image: flash = .text + .data (its load
# image), RAM = .data + .bss (which includes the reserved main stack, a
# NOLOAD section). Run as
#   cmake -DSIZE=arm-none-eabi-size -DELF=image.elf -DFLASH_MAX=65536 -DRAM_MAX=16384 -P check_size.cmake
execute_process(COMMAND ${SIZE} -B ${ELF} OUTPUT_VARIABLE out RESULT_VARIABLE rc)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "${SIZE} ${ELF} failed (${rc})")
endif()
string(REGEX MATCH "\n[ \t]*([0-9]+)[ \t]+([0-9]+)[ \t]+([0-9]+)" row "${out}")
set(text ${CMAKE_MATCH_1})
set(data ${CMAKE_MATCH_2})
set(bss ${CMAKE_MATCH_3})
if(text STREQUAL "")
  message(FATAL_ERROR "cannot read the size table:\n${out}")
endif()
math(EXPR flash "${text} + ${data}")
math(EXPR ram "${data} + ${bss}")
message("size: text=${text} data=${data} bss=${bss} (bss includes the reserved stack)")
message("size: flash ${flash} of ${FLASH_MAX} bytes, RAM ${ram} of ${RAM_MAX} bytes")
if(flash GREATER FLASH_MAX OR ram GREATER RAM_MAX)
  message(FATAL_ERROR "over budget: flash ${flash}/${FLASH_MAX}, RAM ${ram}/${RAM_MAX}")
endif()

# Second line of the no-heap proof (ecosystem.md 5.3): the linked image must
# define or reference none of the heap, operator new/delete or C++ exception
# runtime symbols. Run as
#   cmake -DNM=arm-none-eabi-nm -DELF=image.elf -P check_symbols.cmake
# Fails (FATAL_ERROR) listing every forbidden symbol found.
execute_process(COMMAND ${NM} ${ELF} OUTPUT_VARIABLE symbols RESULT_VARIABLE rc)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "${NM} ${ELF} failed (${rc})")
endif()
set(forbidden
  # heap (newlib and its reentrant forms), and what grows it
  malloc free calloc realloc _malloc_r _free_r _calloc_r _realloc_r memalign _memalign_r _sbrk _sbrk_r
  # C++ exception runtime
  __cxa_allocate_exception __cxa_free_exception __cxa_throw __cxa_rethrow __cxa_begin_catch __cxa_end_catch
  __gxx_personality_v0 _Unwind_Resume _Unwind_RaiseException __cxa_call_unexpected
  # atexit registration (newlib's path references malloc)
  atexit __cxa_atexit __register_exitproc)
# operator new / new[] / delete / delete[] in every overload (Itanium mangling)
set(forbidden_prefixes _Znw _Zna _Zdl _Zda)
string(REPLACE "\n" ";" lines "${symbols}")
set(found)
foreach(line IN LISTS lines)
  string(REGEX MATCH "[^ \t]+$" name "${line}")
  if(name STREQUAL "")
    continue()
  endif()
  list(FIND forbidden "${name}" index)
  if(NOT index EQUAL -1)
    list(APPEND found "${line}")
    continue()
  endif()
  foreach(prefix IN LISTS forbidden_prefixes)
    string(FIND "${name}" "${prefix}" at)
    if(at EQUAL 0)
      list(APPEND found "${line}")
    endif()
  endforeach()
endforeach()
if(found)
  list(JOIN found "\n  " text)
  message(FATAL_ERROR "${ELF} references heap or exception symbols:\n  ${text}")
endif()
message(STATUS "${ELF}: no heap, operator new/delete or exception runtime symbols")

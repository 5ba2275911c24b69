// Deliberately breaks the no-heap rule, one way per build: the heap-guard
// tests build this with the production image's link options and expect the
// link to fail naming the guard's undefined __wrap_ symbol. Never built by
// default (EXCLUDE_FROM_ALL).
#include <cstdint>
#include <cstdlib>
#include <new>

volatile std::size_t g_size = 16;
volatile std::uintptr_t g_sink = 0;

int main() {
#if defined(SPOOLSTEP_PROBE_MALLOC)
  void* p = std::malloc(g_size);
  g_sink = reinterpret_cast<std::uintptr_t>(p);
  std::free(p);
#elif defined(SPOOLSTEP_PROBE_NEW)
  int* p = new int[g_size];
  g_sink = reinterpret_cast<std::uintptr_t>(p);
  delete[] p;
#elif defined(SPOOLSTEP_PROBE_THROW)
  if (g_size == 16) throw static_cast<int>(g_size);
#else
#error "define one SPOOLSTEP_PROBE_*"
#endif
  for (;;) {
  }
}

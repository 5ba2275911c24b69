/* Vector table and reset handler for the Cortex-M4F on QEMU's mps2-an386.
 *
 * Two ways to finish start-up, chosen at compile time:
 *  - production (default): copy .data, clear .bss, run the C/C++
 *    constructors from the init arrays, call main(); no newlib crt0, so no
 *    atexit registration (whose newlib code path references malloc,
 *    ecosystem.md 5.3).
 *  - SPOOLSTEP_STARTUP_NEWLIB_CRT0 (QEMU test images, rdimon specs): copy
 *    .data and branch to newlib's _start, which sets up semihosting, clears
 *    .bss, runs constructors, calls main and passes its return value to exit
 *    (QEMU's exit status, ecosystem.md 5.4). */
#include <stdint.h>

extern uint32_t __StackTop;
extern uint32_t __data_load__;
extern uint32_t __data_start__;
extern uint32_t __data_end__;
extern uint32_t __bss_start__;
extern uint32_t __bss_end__;

int main(void);
void Reset_Handler(void);
void Default_Handler(void);
void HardFault_Handler(void);
/* SysTick is used by the production image for its scan clock; weak so test
 * images that poll SysTick need not define it. */
void SysTick_Handler(void) __attribute__((weak, alias("Default_Handler")));

/* Architectural registers (ARMv7-M Architecture Reference Manual, B3.2:
 * CPACR at 0xE000ED88; CP10/CP11 access fields are bits 20-23). */
#define SPOOLSTEP_CPACR (*(volatile uint32_t*)0xE000ED88u)

/* One vector: the initial stack pointer or a handler. */
typedef union {
  uint32_t* stack_top;
  void (*handler)(void);
} spoolstep_vector;

/* 16 system exception entries; mps2-an386 interrupts are not used. */
__attribute__((section(".vectors"), used)) const spoolstep_vector spoolstep_vectors[16] = {
    {.stack_top = &__StackTop},
    {.handler = Reset_Handler},
    {.handler = Default_Handler},    /* NMI */
    {.handler = HardFault_Handler},  /* HardFault */
    {.handler = Default_Handler},    /* MemManage */
    {.handler = Default_Handler},    /* BusFault */
    {.handler = Default_Handler},    /* UsageFault */
    {0}, {0}, {0}, {0},              /* reserved */
    {.handler = Default_Handler},    /* SVCall */
    {.handler = Default_Handler},    /* DebugMonitor */
    {0},                             /* reserved */
    {.handler = Default_Handler},    /* PendSV */
    {.handler = SysTick_Handler},    /* SysTick */
};

/* Spins: a faulting image never exits, so every QEMU test has a TIMEOUT. */
void Default_Handler(void) {
  for (;;) {
  }
}

void HardFault_Handler(void) {
  for (;;) {
  }
}

#ifdef SPOOLSTEP_STARTUP_NEWLIB_CRT0
extern void _start(void) __attribute__((noreturn));
#else
typedef void (*spoolstep_init_fn)(void);
extern spoolstep_init_fn __preinit_array_start[];
extern spoolstep_init_fn __preinit_array_end[];
extern spoolstep_init_fn __init_array_start[];
extern spoolstep_init_fn __init_array_end[];
#endif

/* Must not use floating point before the FPU is enabled: with the hard-float
 * ABI the first FP instruction would fault. Only integer copies follow (GCC
 * may turn them into calls to newlib's memcpy/memset, which use no FP
 * registers); `naked` is avoided so the compiler stays in charge of the frame. */
__attribute__((noreturn)) void Reset_Handler(void) {
  SPOOLSTEP_CPACR |= (0xFu << 20);  /* CP10 and CP11: full access */
  __asm volatile("dsb\n\tisb" ::: "memory");

  const uint32_t* src = &__data_load__;
  for (uint32_t* dst = &__data_start__; dst < &__data_end__;) *dst++ = *src++;

#ifdef SPOOLSTEP_STARTUP_NEWLIB_CRT0
  _start();
#else
  for (uint32_t* dst = &__bss_start__; dst < &__bss_end__;) *dst++ = 0u;
  for (spoolstep_init_fn* fn = __preinit_array_start; fn < __preinit_array_end; ++fn) (*fn)();
  for (spoolstep_init_fn* fn = __init_array_start; fn < __init_array_end; ++fn) (*fn)();
  (void)main();
  /* main of a firmware never returns; if it does, hold here (outputs were
   * left in their last written state by the I/O layer, which is why the
   * production main only returns after forcing them off). */
  for (;;) {
  }
#endif
}

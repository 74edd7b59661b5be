/* Start-up for the emulated Cortex-M4F (MPS2 AN386) and Cortex-M7 (MPS2 AN500): the
 * vector table, a reset handler that enables the FPU before any floating-point
 * instruction can run, copies .data and clears .bss, then runs fw_main() and reports its
 * return value as the exit code through semihosting. Every fault prints its name and
 * exits with code 3, so a trap (the C library's panic handler is an undefined
 * instruction) ends the run visibly instead of hanging it. */
#include <stdint.h>

#include "fw_io.h"

extern uint32_t __stack_top[];
extern uint32_t __data_load[], __data_start[], __data_end[];
extern uint32_t __bss_start[], __bss_end[];

int fw_main(void);

/* Runs after the FPU is on: plain C from here. */
__attribute__((noreturn, used)) void fw_start(void) {
    const uint32_t *src = __data_load;
    uint32_t *dst;
    for (dst = __data_start; dst < __data_end;) {
        *dst++ = *src++;
    }
    for (dst = __bss_start; dst < __bss_end;) {
        *dst++ = 0;
    }
    fw_exit(fw_main());
}

/* The reset handler, in assembly so that no compiler-generated floating-point
 * instruction can run before CPACR grants access to CP10 and CP11 (the FPU). */
__attribute__((naked, noreturn)) void fw_reset(void) {
    __asm volatile(
        "ldr r0, =0xE000ED88\n" /* CPACR */
        "ldr r1, [r0]\n"
        "orr r1, r1, #(0xF << 20)\n" /* CP10, CP11: full access */
        "str r1, [r0]\n"
        "dsb\n"
        "isb\n"
        "b fw_start\n");
}

static void fault(const char *name) {
    fw_puts("fault: ");
    fw_puts(name);
    fw_puts("\n");
    fw_exit(3);
}

static void fw_nmi(void) { fault("NMI"); }
static void fw_hard_fault(void) { fault("HardFault"); }
static void fw_mem_manage(void) { fault("MemManage"); }
static void fw_bus_fault(void) { fault("BusFault"); }
static void fw_usage_fault(void) { fault("UsageFault (undefined instruction: a trap?)"); }
static void fw_other(void) { fault("unexpected exception"); }

typedef void (*fw_vector)(void);

__attribute__((section(".vectors"), used)) static const fw_vector fw_vectors[16] = {
    (fw_vector)(uintptr_t)__stack_top, /* initial stack pointer */
    fw_reset,
    fw_nmi,
    fw_hard_fault,
    fw_mem_manage,
    fw_bus_fault,
    fw_usage_fault,
    0,
    0,
    0,
    0,
    fw_other, /* SVCall */
    fw_other, /* DebugMonitor */
    0,
    fw_other, /* PendSV */
    fw_other, /* SysTick */
};

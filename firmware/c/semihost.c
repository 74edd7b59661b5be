/* Output and exit code through ARM semihosting (`bkpt 0xab`), which QEMU serves with
 * `-semihosting-config enable=on,target=native`. Output is buffered per line: one
 * SYS_WRITE0 call per line keeps the number of traps small. */
#include <stdint.h>

#include "fw_io.h"

#define SYS_WRITE0 0x04
#define SYS_EXIT_EXTENDED 0x20
#define ADP_STOPPED_APPLICATION_EXIT 0x20026

static uintptr_t semihost(uintptr_t op, const void *arg) {
    register uintptr_t r0 __asm__("r0") = op;
    register const void *r1 __asm__("r1") = arg;
    __asm volatile("bkpt 0xab" : "+r"(r0) : "r"(r1) : "memory");
    return r0;
}

static char line[128];
static unsigned line_len;

static void flush(void) {
    if (line_len != 0u) {
        line[line_len] = '\0';
        (void)semihost(SYS_WRITE0, line);
        line_len = 0;
    }
}

void fw_puts(const char *s) {
    for (; *s != '\0'; s++) {
        line[line_len++] = *s;
        if (*s == '\n' || line_len == sizeof line - 1u) {
            flush();
        }
    }
}

void fw_exit(int code) {
    /* SYS_EXIT_EXTENDED carries the exit code (plain SYS_EXIT only tells success). */
    uintptr_t block[2] = {ADP_STOPPED_APPLICATION_EXIT, (uintptr_t)(unsigned)code};
    flush();
    (void)semihost(SYS_EXIT_EXTENDED, block);
    for (;;) {
    }
}

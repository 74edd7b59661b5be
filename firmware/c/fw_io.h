/* Output of the firmware examples: lines of text, numbers as exact bit patterns so that
 * the emulated targets' output can be compared byte for byte with the host's. The target
 * implementation writes through semihosting (semihost.c), the host one to stdout
 * (host.c). */
#ifndef FW_IO_H
#define FW_IO_H

#include <stdint.h>

/* Platform: write a NUL-terminated string; end the program with an exit code. */
void fw_puts(const char *s);
__attribute__((noreturn)) void fw_exit(int code);

/* Portable formatting (fw_io.c). */
void fw_put_u64(uint64_t value);                     /* decimal */
void fw_put_hex(uint64_t value, int digits);         /* 0x and `digits` hex digits */
void fw_line_f64(const char *key, double value);     /* "key 0x<16 hex digits>\n" */
void fw_line_f32(const char *key, float value);      /* "key 0x<8 hex digits>\n" */
void fw_line_u64(const char *key, uint64_t value);   /* "key <decimal>\n" */
void fw_line_str(const char *key, const char *text); /* "key text\n" */

#endif

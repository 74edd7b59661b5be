/* Portable number formatting for the firmware examples (no printf on the target). */
#include "fw_io.h"

#include <string.h>

void fw_put_u64(uint64_t value) {
    char buf[21];
    int i = 20;
    buf[i] = '\0';
    do {
        buf[--i] = (char)('0' + (int)(value % 10u));
        value /= 10u;
    } while (value != 0u);
    fw_puts(&buf[i]);
}

void fw_put_hex(uint64_t value, int digits) {
    static const char hex[] = "0123456789abcdef";
    char buf[19];
    int i;
    buf[0] = '0';
    buf[1] = 'x';
    for (i = 0; i < digits; i++) {
        buf[2 + i] = hex[(value >> (4 * (digits - 1 - i))) & 0xfu];
    }
    buf[2 + digits] = '\0';
    fw_puts(buf);
}

void fw_line_f64(const char *key, double value) {
    uint64_t bits;
    memcpy(&bits, &value, sizeof bits);
    fw_puts(key);
    fw_puts(" ");
    fw_put_hex(bits, 16);
    fw_puts("\n");
}

void fw_line_f32(const char *key, float value) {
    uint32_t bits;
    memcpy(&bits, &value, sizeof bits);
    fw_puts(key);
    fw_puts(" ");
    fw_put_hex(bits, 8);
    fw_puts("\n");
}

void fw_line_u64(const char *key, uint64_t value) {
    fw_puts(key);
    fw_puts(" ");
    fw_put_u64(value);
    fw_puts("\n");
}

void fw_line_str(const char *key, const char *text) {
    fw_puts(key);
    fw_puts(" ");
    fw_puts(text);
    fw_puts("\n");
}

/* The host side of the firmware examples: the same program, linked against the host's
 * C library, prints to stdout; its output must equal the emulated targets' byte for byte. */
#include <stdio.h>
#include <stdlib.h>

#include "fw_io.h"

int fw_main(void);

void fw_puts(const char *s) { fputs(s, stdout); }

void fw_exit(int code) {
    fflush(stdout);
    exit(code);
}

int main(void) { fw_exit(fw_main()); }

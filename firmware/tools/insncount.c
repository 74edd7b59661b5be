/* A QEMU TCG plugin that counts executed guest instructions, exactly (an inline add per
 * instruction, so a partly executed translation block counts only what ran), and prints
 * the running count each time the guest executes the instruction at `mark=<address>`,
 * and the total at exit. Output goes to QEMU's log: run with
 *   -plugin insncount.so,mark=0x... -d plugin -D log.txt
 * One guest CPU (the MPS2 boards have one), so a plain counter suffices.
 * Build: cc -shared -fPIC -O2 -o insncount.so insncount.c */
#include <inttypes.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "qemu_plugin_api.h"

QEMU_PLUGIN_EXPORT int qemu_plugin_version = 1;

static uint64_t executed;
static uint64_t mark_vaddr = UINT64_MAX;

static void on_mark(unsigned int vcpu_index, void *userdata) {
    char line[64];
    (void)vcpu_index;
    (void)userdata;
    snprintf(line, sizeof line, "mark %" PRIu64 "\n", executed);
    qemu_plugin_outs(line);
}

static void on_translate(qemu_plugin_id_t id, struct qemu_plugin_tb *tb) {
    size_t i, n = qemu_plugin_tb_n_insns(tb);
    (void)id;
    for (i = 0; i < n; i++) {
        struct qemu_plugin_insn *insn = qemu_plugin_tb_get_insn(tb, i);
        if (qemu_plugin_insn_vaddr(insn) == mark_vaddr) {
            qemu_plugin_register_vcpu_insn_exec_cb(insn, on_mark, QEMU_PLUGIN_CB_NO_REGS, NULL);
        }
        qemu_plugin_register_vcpu_insn_exec_inline(insn, QEMU_PLUGIN_INLINE_ADD_U64, &executed,
                                                   1);
    }
}

static void on_plugin_exit(qemu_plugin_id_t id, void *userdata) {
    char line[64];
    (void)id;
    (void)userdata;
    snprintf(line, sizeof line, "total %" PRIu64 "\n", executed);
    qemu_plugin_outs(line);
}

QEMU_PLUGIN_EXPORT int qemu_plugin_install(qemu_plugin_id_t id, const qemu_info_t *info,
                                           int argc, char **argv) {
    int i;
    (void)info;
    for (i = 0; i < argc; i++) {
        if (strncmp(argv[i], "mark=", 5) == 0) {
            /* A Thumb function's symbol value has bit 0 set; instructions do not. */
            mark_vaddr = strtoull(argv[i] + 5, NULL, 0) & ~(uint64_t)1;
        }
    }
    qemu_plugin_register_vcpu_tb_trans_cb(id, on_translate);
    qemu_plugin_register_atexit_cb(id, on_plugin_exit, NULL);
    return 0;
}

//! The bare-metal side: vector table, reset handler, semihosting, panic handler.
//!
//! The reset handler is assembly so that no compiler-generated floating-point instruction
//! can run before CPACR grants access to the FPU (CP10, CP11); it then copies `.data`,
//! clears `.bss` and calls [`fw_rust_main`]. The symbols come from `firmware/link.ld`.

use core::arch::{asm, global_asm};
use core::panic::PanicInfo;

use crate::report::{self, Sink};

global_asm!(
    ".section .vectors, \"a\"",
    ".p2align 2",
    ".word __stack_top",
    ".word fw_reset",
    // NMI, HardFault, MemManage, BusFault, UsageFault, 4 reserved, SVCall, DebugMonitor,
    // reserved, PendSV, SysTick: all end the run with exit code 3.
    ".rept 14",
    ".word fw_fault",
    ".endr",
    ".section .text.fw_reset, \"ax\", %progbits",
    ".global fw_reset",
    ".type fw_reset, %function",
    ".thumb_func",
    "fw_reset:",
    "    ldr r0, =0xE000ED88",
    "    ldr r1, [r0]",
    "    orr r1, r1, #(0xF << 20)",
    "    str r1, [r0]",
    "    dsb",
    "    isb",
    "    ldr r0, =__data_start",
    "    ldr r1, =__data_end",
    "    ldr r2, =__data_load",
    "1:  cmp r0, r1",
    "    bhs 2f",
    "    ldr r3, [r2], #4",
    "    str r3, [r0], #4",
    "    b 1b",
    "2:  ldr r0, =__bss_start",
    "    ldr r1, =__bss_end",
    "    movs r3, #0",
    "3:  cmp r0, r1",
    "    bhs 4f",
    "    str r3, [r0], #4",
    "    b 3b",
    "4:  bl fw_rust_main",
    "    b .",
    "    .ltorg",
);

const SYS_WRITE0: usize = 0x04;
const SYS_EXIT_EXTENDED: usize = 0x20;
const ADP_STOPPED_APPLICATION_EXIT: usize = 0x2_0026;

/// One semihosting call (`bkpt 0xab`, served by QEMU with `-semihosting-config`).
fn semihost(op: usize, arg: *const u8) -> usize {
    let mut r0 = op;
    // SAFETY: the semihosting trap reads the block or string `arg` points to (valid for
    // the call, see the callers) and writes only r0.
    unsafe {
        asm!("bkpt 0xab", inout("r0") r0, in("r1") arg, options(nostack));
    }
    r0
}

/// Semihosting output, one call per line (a NUL-terminated buffer).
struct Semihost {
    line: [u8; 128],
    len: usize,
}

impl Semihost {
    fn flush(&mut self) {
        if self.len > 0 {
            self.line[self.len] = 0;
            semihost(SYS_WRITE0, self.line.as_ptr());
            self.len = 0;
        }
    }
}

impl Sink for Semihost {
    fn text(&mut self, text: &str) {
        for &byte in text.as_bytes() {
            self.line[self.len] = byte;
            self.len += 1;
            if byte == b'\n' || self.len == self.line.len() - 1 {
                self.flush();
            }
        }
    }
}

/// Ends the run with `code` as QEMU's exit status.
fn exit(code: i32) -> ! {
    let block = [ADP_STOPPED_APPLICATION_EXIT, code as usize];
    semihost(SYS_EXIT_EXTENDED, block.as_ptr().cast());
    loop {}
}

#[no_mangle]
extern "C" fn fw_rust_main() -> ! {
    let mut out = Semihost {
        line: [0; 128],
        len: 0,
    };
    let code = report::run(&mut out);
    out.flush();
    exit(code)
}

#[no_mangle]
extern "C" fn fw_fault() -> ! {
    semihost(SYS_WRITE0, b"fault\n\0".as_ptr());
    exit(3)
}

/// The firmware's own panic handler (the core has none and needs none: it never panics).
/// Reports and exits with code 101, so a panic fails the run visibly.
#[panic_handler]
fn panic(_: &PanicInfo<'_>) -> ! {
    semihost(SYS_WRITE0, b"panic\n\0".as_ptr());
    exit(101)
}

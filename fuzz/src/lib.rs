//! The shared harness of the fuzz targets: an input decoder that reaches both physical and
//! hostile values, the oracles every target applies, and the encoder the seed corpus is
//! written with.
//!
//! # Decoding
//! A fuzz input is read front to back by [`Dec`]. Every `f64` costs one selector byte and
//! then, by the selector:
//! - an entry of [`EDGES`] (NaN of both signs, infinities, +-0, subnormals, the ends of the
//!   double range, 1 +- ulp, ...), index in the next byte;
//! - a physical value of the argument's [`Kind`] (a temperature between 150 K and 4000 K,
//!   a wavelength between 0.2 um and 30 um, a fraction in [0, 1], ...), from two bytes;
//! - any bit pattern, from eight bytes (little endian).
//!
//! Past the end of the input every byte reads as 0. Seeds are written with [`Enc`], which
//! emits the bit-pattern form of each value, so that a seed decodes to exactly the values
//! of the case it was made from.
//!
//! # Oracles
//! - A success never returns NaN or infinity ([`Poisoned`] outputs, [`finite`]).
//! - On error every out value is bit-for-bit untouched ([`Poisoned::untouched`]).
//! - A success satisfies its round trip where one exists (each target).
//! - Each call finishes within a per-call CPU-time limit ([`timed`]): 50 ms by default,
//!   `BT_FUZZ_CALL_LIMIT_MS` to change it. Thread CPU time, not wall time, so that a
//!   process descheduled on a busy machine is not reported as slow.
//!
//! A violated oracle panics with a message naming the call and its arguments; libFuzzer
//! records the input as a crash artifact.

use bandtemp_capi::{bt_band, bt_detector, bt_scene};
use core::mem::{size_of, MaybeUninit};
use std::sync::OnceLock;

/// Edge values every `f64` argument is also drawn from.
pub const EDGES: [f64; 40] = [
    0.0,
    -0.0,
    f64::NAN,
    -f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    f64::MIN_POSITIVE,
    -f64::MIN_POSITIVE,
    5e-324,
    -5e-324,
    2.2e-308,
    1e-310,
    f64::MAX,
    f64::MIN,
    1e308,
    -1e308,
    1e300,
    1e-300,
    f64::EPSILON,
    1.0,
    -1.0,
    1.0 - f64::EPSILON / 2.0,
    1.0 + f64::EPSILON,
    0.5,
    2.0,
    0.1,
    1e6,
    1e7,
    1e-6,
    1e-9,
    8.0,
    14.0,
    3.0,
    5.0,
    300.0,
    273.15,
    1000.0,
    1e38,
    1.17549435e-38,
    3.4028235e38,
];

/// What an `f64` argument stands for: sets the physical range it is drawn from.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    /// A temperature, K: 150..4000, log-uniform.
    TempK,
    /// A wide temperature, K: 1..1e6, log-uniform (the solvers' range and beyond).
    WideTempK,
    /// A wavelength, um: 0.2..30, log-uniform.
    Um,
    /// A fraction in [0, 1], uniform.
    Fraction,
    /// A positive magnitude, 1e-30..1e30, log-uniform (radiances, signals, constants).
    Magnitude,
    /// A tolerance, K: 1e-6..10, log-uniform.
    ToleranceK,
    /// A standard uncertainty: 1e-6..10, log-uniform.
    Uncertainty,
    /// Any value -1e6..1e6, uniform.
    Signed,
}

impl Kind {
    /// Maps a uniform u in [0, 1] to the kind's physical range.
    fn physical(self, u: f64) -> f64 {
        let log = |lo: f64, hi: f64| lo * (hi / lo).powf(u);
        match self {
            Kind::TempK => log(150.0, 4000.0),
            Kind::WideTempK => log(1.0, 1e6),
            Kind::Um => log(0.2, 30.0),
            Kind::Fraction => u,
            Kind::Magnitude => log(1e-30, 1e30),
            Kind::ToleranceK => log(1e-6, 10.0),
            Kind::Uncertainty => log(1e-6, 10.0),
            Kind::Signed => -1e6 + 2e6 * u,
        }
    }
}

/// Selector classes of an `f64` (selector byte modulo 8).
const SEL_EDGE_MAX: u8 = 1; // 0..=1: edge table
const SEL_RAW: u8 = 7; // 7: bit pattern; 2..=6 physical

/// Reads a fuzz input front to back; zeros past its end.
pub struct Dec<'a> {
    data: &'a [u8],
}

impl<'a> Dec<'a> {
    /// A decoder over `data` (a new fuzz input: the known-slow flag is cleared).
    pub fn new(data: &'a [u8]) -> Self {
        KNOWN_SLOW.set(false);
        Dec { data }
    }

    /// True when every byte has been read.
    pub fn is_empty(&self) -> bool {
        self.data.is_empty()
    }

    /// The next byte, 0 past the end.
    pub fn u8(&mut self) -> u8 {
        match self.data.split_first() {
            Some((&b, rest)) => {
                self.data = rest;
                b
            }
            None => 0,
        }
    }

    /// The next two bytes, little endian.
    pub fn u16(&mut self) -> u16 {
        u16::from_le_bytes([self.u8(), self.u8()])
    }

    /// The next four bytes, little endian.
    pub fn u32(&mut self) -> u32 {
        u32::from_le_bytes([self.u8(), self.u8(), self.u8(), self.u8()])
    }

    /// The next eight bytes, little endian.
    pub fn u64(&mut self) -> u64 {
        let mut b = [0u8; 8];
        for slot in &mut b {
            *slot = self.u8();
        }
        u64::from_le_bytes(b)
    }

    /// A boolean from one byte.
    pub fn bool(&mut self) -> bool {
        self.u8() & 1 == 1
    }

    /// A length in 0..=max from one byte (two when max > 255).
    pub fn len(&mut self, max: usize) -> usize {
        let raw = if max > 255 {
            usize::from(self.u16())
        } else {
            usize::from(self.u8())
        };
        raw % (max + 1)
    }

    /// An `f64` of `kind`: an edge value, a physical value, or a bit pattern.
    pub fn f64(&mut self, kind: Kind) -> f64 {
        let sel = self.u8() % 8;
        if sel <= SEL_EDGE_MAX {
            let i = usize::from(self.u8()) % EDGES.len();
            EDGES[i]
        } else if sel == SEL_RAW {
            f64::from_bits(self.u64())
        } else {
            kind.physical(f64::from(self.u16()) / f64::from(u16::MAX))
        }
    }

    /// An `f32` (frame pixels): the `f64` of `kind` rounded, or a bit pattern.
    pub fn f32(&mut self, kind: Kind) -> f32 {
        if self.u8() % 4 == 3 {
            f32::from_bits(self.u32())
        } else {
            #[allow(clippy::cast_possible_truncation)]
            let v = self.f64(kind) as f32;
            v
        }
    }

    /// A detector integer: 0 or 1 mostly, sometimes any value.
    pub fn detector(&mut self) -> u32 {
        match self.u8() % 8 {
            0..=2 => 0,
            3..=5 => 1,
            _ => self.u32(),
        }
    }
}

/// Writes seeds in the form [`Dec`] reads: every value as its bit pattern.
#[derive(Default)]
pub struct Enc {
    /// The bytes so far.
    pub bytes: Vec<u8>,
}

impl Enc {
    /// An empty seed.
    pub fn new() -> Self {
        Enc::default()
    }
    /// A byte.
    pub fn u8(&mut self, v: u8) -> &mut Self {
        self.bytes.push(v);
        self
    }
    /// Two bytes.
    pub fn u16(&mut self, v: u16) -> &mut Self {
        self.bytes.extend_from_slice(&v.to_le_bytes());
        self
    }
    /// Four bytes.
    pub fn u32(&mut self, v: u32) -> &mut Self {
        self.bytes.extend_from_slice(&v.to_le_bytes());
        self
    }
    /// Eight bytes.
    pub fn u64(&mut self, v: u64) -> &mut Self {
        self.bytes.extend_from_slice(&v.to_le_bytes());
        self
    }
    /// A boolean.
    pub fn bool(&mut self, v: bool) -> &mut Self {
        self.u8(u8::from(v))
    }
    /// A length (as [`Dec::len`] with the same `max` reads it; `v <= max`).
    pub fn len(&mut self, v: usize, max: usize) -> &mut Self {
        if max > 255 {
            self.u16(u16::try_from(v).unwrap_or(0))
        } else {
            self.u8(u8::try_from(v).unwrap_or(0))
        }
    }
    /// An `f64`, exactly.
    pub fn f64(&mut self, v: f64) -> &mut Self {
        self.u8(SEL_RAW).u64(v.to_bits())
    }
    /// An `f32`, exactly.
    pub fn f32(&mut self, v: f32) -> &mut Self {
        self.u8(3).u32(v.to_bits())
    }
    /// A detector integer, exactly.
    pub fn detector(&mut self, v: u32) -> &mut Self {
        self.u8(7).u32(v)
    }
}

/// A `bt_band` with its detector as a plain integer, so that any value can be passed
/// (the layout of `bt_band`, checked by the capi tests).
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct RawBand {
    /// Lower edge, um.
    pub lo_um: f64,
    /// Upper edge, um.
    pub hi_um: f64,
    /// The detector as an integer.
    pub detector: u32,
    /// Response wavelengths.
    pub response_um: *const f64,
    /// Response values.
    pub response: *const f64,
    /// Table length.
    pub response_len: usize,
}

const _: () = assert!(size_of::<RawBand>() == size_of::<bt_band>());
const _: () = assert!(size_of::<bt_detector>() == size_of::<u32>());

/// A band and the tables it points into.
pub struct FuzzBand {
    /// The raw struct (pointers into `wl` and `r`).
    pub raw: RawBand,
    /// Response wavelengths, um.
    pub wl: Vec<f64>,
    /// Response values.
    pub r: Vec<f64>,
}

impl FuzzBand {
    /// The struct to pass to the C ABI.
    pub fn ptr(&self) -> *const bt_band {
        (&raw const self.raw).cast::<bt_band>()
    }

    /// A copy whose pointers are still those of `self` (keep `self` alive).
    pub fn raw(&self) -> RawBand {
        self.raw
    }
}

thread_local! {
    /// Set while the current input holds a band of the known slow kind (see [`band`]).
    static KNOWN_SLOW: core::cell::Cell<bool> = const { core::cell::Cell::new(false) };
}

/// The relaxed per-call limit for inputs of a known open slow finding, ms
/// (`BT_FUZZ_KNOWN_SLOW_LIMIT_MS`, default 2000).
pub fn known_slow_limit_ms() -> f64 {
    static LIMIT: OnceLock<f64> = OnceLock::new();
    *LIMIT.get_or_init(|| {
        std::env::var("BT_FUZZ_KNOWN_SLOW_LIMIT_MS")
            .ok()
            .and_then(|s| s.parse().ok())
            .unwrap_or(2000.0)
    })
}

/// Decodes a band: edges (sometimes reversed), a detector integer, and a rectangular or
/// tabulated response of any content (sometimes sorted, sometimes a table of the length
/// that the struct claims minus what was decoded: a null or a short pointer is never
/// passed; lengths always describe the vectors).
pub fn band(d: &mut Dec<'_>) -> FuzzBand {
    let mut lo = d.f64(Kind::Um);
    let mut hi = d.f64(Kind::Um);
    let shape = d.u8();
    if shape & 1 == 1 && lo > hi {
        core::mem::swap(&mut lo, &mut hi);
    }
    let detector = d.detector();
    let n = if shape & 2 == 2 { d.len(24) } else { 0 };
    let mut wl: Vec<f64> = (0..n).map(|_| d.f64(Kind::Um)).collect();
    let r: Vec<f64> = (0..n).map(|_| d.f64(Kind::Fraction)).collect();
    if shape & 4 == 4 {
        wl.sort_by(f64::total_cmp);
    }
    // Known open finding (slow path): the tabulated quadrature walks x = c2/(lambda T) in
    // panels that double from the smallest x and are one unit wide up to 710, so a table
    // reaching beyond 1e30 um or below 1e-30 um costs up to ~1700 panels per band
    // evaluation (bt_ratio_temperature, 65 evaluations, took 60 ms with a table up to
    // 7.5e300 um; bt_object_temperature 35 ms with one down to 1e-310 um). Such inputs get
    // the relaxed limit of `known_slow_limit_ms`.
    if n > 0 {
        let lo_eff = wl.first().map_or(lo, |&w| w.max(lo));
        let hi_eff = wl.last().map_or(hi, |&w| w.min(hi));
        if hi_eff > 1e30 || lo_eff < 1e-30 {
            KNOWN_SLOW.set(true);
        }
    }
    // A null-pointer table of length 0 with a stray pointer value is the C side's job
    // (tests/c); here the pointers are always the vectors'.
    let raw = RawBand {
        lo_um: lo,
        hi_um: hi,
        detector,
        response_um: if n == 0 {
            core::ptr::null()
        } else {
            wl.as_ptr()
        },
        response: if n == 0 {
            core::ptr::null()
        } else {
            r.as_ptr()
        },
        response_len: n,
    };
    FuzzBand { raw, wl, r }
}

/// Encodes a band for [`band`]: a sorted table when one is given.
pub fn enc_band(e: &mut Enc, lo: f64, hi: f64, detector: u32, table: Option<(&[f64], &[f64])>) {
    e.f64(lo).f64(hi);
    match table {
        None => {
            e.u8(0).detector(detector);
        }
        Some((wl, r)) => {
            e.u8(2 | 4).detector(detector);
            e.len(wl.len(), 24);
            for &w in wl {
                e.f64(w);
            }
            for &v in r {
                e.f64(v);
            }
        }
    }
}

/// Decodes a scene: all fields, or a valid scene with one field replaced.
pub fn scene(d: &mut Dec<'_>) -> bt_scene {
    let mode = d.u8();
    let mut f = if mode.is_multiple_of(4) {
        [
            d.f64(Kind::Fraction),
            d.f64(Kind::TempK),
            d.f64(Kind::Fraction),
            d.f64(Kind::TempK),
            d.f64(Kind::Fraction),
            d.f64(Kind::Fraction),
            d.f64(Kind::TempK),
            d.f64(Kind::TempK),
        ]
    } else {
        // A valid scene drawn from physical ranges.
        let e = 0.02 + 0.98 * f64::from(d.u8()) / 255.0;
        let ta = 0.3 + 0.7 * f64::from(d.u8()) / 255.0;
        let tw = 0.3 + 0.7 * f64::from(d.u8()) / 255.0;
        let rw = (1.0 - tw) * f64::from(d.u8()) / 255.0;
        [
            e,
            d.f64(Kind::TempK),
            ta,
            d.f64(Kind::TempK),
            tw,
            rw,
            d.f64(Kind::TempK),
            d.f64(Kind::TempK),
        ]
    };
    if mode % 4 == 1 {
        let i = usize::from(d.u8()) % 8;
        f[i] = d.f64(Kind::Fraction);
    }
    scene_from(f)
}

/// Encodes an exact scene for [`scene`].
pub fn enc_scene(e: &mut Enc, f: [f64; 8]) {
    e.u8(0);
    for v in f {
        e.f64(v);
    }
}

/// A `bt_scene` from its eight fields in declaration order.
pub fn scene_from(f: [f64; 8]) -> bt_scene {
    bt_scene {
        emissivity: f[0],
        reflected_k: f[1],
        atm_transmittance: f[2],
        atm_k: f[3],
        window_transmittance: f[4],
        window_reflectance: f[5],
        window_k: f[6],
        window_reflected_k: f[7],
    }
}

/// Plain-data output types: every bit pattern valid, so that they can be poisoned.
///
/// # Safety
/// Implement only for types made of integers and floats (and arrays and structs of them).
pub unsafe trait Plain: Copy {}
unsafe impl Plain for f64 {}
unsafe impl Plain for f32 {}
unsafe impl Plain for usize {}
unsafe impl Plain for bandtemp_capi::bt_sakuma_hattori {}
unsafe impl Plain for bandtemp_capi::bt_points_fit {}
unsafe impl Plain for bandtemp_capi::bt_frame_converter {}
unsafe impl Plain for bandtemp_capi::bt_frame_geometry {}
unsafe impl Plain for bandtemp_capi::bt_frame_summary {}
unsafe impl Plain for bandtemp_capi::bt_frame_row {}
unsafe impl Plain for bandtemp_capi::bt_budget {}
unsafe impl Plain for bandtemp_capi::bt_contribution {}
unsafe impl Plain for u8 {}
unsafe impl Plain for u32 {}
unsafe impl Plain for bandtemp_capi::bt_two_point_report {}
unsafe impl Plain for bandtemp_capi::bt_bad_pixel_report {}
unsafe impl Plain for bandtemp_capi::bt_multi_point_report {}
unsafe impl Plain for bandtemp_capi::bt_spatial_stats {}
unsafe impl Plain for bandtemp_capi::bt_corrected_summary {}
unsafe impl Plain for bandtemp_capi::bt_drift_model {}
unsafe impl Plain for bandtemp_capi::bt_drift_step {}
unsafe impl Plain for bandtemp_capi::bt_verify_residuals_report {}
unsafe impl Plain for bandtemp_capi::bt_verify_curve_report {}
unsafe impl Plain for bandtemp_capi::bt_verify_round_trip_report {}
unsafe impl Plain for bandtemp_capi::bt_verify_coverage_report {}
unsafe impl Plain for bandtemp_capi::bt_verify_table_report {}
unsafe impl Plain for bandtemp_capi::bt_verify_uncertainty_report {}
unsafe impl Plain for bandtemp_capi::bt_mtf {}
unsafe impl Plain for bandtemp_capi::bt_sse_correction {}
unsafe impl Plain for bandtemp_capi::bt_target_verdict {}
unsafe impl Plain for bandtemp_capi::bt_directional_emissivity {}
unsafe impl Plain for bandtemp_capi::bt_multiwavelength_result {}
unsafe impl Plain for bandtemp_capi::bt_site_budget {}
unsafe impl Plain for bandtemp_capi::bt_monte_carlo {}
unsafe impl Plain for bandtemp_capi::bt_wien_ratio {}
unsafe impl Plain for RawCurve {}
unsafe impl Plain for RawCurveFit {}

/// A `bt_curve` with its form as a plain integer, so that any value can be passed and a
/// poisoned out value is a valid Rust value (the layout of `bt_curve`: a C enum is an
/// `int`-sized field).
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct RawCurve {
    /// The form as an integer (0 Planck, 1 Wien).
    pub form: u32,
    /// A, um.
    pub a_um: f64,
    /// B, um K.
    pub b_umk: f64,
    /// C, signal units.
    pub c: f64,
    /// Dark offset, signal units.
    pub offset: f64,
}

const _: () = assert!(size_of::<RawCurve>() == size_of::<bandtemp_capi::bt_curve>());
const _: () = assert!(size_of::<bandtemp_capi::bt_curve_form>() == size_of::<u32>());

impl RawCurve {
    /// The struct to pass to the C ABI.
    pub fn ptr(&self) -> *const bandtemp_capi::bt_curve {
        (self as *const RawCurve).cast()
    }
}

/// A `bt_curve_fit` over [`RawCurve`] (same layout).
#[repr(C)]
#[derive(Clone, Copy, Debug)]
pub struct RawCurveFit {
    /// The fitted curve.
    pub curve: RawCurve,
    /// Covariance of (A, B, C).
    pub covariance: [[f64; 3]; 3],
    /// Largest temperature residual, K.
    pub max_residual_k: f64,
    /// RMS temperature residual, K.
    pub rms_residual_k: f64,
    /// Iterations used.
    pub iterations: u32,
}

const _: () = assert!(size_of::<RawCurveFit>() == size_of::<bandtemp_capi::bt_curve_fit>());

/// An out value filled with a poison byte pattern before a call, to check afterwards that
/// an error left it untouched.
pub struct Poisoned<T: Plain> {
    /// The value (pass `&mut value` as the out-pointer).
    pub value: T,
}

/// The poison byte.
pub const POISON: u8 = 0xA5;

impl<T: Plain> Poisoned<T> {
    /// A value whose every byte is [`POISON`].
    pub fn new() -> Self {
        let mut v = MaybeUninit::<T>::uninit();
        // SAFETY: `T: Plain`, so every byte pattern is a valid `T`; all bytes are written.
        let value = unsafe {
            v.as_mut_ptr()
                .cast::<u8>()
                .write_bytes(POISON, size_of::<T>());
            v.assume_init()
        };
        Poisoned { value }
    }

    /// The out-pointer.
    pub fn ptr(&mut self) -> *mut T {
        &raw mut self.value
    }

    /// True when every byte is still the poison byte.
    pub fn untouched(&self) -> bool {
        bytes_of(&self.value).iter().all(|&b| b == POISON)
    }
}

impl<T: Plain> Default for Poisoned<T> {
    fn default() -> Self {
        Self::new()
    }
}

/// The bytes of a plain value.
pub fn bytes_of<T: Plain>(v: &T) -> &[u8] {
    // SAFETY: `T: Plain` (no padding is read uninitialised: the poisoned values are written
    // whole, and the values compared are copies of fully written memory).
    unsafe { core::slice::from_raw_parts((v as *const T).cast::<u8>(), size_of::<T>()) }
}

/// The bytes of a slice of plain values.
pub fn slice_bytes<T: Plain>(v: &[T]) -> &[u8] {
    // SAFETY: as `bytes_of`.
    unsafe { core::slice::from_raw_parts(v.as_ptr().cast::<u8>(), core::mem::size_of_val(v)) }
}

/// One timed call with a poisoned out value: on error checks that the out value is
/// untouched and returns `None`; on success returns the value for the caller's oracles.
#[track_caller]
pub fn checked<T: Plain>(
    name: &str,
    args: &dyn Fn() -> String,
    call: impl FnOnce(*mut T) -> bandtemp_capi::bt_status,
) -> Option<T> {
    let mut out = Poisoned::<T>::new();
    let s = timed(|| format!("{name}({})", args()), || call(out.ptr()));
    if s == bandtemp_capi::bt_status::Ok {
        Some(out.value)
    } else {
        oracle(out.untouched(), || {
            format!("{name} wrote on {s:?}: {}", args())
        });
        None
    }
}

/// As [`checked`] for a call with two out values (both untouched on error).
#[track_caller]
pub fn checked2<T: Plain, U: Plain>(
    name: &str,
    args: &dyn Fn() -> String,
    call: impl FnOnce(*mut T, *mut U) -> bandtemp_capi::bt_status,
) -> Option<(T, U)> {
    let mut a = Poisoned::<T>::new();
    let mut b = Poisoned::<U>::new();
    let s = timed(|| format!("{name}({})", args()), || call(a.ptr(), b.ptr()));
    if s == bandtemp_capi::bt_status::Ok {
        Some((a.value, b.value))
    } else {
        oracle(a.untouched() && b.untouched(), || {
            format!("{name} wrote on {s:?}: {}", args())
        });
        None
    }
}

/// Panics (a finding) unless `cond`; the message names the call and its arguments.
#[track_caller]
pub fn oracle(cond: bool, what: impl FnOnce() -> String) {
    if !cond {
        panic!("oracle violated: {}", what());
    }
}

/// True when every value is finite.
pub fn finite(values: &[f64]) -> bool {
    values.iter().all(|v| v.is_finite())
}

/// The per-call CPU-time limit, ms (`BT_FUZZ_CALL_LIMIT_MS`, default 50).
pub fn call_limit_ms() -> f64 {
    static LIMIT: OnceLock<f64> = OnceLock::new();
    *LIMIT.get_or_init(|| {
        std::env::var("BT_FUZZ_CALL_LIMIT_MS")
            .ok()
            .and_then(|s| s.parse().ok())
            .unwrap_or(50.0)
    })
}

/// CPU time of this thread, s.
pub fn thread_cpu_s() -> f64 {
    let mut ts = libc::timespec {
        tv_sec: 0,
        tv_nsec: 0,
    };
    // SAFETY: `ts` is a valid timespec to write; the clock id is a constant of the platform.
    let rc = unsafe { libc::clock_gettime(libc::CLOCK_THREAD_CPUTIME_ID, &raw mut ts) };
    if rc != 0 {
        return 0.0;
    }
    #[allow(clippy::cast_precision_loss)]
    let s = ts.tv_sec as f64 + ts.tv_nsec as f64 * 1e-9;
    s
}

/// Runs one call and panics (a slow-call finding) if it used more CPU time than the
/// per-call limit; `what` names the call and its arguments.
#[track_caller]
pub fn timed<R>(what: impl FnOnce() -> String, call: impl FnOnce() -> R) -> R {
    let limit = if KNOWN_SLOW.get() {
        known_slow_limit_ms()
    } else {
        call_limit_ms()
    };
    timed_with_limit(limit, what, call)
}

/// As [`timed`] with an explicit limit, ms.
#[track_caller]
pub fn timed_with_limit<R>(
    limit_ms: f64,
    what: impl FnOnce() -> String,
    call: impl FnOnce() -> R,
) -> R {
    let start = thread_cpu_s();
    let result = call();
    let used_ms = (thread_cpu_s() - start) * 1e3;
    if used_ms > limit_ms {
        panic!(
            "slow call: {} took {used_ms:.1} ms CPU (limit {limit_ms} ms)",
            what()
        );
    }
    result
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn encoded_values_decode_exactly() {
        let values = [0.0, -0.0, f64::NAN, 1e-320, 300.0, f64::MAX, -7.5];
        let mut e = Enc::new();
        for v in values {
            e.f64(v);
        }
        e.u8(9).len(300, 400).detector(7).f32(1.5);
        let mut d = Dec::new(&e.bytes);
        for v in values {
            assert_eq!(d.f64(Kind::Signed).to_bits(), v.to_bits());
        }
        assert_eq!(d.u8(), 9);
        assert_eq!(d.len(400), 300);
        assert_eq!(d.detector(), 7);
        assert_eq!(d.f32(Kind::Signed), 1.5);
        assert!(d.is_empty());
    }

    #[test]
    fn physical_values_stay_in_range() {
        for raw in [0u16, 1, 32768, u16::MAX] {
            let bytes = [2u8, raw.to_le_bytes()[0], raw.to_le_bytes()[1]];
            let t = Dec::new(&bytes).f64(Kind::TempK);
            assert!((150.0..=4000.0 * (1.0 + 1e-12)).contains(&t), "{t}");
        }
    }
}

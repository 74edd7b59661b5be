//! The checked-in C header equals what cbindgen generates from capi/src, carries the
//! version of Cargo.toml, and declares the C ABI that DESIGN.md fixes.
//!
//! Regenerate the header after changing capi/src:
//!     BANDTEMP_BLESS=1 cargo test -p bandtemp-capi --test ffi_header

use std::path::Path;

const REGENERATE: &str = "BANDTEMP_BLESS=1 cargo test -p bandtemp-capi --test ffi_header";

fn generate() -> String {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let config = cbindgen::Config::from_file(root.join("cbindgen.toml"))
        .unwrap_or_else(|e| panic!("cbindgen.toml does not parse: {e}"));
    let bindings = cbindgen::Builder::new()
        .with_config(config)
        .with_src(root.join("src/lib.rs"))
        .generate()
        .unwrap_or_else(|e| panic!("cbindgen failed on capi/src: {e}"));
    let mut bytes = Vec::new();
    bindings.write(&mut bytes);
    String::from_utf8(bytes).expect("cbindgen writes UTF-8")
}

/// The checked-in header (in bless mode, the fresh generation being written).
fn checked_in() -> String {
    if std::env::var_os("BANDTEMP_BLESS").is_some() {
        return generate();
    }
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../include/bandtemp.h");
    std::fs::read_to_string(&path).unwrap_or_default()
}

/// Collapses whitespace, so that prototypes compare independently of line breaks.
fn normalise(text: &str) -> String {
    let spaced = text
        .replace('(', " ( ")
        .replace(')', " ) ")
        .replace(',', " , ")
        .replace(';', " ; ")
        .replace('*', " * ");
    spaced.split_whitespace().collect::<Vec<_>>().join(" ")
}

#[test]
fn header_matches_cbindgen_output() {
    let fresh = generate();
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../include/bandtemp.h");
    if std::env::var_os("BANDTEMP_BLESS").is_some() {
        std::fs::write(&path, &fresh).expect("write include/bandtemp.h");
        return;
    }
    let current = checked_in();
    if current != fresh {
        let first_difference = current
            .lines()
            .zip(fresh.lines())
            .position(|(a, b)| a != b)
            .unwrap_or_else(|| current.lines().count().min(fresh.lines().count()));
        panic!(
            "include/bandtemp.h differs from the cbindgen output for capi/src (first \
             difference at line {}).\nRegenerate it with:\n    {REGENERATE}\nand commit the result.",
            first_difference + 1
        );
    }
}

#[test]
fn header_version_defines_match_cargo_toml() {
    let header = checked_in();
    for (name, value) in [
        ("BT_VERSION_MAJOR", env!("CARGO_PKG_VERSION_MAJOR")),
        ("BT_VERSION_MINOR", env!("CARGO_PKG_VERSION_MINOR")),
        ("BT_VERSION_PATCH", env!("CARGO_PKG_VERSION_PATCH")),
    ] {
        let define = format!("#define {name} {value}\n");
        assert!(
            header.contains(&define),
            "include/bandtemp.h lacks `{}` (Cargo.toml version {}): update the constant in \
             capi/src/status.rs and regenerate with `{REGENERATE}`",
            define.trim(),
            env!("CARGO_PKG_VERSION")
        );
    }
    let version = bandtemp_capi::bt_version();
    // SAFETY: bt_version returns a static NUL-terminated string.
    let version = unsafe { std::ffi::CStr::from_ptr(version) };
    assert_eq!(version.to_str().unwrap(), env!("CARGO_PKG_VERSION"));
}

/// The core C ABI of DESIGN.md, verbatim: each declaration must appear in the header.
const DESIGN_DECLARATIONS: &[&str] = &[
    "bt_status bt_spectral_radiance(double wavelength_um, double temperature_k, double *out);",
    "bt_status bt_blackbody_fraction(double lambda_t_umk, double *out);",
    "bt_status bt_band_radiance(const bt_band *band, double temperature_k, double *out);",
    "bt_status bt_band_temperature(const bt_band *band, double radiance, double *temperature_k);",
    "bt_status bt_sensor_radiance(const bt_band *band, const bt_scene *scene, double object_k, double *out);",
    "bt_status bt_object_temperature(const bt_band *band, const bt_scene *scene, double sensor_radiance, double *object_k);",
    "bt_status bt_object_temperature_from_apparent(const bt_band *band, const bt_scene *scene, double apparent_k, double *object_k);",
    "bt_status bt_sakuma_hattori_signal(const bt_sakuma_hattori *p, double temperature_k, double *out);",
    "bt_status bt_sakuma_hattori_temperature(const bt_sakuma_hattori *p, double signal, double *temperature_k);",
    "bt_status bt_sakuma_hattori_fit_band(const bt_band *band, double t_lo_k, double t_hi_k, bt_sakuma_hattori *out, double *max_error_k);",
    "bt_status bt_sakuma_hattori_fit_points(const double *t_k, const double *signal, size_t n, bt_sakuma_hattori *out);",
    "const char *bt_version(void);",
    "const char *bt_status_message(int status);",
];

#[test]
fn header_declares_the_design_abi() {
    let header = normalise(&checked_in());
    for declaration in DESIGN_DECLARATIONS {
        assert!(
            header.contains(&normalise(declaration)),
            "include/bandtemp.h does not declare `{declaration}`"
        );
    }
    // Struct layouts and enum values of DESIGN.md, field by field in order.
    for layout in [
        "typedef enum { BT_DETECTOR_ENERGY = 0, BT_DETECTOR_PHOTON = 1, } bt_detector;",
        "typedef struct { double lo_um; double hi_um; bt_detector detector; \
         const double * response_um; const double * response; size_t response_len; } bt_band;",
        "typedef struct { double emissivity; double reflected_k; double atm_transmittance; \
         double atm_k; double window_transmittance; double window_reflectance; \
         double window_k; double window_reflected_k; } bt_scene;",
        "typedef struct { double a_um; double b_umk; double c; } bt_sakuma_hattori;",
        "BT_STATUS_OK = 0,",
    ] {
        let stripped = strip_comments(&checked_in());
        assert!(
            normalise(&stripped).contains(&normalise(layout)),
            "include/bandtemp.h lacks the DESIGN.md layout `{layout}`"
        );
    }
}

/// The header without its `/* ... */` comments (doc comments sit between fields).
fn strip_comments(text: &str) -> String {
    let mut out = String::new();
    let mut rest = text;
    while let Some(start) = rest.find("/*") {
        out.push_str(&rest[..start]);
        match rest[start..].find("*/") {
            Some(end) => rest = &rest[start + end + 2..],
            None => return out,
        }
    }
    out.push_str(rest);
    out
}

//! What the firmware computes and prints, identically on the target and the host.

use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::SakumaHattori;
use bandtemp::frame::{CountsMap, FrameConverter, Rails, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::Result;

/// Where the report goes: semihosting on the target, stdout on the host.
pub trait Sink {
    /// Writes text as it is.
    fn text(&mut self, text: &str);
}

/// Writes `value` as `0x` and `digits` lowercase hex digits.
fn hex(out: &mut dyn Sink, value: u64, digits: u32) {
    const DIGITS: &[u8; 16] = b"0123456789abcdef";
    let mut buf = [0u8; 18];
    buf[0] = b'0';
    buf[1] = b'x';
    for (slot, shift) in buf[2..].iter_mut().zip((0..digits).rev()) {
        *slot = DIGITS[((value >> (4 * shift)) & 0xf) as usize];
    }
    let len = 2 + digits as usize;
    out.text(core::str::from_utf8(&buf[..len]).unwrap_or("?"));
}

/// Writes `value` in decimal.
fn decimal(out: &mut dyn Sink, mut value: u64) {
    let mut buf = [0u8; 20];
    let mut start = buf.len();
    loop {
        start -= 1;
        buf[start] = b'0' + (value % 10) as u8;
        value /= 10;
        if value == 0 {
            break;
        }
    }
    out.text(core::str::from_utf8(&buf[start..]).unwrap_or("?"));
}

fn line_f64(out: &mut dyn Sink, key: &str, value: f64) {
    out.text(key);
    out.text(" ");
    hex(out, value.to_bits(), 16);
    out.text("\n");
}

fn line_u64(out: &mut dyn Sink, key: &str, value: u64) {
    out.text(key);
    out.text(" ");
    decimal(out, value);
    out.text("\n");
}

/// Prints a result's value, or its error and counts a failure.
fn line(out: &mut dyn Sink, failures: &mut u64, key: &str, value: Result<f64>) -> f64 {
    match value {
        Ok(value) => {
            line_f64(out, key, value);
            value
        }
        Err(error) => {
            out.text(key);
            out.text(" error: ");
            out.text(error.message());
            out.text("\n");
            *failures += 1;
            f64::NAN
        }
    }
}

const TEMPERATURES_K: [f64; 5] = [250.0, 300.0, 373.15, 800.0, 1200.0];

fn bands(out: &mut dyn Sink, failures: &mut u64) -> Result<()> {
    for (name, band) in [
        (
            "8-14 um energy",
            Band::rectangular(8.0, 14.0, Detector::Energy)?,
        ),
        (
            "3-5 um photon",
            Band::rectangular(3.0, 5.0, Detector::Photon)?,
        ),
    ] {
        out.text("band ");
        out.text(name);
        out.text("\n");
        for temperature_k in TEMPERATURES_K {
            let radiance = line(out, failures, "  radiance", band.radiance(temperature_k));
            line(out, failures, "  temperature_k", band.temperature(radiance));
        }
    }
    Ok(())
}

/// Kiln shell through air and a protective window (invented values, as in the C example).
fn shell_scene() -> Result<Scene> {
    Scene::new(0.92, 293.15)?
        .with_atmosphere(0.97, 295.0)?
        .with_window(0.95, 0.02, 300.0, 298.0)
}

fn scene(out: &mut dyn Sink, failures: &mut u64) -> Result<()> {
    let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
    let scene = shell_scene()?;
    out.text("scene 8-14 um energy\n");
    for object_k in [320.0, 450.0, 900.0] {
        let signal = line(
            out,
            failures,
            "  sensor_radiance",
            scene.sensor_signal(&band, object_k),
        );
        line(
            out,
            failures,
            "  object_k",
            scene.object_temperature(&band, signal),
        );
    }
    Ok(())
}

fn sakuma_hattori(out: &mut dyn Sink, failures: &mut u64) -> Result<()> {
    let curve = SakumaHattori::new(3.88, 21.0, 4.0e7)?;
    out.text("sakuma_hattori 3.9 um\n");
    for signal in [1.0e3, 2.5e4, 6.0e5] {
        let temperature_k = line(out, failures, "  temperature_k", curve.temperature(signal));
        line(out, failures, "  signal", curve.signal(temperature_k));
    }
    Ok(())
}

/// A 16 x 12 frame of counts (invented): a warm gradient, a dead and a saturated pixel.
fn frame(out: &mut dyn Sink, failures: &mut u64) -> Result<()> {
    const WIDTH: usize = 16;
    const PIXELS: usize = WIDTH * 12;
    let band = Band::rectangular(8.0, 14.0, Detector::Energy)?;
    let mut storage: [TableRow; 64] = [[0.0; 4]; 64];
    let converter = FrameConverter::new(
        &band,
        &shell_scene()?,
        CountsMap::linear(0.002, -2.0)?,
        Rails::new(0, 65535)?,
        TemperatureRange::new(250.0, 420.0)?,
        0.01,
        &mut storage,
    )?;
    let mut counts = [0u16; PIXELS];
    for (i, count) in (0u16..).zip(counts.iter_mut()) {
        *count = 26000 + 150 * (i % 16) + 90 * (i / 16);
    }
    counts[5] = 0;
    counts[PIXELS - 3] = 65535;
    let mut kelvin = [0.0f32; PIXELS];
    let summary = converter.convert_counts(&counts, None, &mut kelvin)?;
    line_u64(out, "frame converted", summary.converted);
    line_u64(out, "  dead", summary.dead);
    line_u64(out, "  saturated", summary.saturated);
    if summary.converted != (PIXELS - 2) as u64 {
        *failures += 1;
    }
    for row in kelvin.chunks(8) {
        out.text("  px");
        for value in row {
            out.text(" ");
            hex(out, u64::from(value.to_bits()), 8);
        }
        out.text("\n");
    }
    Ok(())
}

/// One part of the report: prints its lines, counts failures it can continue past.
type Part = fn(&mut dyn Sink, &mut u64) -> Result<()>;

/// Runs every part, prints the number of failures; returns the exit code.
pub fn run(out: &mut dyn Sink) -> i32 {
    let mut failures = 0;
    out.text("bandtemp core from no_std Rust firmware\n");
    let parts: [Part; 4] = [bands, scene, sakuma_hattori, frame];
    for part in parts {
        if let Err(error) = part(out, &mut failures) {
            out.text("error: ");
            out.text(error.message());
            out.text("\n");
            failures += 1;
        }
    }
    line_u64(out, "failures", failures);
    i32::from(failures != 0)
}

//! The frame table: size, accuracy and refusals.
//!
//! References: exact inversion by `band::Band::temperature` (Newton on the exact band
//! integral; that module is verified against mpmath in its own tests) and the closed-form
//! Sakuma-Hattori inverse; and, independently of the crate, mpmath at 40 digits for the
//! 8-14 um band (`tests/data/frame_band_inverse.csv`, generator beside it).

use bandtemp::band::{Band, SignalCurve, SpectralTable};
use bandtemp::calibration::SakumaHattori;
use bandtemp::frame::{FrameTable, TableRow, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::Error;

/// The tolerance: 1 mK.
const TOLERANCE_K: f64 = 1e-3;

fn lwir() -> Band<'static> {
    Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
}

/// Builds a table for `curve` into fresh storage and checks every row's midpoint (t = 1/2,
/// where the Hermite error peaks) and quarter points against exact inversion. Returns
/// (rows, worst midpoint error in K).
fn check_every_interval<C: SignalCurve>(curve: &C, lo_k: f64, hi_k: f64, tol: f64) -> (usize, f64) {
    let range = TemperatureRange::new(lo_k, hi_k).unwrap();
    let rows = FrameTable::required_rows(curve, range, tol).unwrap();
    let mut storage = vec![[0.0f32; 4]; rows];
    let table = FrameTable::build(curve, range, tol, &mut storage).unwrap();
    let g = table.geometry();
    assert_eq!(g.rows(), rows);
    assert!(g.max_pixel_error_k() <= tol, "{g:?}");
    assert!(g.max_table_error_k() <= g.max_pixel_error_k());
    let mut worst = 0.0f64;
    for i in 0..rows {
        let (s0, s1) = table.interval(i).unwrap();
        let width = s1 - s0; // exact: a power of two
        for fraction in [0.25f32, 0.5, 0.75] {
            let s = s0 + fraction * width; // exact in f32
            let Some(t) = table.temperature_k(s) else {
                // Only the first and last rows reach outside the declared range.
                assert!(i == 0 || i == rows - 1, "row {i} point {s} outside range");
                continue;
            };
            let exact = curve.temperature(f64::from(s)).unwrap();
            let error = (f64::from(t) - exact).abs();
            assert!(
                error <= g.max_table_error_k() + 1e-9,
                "row {i} t={fraction}: {t} vs {exact} ({error} K > measured {})",
                g.max_table_error_k()
            );
            if fraction == 0.5 {
                worst = worst.max(error);
            }
        }
    }
    assert!(table.interval(rows).is_none());
    (rows, worst)
}

#[test]
fn lwir_1mk_table_fits_32_kib_and_meets_1_mk_at_every_midpoint() {
    let band = lwir();
    let (rows, worst) = check_every_interval(&band, 250.0, 1500.0, TOLERANCE_K);
    let bytes = rows * core::mem::size_of::<TableRow>();
    eprintln!(
        "8-14 um, 250-1500 K, 1 mK: {rows} rows, {bytes} bytes, worst midpoint {worst:.3e} K"
    );
    assert!(bytes <= 32 * 1024);
    assert!(worst <= TOLERANCE_K);
}

#[test]
fn table_agrees_with_mpmath_inverse() {
    // Source: tests/data/frame_band_inverse.py (mpmath, 40 digits; radiance two ways).
    let band = lwir();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let mut storage = vec![[0.0f32; 4]; 4096];
    let table = FrameTable::build(&band, range, TOLERANCE_K, &mut storage).unwrap();
    let data = include_str!("data/frame_band_inverse.csv");
    let mut checked = 0;
    for line in data
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with('r'))
    {
        let (s, t) = line.split_once(',').unwrap();
        let signal = s.parse::<f64>().unwrap() as f32;
        let reference_k: f64 = t.parse().unwrap();
        let Some(got) = table.temperature_k(signal) else {
            // The end points may round just outside the f32 range ends.
            assert!(!(250.001..=1499.999).contains(&reference_k), "{line}");
            continue;
        };
        assert!(
            (f64::from(got) - reference_k).abs() <= TOLERANCE_K,
            "{line}: table {got}"
        );
        checked += 1;
    }
    assert!(checked >= 39, "only {checked} reference points checked");
}

#[test]
fn other_curves_meet_their_tolerance_at_every_midpoint() {
    // Mid-wave photon band, a short-wave pyrometer band over many decades of signal, a
    // tabulated response, and a Sakuma-Hattori curve in counts.
    let mwir = Band::rectangular(3.0, 5.0, Detector::Photon).unwrap();
    let (rows, _) = check_every_interval(&mwir, 300.0, 1500.0, TOLERANCE_K);
    eprintln!("3-5 um photon, 300-1500 K, 1 mK: {rows} rows");
    let swir = Band::rectangular(0.8, 1.1, Detector::Photon).unwrap();
    let (rows, _) = check_every_interval(&swir, 700.0, 3000.0, 5e-3);
    eprintln!("0.8-1.1 um photon, 700-3000 K, 5 mK: {rows} rows");
    let wavelengths = [7.5, 8.0, 10.0, 12.0, 13.5, 14.0];
    let response = [0.0, 0.6, 1.0, 0.9, 0.4, 0.0];
    let table = SpectralTable::new(&wavelengths, &response).unwrap();
    let shaped = Band::with_response(7.5, 14.0, Detector::Energy, table).unwrap();
    let (rows, _) = check_every_interval(&shaped, 250.0, 900.0, TOLERANCE_K);
    eprintln!("tabulated 7.5-14 um, 250-900 K, 1 mK: {rows} rows");
    // Invented instrument: A = 10.2 um, B = 25 um K, C chosen for ~50 000 counts at 1200 K.
    let sh = SakumaHattori::new(10.2, 25.0, 1.0).unwrap();
    let c = 50_000.0 / sh.signal(1200.0).unwrap();
    let sh = SakumaHattori::new(10.2, 25.0, c).unwrap();
    let (rows, _) = check_every_interval(&sh, 260.0, 1200.0, TOLERANCE_K);
    eprintln!("Sakuma-Hattori counts, 260-1200 K, 1 mK: {rows} rows");
}

#[test]
fn tighter_tolerance_needs_more_rows_and_is_still_met() {
    let band = lwir();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let coarse = FrameTable::required_rows(&band, range, 1e-2).unwrap();
    let fine = FrameTable::required_rows(&band, range, 1e-3).unwrap();
    // 0.4 mK: the f32 floor at 1500 K is about 0.26 mK (u T for the last Horner addition
    // plus 1.5 ulps of L in kelvin, 3u L / L'), so this is close to the finest reachable.
    let finer = FrameTable::required_rows(&band, range, 4e-4).unwrap();
    assert!(coarse < fine && fine < finer, "{coarse} {fine} {finer}");
    check_every_interval(&band, 250.0, 1500.0, 4e-4);
}

#[test]
fn construction_refuses_what_it_cannot_meet() {
    let band = lwir();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    // f32 resolves ~6e-8 T: 1 uK at 1500 K is out of reach.
    assert_eq!(
        FrameTable::required_rows(&band, range, 1e-6),
        Err(Error::FrameToleranceUnreachable)
    );
    let mut storage = vec![[0.0f32; 4]; 8192];
    assert_eq!(
        FrameTable::build(&band, range, 1e-6, &mut storage).map(|t| t.geometry()),
        Err(Error::FrameToleranceUnreachable)
    );
    let rows = FrameTable::required_rows(&band, range, TOLERANCE_K).unwrap();
    let mut short = vec![[0.0f32; 4]; rows - 1];
    assert_eq!(
        FrameTable::build(&band, range, TOLERANCE_K, &mut short).map(|t| t.geometry()),
        Err(Error::FrameStorageTooSmall)
    );
    for bad in [0.0, -1e-3, f64::NAN, f64::INFINITY] {
        assert_eq!(
            FrameTable::required_rows(&band, range, bad),
            Err(Error::FrameToleranceInvalid)
        );
    }
    assert_eq!(
        TemperatureRange::new(900.0, 300.0),
        Err(Error::FrameRangeInvalid)
    );
    assert_eq!(
        TemperatureRange::new(-1.0, 300.0),
        Err(Error::TemperatureNotPositive)
    );
    // A range whose signal underflows f32 (a 1 um band at 100 K).
    let short_wave = Band::rectangular(0.9, 1.0, Detector::Energy).unwrap();
    let cold = TemperatureRange::new(100.0, 200.0).unwrap();
    assert!(FrameTable::required_rows(&short_wave, cold, TOLERANCE_K).is_err());
}

#[test]
fn from_parts_round_trips_and_rejects_tampered_geometry() {
    let band = lwir();
    let range = TemperatureRange::new(250.0, 1500.0).unwrap();
    let mut storage = vec![[0.0f32; 4]; 4096];
    let table = FrameTable::build(&band, range, TOLERANCE_K, &mut storage).unwrap();
    let geometry = table.geometry();
    let rows: Vec<TableRow> = table.rows().to_vec();
    let again = FrameTable::from_parts(geometry, &rows).unwrap();
    for s in [22.5f32, 100.0, 1000.0, 3800.0] {
        assert_eq!(again.temperature_k(s), table.temperature_k(s));
    }
    assert_eq!(
        FrameTable::from_parts(geometry, &rows[..rows.len() - 1]).map(|t| t.geometry()),
        Err(Error::FrameStorageTooSmall)
    );
    // A finer table's geometry claims more rows than these.
    let mut finer_storage = vec![[0.0f32; 4]; 8192];
    let finer = FrameTable::build(&band, range, 4e-4, &mut finer_storage)
        .unwrap()
        .geometry();
    assert!(finer.rows() > geometry.rows());
    assert_eq!(
        FrameTable::from_parts(finer, &rows).map(|t| t.geometry()),
        Err(Error::FrameStorageTooSmall)
    );
}

#[test]
fn unservable_ranges_are_refused_up_front() {
    // Below the f32 output floor (u hi_k / 4): refused before any band integral.
    let nir = Band::rectangular(0.9, 1.1, Detector::Energy).unwrap();
    let hot = TemperatureRange::new(300.0, 1.39e25).unwrap();
    assert_eq!(
        FrameTable::required_rows(&nir, hot, 0.9),
        Err(Error::FrameToleranceUnreachable)
    );
    let wide = TemperatureRange::new(250.0, 1e6).unwrap();
    assert_eq!(
        FrameTable::required_rows(&lwir(), wide, TOLERANCE_K),
        Err(Error::FrameToleranceUnreachable)
    );
    // Reachable in f32 but more rows than the library builds.
    let blue = Band::rectangular(0.4, 0.5, Detector::Photon).unwrap();
    let range = TemperatureRange::new(500.0, 5000.0).unwrap();
    assert_eq!(
        FrameTable::required_rows(&blue, range, 5e-4),
        Err(Error::FrameTableTooLarge)
    );
    let rows = FrameTable::required_rows(&blue, range, 1e-3).unwrap();
    assert!(rows <= bandtemp::frame::MAX_TABLE_ROWS, "{rows}");
    // Storage too small is known from the rows of the level, before building.
    let mut storage = vec![[0.0f32; 4]; 16];
    assert_eq!(
        FrameTable::build(&blue, range, 1e-3, &mut storage).map(|t| t.geometry()),
        Err(Error::FrameStorageTooSmall)
    );
}

#[test]
fn required_rows_is_what_build_uses() {
    // `required_rows` decides lazily (a row's centre-only bound where it fits), `build`
    // checks every row densely: the two must pick the same level, including near each
    // level's edge (tolerances spaced finer than the 16x per level of Hermite tables).
    let mwir = Band::rectangular(3.0, 5.0, Detector::Photon).unwrap();
    let sh = SakumaHattori::new(0.9325, 0.41, 6e8).unwrap();
    let curves: [(&dyn SignalCurve, f64, f64); 3] = [
        (&lwir(), 250.0, 1500.0),
        (&mwir, 300.0, 1000.0),
        (&sh, 850.0, 1450.0),
    ];
    let mut storage = vec![[0.0f32; 4]; 2048];
    for (curve, lo_k, hi_k) in curves {
        let range = TemperatureRange::new(lo_k, hi_k).unwrap();
        let mut tolerance_k = 2e-2;
        while tolerance_k > 4e-4 {
            let rows = FrameTable::required_rows(curve, range, tolerance_k).unwrap();
            let built = FrameTable::build(curve, range, tolerance_k, &mut storage)
                .unwrap()
                .geometry();
            assert_eq!(built.rows(), rows, "{lo_k}-{hi_k} K at {tolerance_k} K");
            tolerance_k *= 0.8;
        }
    }
}

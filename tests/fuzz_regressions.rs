//! Regression tests for findings of the coverage-guided fuzz targets (`fuzz/`), each
//! minimised from the input libFuzzer reported. Reference values are from mpmath (named at
//! each check); the other checks are the invariants the fuzz oracles enforce.

use bandtemp::band::Band;
use bandtemp::planck::Detector;
use bandtemp::Error;

/// A photon band reaching down to 0.1 um, at temperatures where c2/(hi T) is 690-745: the
/// band integral of x^2/(e^x - 1) sits near the subnormal range while the scale
/// c1p T^3/c2^3 (~1e21) lifts the radiance back to ~1e-297. The radiance used to come out
/// Ok with a relative error of 5e-4 at 195 K and a factor 2 at 193.09 K; now it is either
/// accurate or `RadianceUnderflow`.
#[test]
fn deep_wien_tail_band_radiance_is_accurate_or_underflows() {
    let band = Band::rectangular(2.220446049250313e-16, 0.1, Detector::Photon).unwrap();
    // mpmath 1.3 at 50 digits: 2c 1e18 (T/c2)^3 (G2(c2/(0.1 T)) - G2(c2/(2.22e-16 T))),
    // G2(x) = sum_n e^(-n x) (x^2/n + 2x/n^2 + 2/n^3), CODATA 2018 exact h, c, k.
    let cases = [
        (193.09, 1.9940210482000275e-297),
        (193.5, 9.690_193_004_652_684e-297),
        (195.0, 2.976_498_674_649_38e-294),
        (200.0, 3.1308722488603526e-286),
        (210.0, 2.479_499_528_196_233e-271),
        (230.0, 2.0315040051120665e-245),
        (300.0, 6.523841489842793e-182),
    ];
    let mut accurate = 0;
    for (t, want) in cases {
        match band.radiance(t) {
            Ok(got) => {
                assert!(
                    ((got - want) / want).abs() < 1e-12,
                    "T {t}: {got:e} vs mpmath {want:e}"
                );
                accurate += 1;
            }
            Err(error) => assert_eq!(error, Error::RadianceUnderflow, "T {t}"),
        }
    }
    // Away from the edge of the resolved range the values are delivered.
    assert!(accurate >= 3, "only {accurate} of the cases delivered");
    assert!(band.radiance(300.0).is_ok());
}

/// The inversion of a radiance between an underflow and the smallest radiance the band
/// resolves: the safeguarded solver bisected onto the jump and returned Ok(193.09 K), whose
/// radiance is 5.8e6 times the target. Now: an error, or a temperature whose radiance is the
/// target (the fuzz oracle: L(T(L)) = L within the inversion's conditioning).
#[test]
fn radiance_in_the_unresolved_gap_does_not_invert_to_a_wrong_temperature() {
    let band = Band::rectangular(2.220446049250313e-16, 0.1, Detector::Photon).unwrap();
    for target in [6.929048146014352e-304, 1e-300, 3e-290, 1e-280] {
        match band.temperature(target) {
            Ok(t) => {
                let back = band.radiance(t).unwrap();
                let slope = band.radiance_derivative(t).unwrap();
                assert!(
                    ((back - target) / slope).abs() <= 1e-9 * t,
                    "L {target:e} -> T {t} -> L {back:e}"
                );
            }
            Err(error) => assert_eq!(error, Error::RadianceOutOfRange, "L {target:e}"),
        }
    }
}

/// The blackbody fraction deep in the Wien tail (lambda T near 20 um K, x = c2/(lambda T)
/// above 708, where e^-x is subnormal): it came out with few significant bits, as a
/// subnormal 6 orders of magnitude off (3.1e-322 for 2.2e-316), and decreasing with
/// lambda T. Now: full precision while F is a normal double, exactly 0 below.
#[test]
fn blackbody_fraction_deep_in_the_wien_tail() {
    use bandtemp::planck::blackbody_fraction;
    // mpmath 1.3 at 50 digits: 15/pi^4 sum_n e^(-n x) (x^3/n + 3x^2/n^2 + 6x/n^3 + 6/n^4),
    // x = c2/(lambda T), c2 from CODATA 2018 exact h, c, k.
    let normal = [
        (19.9, 5.892_570_976_099_492e-307),
        (20.0, 2.156_578_093_338_752_6e-305),
        (20.3, 8.541_489_593_659_902e-301),
        (21.0, 1.405_196_273_982_382e-290),
        (25.0, 3.378_893_385_517_105_6e-243),
    ];
    for (lt, want) in normal {
        let got = blackbody_fraction(lt).unwrap();
        // The problem's own conditioning: d ln F / d ln(lambda T) is about x (720 here),
        // so the half-ulp rounding of x = c2/(lambda T) alone allows x eps = 1.6e-13.
        assert!(
            ((got - want) / want).abs() < 1e-12,
            "F({lt}) = {got:e}, mpmath {want:e}"
        );
    }
    // mpmath: 2.2e-316 and 4.7e-316, not normal doubles: exactly 0, as documented.
    assert_eq!(blackbody_fraction(19.317_823_465_028_834).unwrap(), 0.0);
    assert_eq!(blackbody_fraction(19.337_141_288_493_86).unwrap(), 0.0);
    // Non-decreasing in lambda T across the whole transition.
    let mut previous = 0.0;
    for i in 0..=4000 {
        let lt = 19.0 + f64::from(i) * 1e-3;
        let f = blackbody_fraction(lt).unwrap();
        assert!(f >= previous, "F({lt}) = {f:e} < {previous:e}");
        previous = f;
    }
}

/// A scene whose weights are all the smallest subnormal (valid: each in its open
/// interval): the sensor signal G L(T) + B underflowed to 0 and came out Ok(0), which no
/// inversion can take back. Now it is `RadianceUnderflow`, as for the curve itself.
#[test]
fn sensor_signal_that_underflows_is_an_error() {
    use bandtemp::scene::Scene;
    let tiny = 5e-324;
    let scene = Scene::new(tiny, tiny)
        .and_then(|s| s.with_atmosphere(tiny, tiny))
        .and_then(|s| s.with_window(tiny, tiny, tiny, tiny))
        .unwrap();
    let band = Band::rectangular(
        2.225_073_858_507_201_4e-308,
        11.913_456_070_741_98,
        Detector::Energy,
    )
    .unwrap();
    assert_eq!(
        scene.sensor_signal(&band, 1_468.307_281_356_438_1),
        Err(Error::RadianceUnderflow)
    );
    // A physical scene still delivers a normal signal that inverts (sanity of the check).
    let usual = Scene::new(0.9, 295.0).unwrap();
    let s = usual.sensor_signal(&band, 1_468.307_281_356_438_1).unwrap();
    assert!((usual.object_temperature(&band, s).unwrap() - 1_468.307_281_356_438_1).abs() < 1e-6);
}

/// A Sakuma-Hattori curve where C/S overflows (S tiny against C): the inverse
/// (c2 / ln(1 + C/S) - B) / A took ln(inf) and returned T = -B/A, the edge of the curve's
/// domain, where the curve has no signal; and the forward C / (e^y - 1) gave 0
/// (underflow) for y > 709.8 even where C e^-y is a normal double.
#[test]
fn sakuma_hattori_where_c_over_s_overflows() {
    use bandtemp::band::SignalCurve;
    use bandtemp::calibration::SakumaHattori;
    let curve = SakumaHattori::new(2.774_509_803_921_568_5, -300.0, 1e10).unwrap();
    // mpmath 1.3 at 50 digits, c2 from CODATA 2018 exact h, c, k:
    // T(1e-300) = (c2 / ln(1 + 1e10/1e-300) + 300) / A.
    let t = curve.temperature(1e-300).unwrap();
    assert!((t - 115.392_111_202_117_28).abs() < 1e-12 * t, "T = {t}");
    // S(115.33 K) = C / (e^y - 1), y = 719.96.
    let s = curve.signal(115.33).unwrap();
    let want = 2.122_287_001_635_182e-303;
    // Conditioning: A T + B = 320 - 300 cancels 4 bits, and d ln S / d ln y = y = 720, so
    // the inputs' rounding alone allows about 16 eps y = 1.3e-12.
    assert!(
        ((s - want) / want).abs() < 1e-11,
        "S = {s:e}, mpmath {want:e}"
    );
    // And the round trip through both.
    let back = curve.temperature(s).unwrap();
    assert!((back - 115.33).abs() < 1e-12 * 115.33, "T = {back}");
}

/// A tabulated response of subnormal size (2.1e-314 at one point, zero elsewhere): the
/// products response x integrand were subnormal, and band radiance -> inversion came back
/// 1.2e-6 T off (78364 K -> 78364.1 K). Now such a response is `RadianceUnderflow`, and
/// the same shape at a normal scale still inverts to 1e-9 T.
#[test]
fn subnormal_response_is_an_underflow_not_an_imprecise_radiance() {
    use bandtemp::band::SpectralTable;
    let wl = [
        7.008_548_854_633_943,
        28.685_545_333_375_12,
        29.995_412_907_105_973,
    ];
    let tiny = [2.105_321_952_4e-314, 0.0, 0.0];
    let table = SpectralTable::new(&wl, &tiny).unwrap();
    let band = Band::with_response(6.296_144_128_589_89, 1e6, Detector::Photon, table).unwrap();
    let t = 78_364.189_662_175_2;
    match band.radiance(t) {
        Err(error) => assert_eq!(error, Error::RadianceUnderflow),
        Ok(l) => {
            let back = band.temperature(l).unwrap();
            assert!((back - t).abs() <= 1e-9 * t, "{t} -> {l:e} -> {back}");
        }
    }
    let unit = [1.0, 0.0, 0.0];
    let table = SpectralTable::new(&wl, &unit).unwrap();
    let band = Band::with_response(6.296_144_128_589_89, 1e6, Detector::Photon, table).unwrap();
    let l = band.radiance(t).unwrap();
    let back = band.temperature(l).unwrap();
    assert!((back - t).abs() <= 1e-9 * t, "{t} -> {l:e} -> {back}");
}

/// Values spread over more than 1e154 overflow the running sum of squared deviations: the
/// variance came out Ok(inf). Now it is `NonFinite`, and so is a Monte Carlo run whose
/// model values do that.
#[test]
fn running_variance_that_overflows_is_an_error() {
    use bandtemp::uncertainty::{monte_carlo, RunningStats, Xoshiro256StarStar};
    let mut stats = RunningStats::new();
    for x in [1e300, -1e300, 1e300] {
        stats.push(x).unwrap();
    }
    assert_eq!(stats.variance(), Err(Error::NonFinite));
    assert_eq!(stats.standard_deviation(), Err(Error::NonFinite));
    let mut rng = Xoshiro256StarStar::seed_from_u64(7);
    let mut samples = [0.0; 64];
    let mut sign = 1.0;
    let r = monte_carlo(&mut rng, &mut samples, 0.95, |_| {
        sign = -sign;
        Ok(sign * 1e300)
    });
    assert_eq!(r, Err(Error::NonFinite));
    // An ordinary spread is unaffected: the sample variance of 1, 2, 3 is 1.
    let mut stats = RunningStats::new();
    for x in [1.0, 2.0, 3.0] {
        stats.push(x).unwrap();
    }
    assert_eq!(stats.variance(), Ok(1.0));
}

/// A tabulated band whose overlap with its table holds a sliver (here the band edge
/// 8.7e-11 um below the table node at 1.45 um) that carries most of the integral. The
/// quadrature sampled the response at nodes whose wavelengths rounded to 1 ulp, a relative
/// position error of ulp/width = 1e-6 across the sliver: the radiance was about 1e-6 off
/// and T -> L -> T missed by 1.8 mK at 4000 K, with success. Each segment's geometry now
/// comes from differences of the table's own numbers (`Band::response_panels`).
#[test]
fn sliver_between_band_edge_and_table_node_round_trips() {
    use bandtemp::band::SpectralTable;
    let wl = [3.064_968_409_935_597e-294, 0.5, 1.45, 1.6, 1.709_023_437_5];
    let r = [
        1.847_041_560_584_269_4e-289,
        0.883_207_446_402_685_6,
        5.623_882_336_451_941e-306,
        0.0,
        0.0,
    ];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(1.449_999_999_912_688_5, 1.8, Detector::Energy, table).unwrap();
    let t = 4000.0;
    let l = band.radiance(t).unwrap();
    let back = band.temperature(l).unwrap();
    assert!((back - t).abs() <= 1e-9 * t, "T {t} -> L {l:e} -> T {back}");
}

/// The law-of-propagation check with finite values near the double range's end: y + U -
/// y_high overflowed and came out Ok with d_high = inf. Now it is `NonFinite`.
#[test]
fn lpu_validation_that_overflows_is_an_error() {
    use bandtemp::uncertainty::{coverage_interval, validate_lpu};
    let mut samples = [-1.7e308, -1.0, 0.0, 1.0, 1.7e308];
    let interval = coverage_interval(&mut samples, 0.6).unwrap();
    assert_eq!(
        validate_lpu(1.5e308, 1e308, &interval, 0.0),
        Err(Error::NonFinite)
    );
    // Ordinary values: d_low = |10 - 2 - 7.9| = 0.1 and d_high = |10 + 2 - 12.05| = 0.05.
    let mut samples = [7.9, 9.0, 10.0, 12.05, 13.0];
    let interval = coverage_interval(&mut samples, 0.6).unwrap();
    let v = validate_lpu(10.0, 2.0, &interval, 0.2).unwrap();
    assert!(
        v.passed && (v.d_low - 0.1).abs() < 1e-12 && (v.d_high - 0.05).abs() < 1e-12,
        "{v:?}"
    );
}

/// A points fit whose C is near the top of the double range: C^2 Var(ln C) overflowed and
/// the Rust fit came out Ok with an infinite covariance (the C ABI's report refused it while
/// the plain C fit accepted the same data). Now both are `CalibrationIllConditioned`.
#[test]
fn points_fit_with_an_overflowing_covariance_is_ill_conditioned() {
    use bandtemp::band::SignalCurve;
    use bandtemp::calibration::{fit_points, SakumaHattori};
    let truth = SakumaHattori::new(1.0, 10.0, 1e250).unwrap();
    let t_k = [1000.0, 1100.0, 1200.0, 1300.0, 1400.0, 1500.0];
    // Exact signals with a part-per-million scatter, so that the scatter scale is not 0.
    let s: Vec<f64> = t_k
        .iter()
        .zip([1.0, -1.0, 1.0, -1.0, 1.0, -1.0])
        .map(|(&t, sign)| truth.signal(t).unwrap() * (1.0 + sign * 1e-6))
        .collect();
    match fit_points(&t_k, &s, None) {
        Ok(fit) => assert!(
            fit.covariance.iter().flatten().all(|x| !x.is_infinite()),
            "{fit:?}"
        ),
        Err(error) => assert_eq!(error, Error::CalibrationIllConditioned),
    }
}

/// A narrow response segment (1.1e-4 um at 1.48 um) carrying the whole band: x values
/// subtracted across it lost log10(1.48/1.1e-4) = 4 digits, so band radiance was 6e-12
/// relative off between neighbouring temperatures, the inversion missed its documented
/// 1e-12 T, and a scene behind a hot window (3668 K, the object 4e-8 of the signal) came
/// back 3.6 mK off through its apparent temperature. Now within 1e-15.
#[test]
fn narrow_response_segment_keeps_full_precision() {
    use bandtemp::band::SpectralTable;
    use bandtemp::scene::Scene;
    let wl = [
        1.479_692_604_958_723_1,
        1.479_805_742_723_783_8,
        2.609_073_853_833_935_5,
    ];
    let r = [0.066_239_414_053_559_17, 5e-324, 7.609_970_6e-317];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(0.230_493_413_962_491_8, 5.0, Detector::Energy, table).unwrap();
    // The band is a triangle of height h = 0.0662 and width w = 1.131e-4 um with its peak
    // at w0 = 1.4797 um. Over so narrow a line Planck's law is linear: its curvature
    // leaves ~ (x w/lambda)^2/18 = 4e-9 (x = 3.5), so L = (h w / 2) L_lambda(w0 + w/3)
    // (the triangle's centroid) to 1e-8.
    let (w0, w1, h) = (wl[0], wl[1], r[0]);
    let t = 2_775.553_474_453_727;
    let line =
        0.5 * h * (w1 - w0) * bandtemp::planck::spectral_radiance(w0 + (w1 - w0) / 3.0, t).unwrap();
    let l = band.radiance(t).unwrap();
    assert!(
        (l / line - 1.0).abs() < 1e-8,
        "L {l:e} against the line {line:e}"
    );
    // Inversion within 1e-14 T over the range (the documented bound is 1e-12 T).
    for t in [300.0, 557.8, 1000.0, 2_775.553_474_453_727, 4000.0] {
        let back = band.temperature(band.radiance(t).unwrap()).unwrap();
        assert!((back - t).abs() <= 1e-14 * t, "T {t} -> {back}");
    }
    let scene = Scene::new(0.511_921_568_627_451, 342.616_511_200_943_7)
        .unwrap()
        .with_atmosphere(0.4, 372.890_062_283_093_9)
        .unwrap()
        .with_window(
            0.319_215_686_274_509_8,
            0.272_313_725_490_196_06,
            3_668.448_204_437_637_7,
            555.151_678_951_086_1,
        )
        .unwrap();
    let t = 557.800_310_864_913_7;
    let apparent = scene.apparent_temperature(&band, t).unwrap();
    let back = scene
        .object_temperature_from_apparent(&band, apparent)
        .unwrap();
    // The object is 5.7e-8 of the signal: a 1e-16 relative signal error is 1e-7 K here.
    assert!(
        (back - t).abs() <= 1e-6,
        "T {t} -> Tapp {apparent} -> T {back}"
    );
}

/// A tabulated response with values near the largest double (1e308 at 708 um, the band
/// 1.45-1.975 um seeing 5e304): the Gauss sums multiplied response by t^m before dividing
/// by e^t - 1 and overflowed where the radiance is 1e304, so the inversion of a radiance
/// the band had just returned (2.3e307 at 1000 K) failed with `NonFinite`. The Planck
/// factors now come first, and overflow happens only where the radiance itself overflows.
/// Once dL/dT no longer overflowed with its intermediate product (1.9e305 at 1012 K), the
/// solver's T dL/dT did (1.9e308), made P1 infinite and its Newton step zero, and returned
/// Ok(1012.24 K) with a residual of 10 %: T (dL/dT / L) is now formed in the order that
/// does not overflow, and an infinite P1 is never taken for a converged step.
#[test]
fn response_near_the_double_range_end_inverts() {
    use bandtemp::band::SpectralTable;
    let wl = [1.45, 1.52, 1.6, 708.395_488_281_25, f64::MAX];
    let r = [0.0, 0.0, 0.0, 1e308, 0.249_942_778_667_887_4];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(1.275, 1.975, Detector::Energy, table).unwrap();
    let l = band.radiance(1000.0).unwrap();
    assert!(l > 1e307 && l.is_finite());
    let l500 = band.radiance(500.0).unwrap();
    assert!(l500 > 0.0 && l500 < l);
    assert_eq!(band.radiance(2000.0), Err(Error::RadianceOverflow));
    let back = band.temperature(l).unwrap();
    assert!((back - 1000.0).abs() <= 1e-9 * 1000.0, "{back}");
}

/// A segment rising from 0.12 at 1000 um to 1e300 at 5.2e11 um, seen at 2 K (the band's
/// radiance comes from its small end): interpolating down from the 1e300 end cancelled
/// 1e300 against 1e300 - 4e291 and left 3e-8 relative error, so T -> L -> T missed by
/// 3.3e-9 T. The response is now the sum of two non-negative terms, one per end.
#[test]
fn segment_rising_over_many_decades_round_trips() {
    use bandtemp::band::SpectralTable;
    let wl = [
        2.639_975_803_334_934,
        6.543_498_291_083_124,
        16.418_476_064_048_956,
        273.15,
        1000.0,
        518_539_246_354.603_2,
        1e300,
    ];
    let r = [
        1e300,
        0.999_999_999_999_999_9,
        0.926_756_694_895_857_2,
        0.800_427_252_613_107_5,
        0.116_594_186_312_657_36,
        1e300,
        1e-300,
    ];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(1e-310, 1e300, Detector::Energy, table).unwrap();
    for t in [2.0, 5.0, 30.0] {
        let back = band.temperature(band.radiance(t).unwrap()).unwrap();
        assert!((back - t).abs() <= 1e-12 * t, "T {t} -> {back}");
    }
}

/// The Planck-form inverse at S = f64::MAX (A = 4.42 um, B = 100 um K, C = 2.3e9) gave
/// T = 2.5e302 K, whose signal rounded past the largest double: a success with no way
/// back. Such a signal is now `RadianceOverflow`; one a little below still round-trips.
#[test]
fn sakuma_hattori_inverse_at_the_double_range_end() {
    use bandtemp::band::SignalCurve;
    use bandtemp::calibration::SakumaHattori;
    let curve = SakumaHattori::new(4.423_529_411_764_706, 100.0, 2_315_825_769.988_51).unwrap();
    assert_eq!(curve.temperature(f64::MAX), Err(Error::RadianceOverflow));
    let s = 1e300;
    let t = curve.temperature(s).unwrap();
    let back = curve.signal(t).unwrap();
    assert!((back / s - 1.0).abs() < 1e-12, "{s:e} -> {t:e} -> {back:e}");
}

/// A response of 2e147 at 5 um seen at 1-4 K: Gauss nodes of the last panel before the
/// quadrature's cut (x = 710) lie past x = 709.78, where e^x - 1 overflows, and the
/// derivative kernel (e + 1)/e was inf/inf = NaN. The inversion of a radiance the band had
/// just returned at 5 K failed with `NonFinite`. The kernel is now 1 + 1/e there.
#[test]
fn derivative_kernel_past_the_expm1_overflow() {
    use bandtemp::band::SpectralTable;
    let wl = [
        9.401_195_160_968_883e-270,
        6.202_640_661_512_71e-94,
        0.698_710_703_332_939_5,
        5.0,
        10.352_272,
        22.372_451_587_739_278,
        1.756_506_924_236_417_3e156,
    ];
    let r = [
        1e300,
        1e300,
        1e-310,
        1.980_702_506_999_929_5e147,
        0.377_721_828_030_823_2,
        0.0,
        0.245_944_914_930_952_9,
    ];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band =
        Band::with_response(1e-300, 1.808_288_332_801_935_5e135, Detector::Energy, table).unwrap();
    for t in [4.8, 5.0, 6.0] {
        let (l, dl) = band.radiance_and_derivative(t).unwrap();
        assert!(dl.is_finite() && dl > 0.0, "dL/dT at {t} K: {dl:e}");
        let back = band.temperature(l).unwrap();
        assert!((back - t).abs() <= 1e-9 * t, "T {t} -> {back}");
    }
}

/// The CI fuzz run's scene finding of the same kind: a photon band whose response rises
/// from 0 at 11 um to 0.26 at 1.3e12 um, behind air and a window at 3949 K, came back
/// 1.2 mK off at 3900 K (the tolerance from the signal's conditioning was 4 uK).
#[test]
fn rising_segment_behind_a_hot_window_round_trips() {
    use bandtemp::band::SpectralTable;
    use bandtemp::scene::Scene;
    let wl = [
        0.200_030_585_295_880_03,
        0.698_870_986_512_404_3,
        11.012_933_147_549_564,
        1_302_019_335_782.4,
    ];
    let r = [0.0, 0.0, 0.0, 0.255_390_249_485_008];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(
        7.375_184_56e-315,
        8.795_644_478_123_158e245,
        Detector::Photon,
        table,
    )
    .unwrap();
    let scene = Scene::new(0.392_784_313_725_490_2, 1e-300)
        .unwrap()
        .with_atmosphere(0.349_411_764_705_882_3, 3_948.825_632_299_963)
        .unwrap()
        .with_window(
            0.566_274_509_803_921_5,
            0.164_985_774_702_037_74,
            3_948.825_632_299_963,
            3_948.825_632_299_963,
        )
        .unwrap();
    let t = 3_900.259_575_157_672_3;
    let signal = scene.sensor_signal(&band, t).unwrap();
    let back = scene.object_temperature(&band, signal).unwrap();
    assert!((back - t).abs() <= 4e-6, "T {t} -> {back}");
}

/// A 3.4-14 um photon band whose table also holds 3.6e282 at 1.6e-38 um, far outside the
/// band: the "integral too small to be resolved" floor scaled with the whole table's
/// largest value instead of the band's, so the band's own radiance at 200 K (and its 300 K
/// radiance as a target) was refused as an underflow. The floor now uses the response's
/// largest value over the band.
#[test]
fn values_outside_the_band_do_not_set_its_resolution() {
    use bandtemp::band::SpectralTable;
    let wl = [
        1.630_999_080_770_495_2e-38,
        1.630_999_080_770_535_4e-38,
        0.576_439_264_419_698_5,
        0.688_265_509_056_137_1,
        3.374_076_063_884_047,
        7.949_078_390_621_878,
        14.051_652_948_865_826,
    ];
    let r = [
        3.583_124_107_699_808_4e282,
        2.0,
        0.650_000_476_837_158_2,
        0.181_155_107_957_579_91,
        14.0,
        0.003_082_322_423_132_677,
        0.0,
    ];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(
        3.374_076_063_884_047,
        14.051_652_948_865_826,
        Detector::Photon,
        table,
    )
    .unwrap();
    // The same band without the far-away nodes: radiances agree to rounding.
    let near = SpectralTable::new(&wl[4..], &r[4..]).unwrap();
    let reference = Band::with_response(
        3.374_076_063_884_047,
        14.051_652_948_865_826,
        Detector::Photon,
        near,
    )
    .unwrap();
    for t in [100.0, 200.0, 300.153_260_203_172_07, 1000.0] {
        let l = band.radiance(t).unwrap();
        let l_ref = reference.radiance(t).unwrap();
        assert!((l / l_ref - 1.0).abs() < 1e-15, "{t} K: {l:e} vs {l_ref:e}");
        let back = band.temperature(l).unwrap();
        assert!((back - t).abs() <= 1e-9 * t, "T {t} -> {back}");
    }
}

/// A table segment from 2.2e-308 um to 0.31 um: its width in x, c2 (w1 - w0)/(w0 w1 T),
/// overflowed to infinity, the response measured from that end became infinite, and at
/// 1000 K the band reported `RadianceOverflow` between finite radiances at 100 K and
/// 4000 K (so 4000 K did not invert). Segments now start where x = 1420, beyond which the
/// integrand is exactly zero anyway.
#[test]
fn segment_from_the_smallest_doubles_has_a_finite_width() {
    use bandtemp::band::SpectralTable;
    let wl = [
        1e-310,
        2.225_073_858_507_201_4e-308,
        0.312_355_021_095_421_24,
        2.607_877_230_406_522,
        3.402_823_5e38,
        1e300,
        1e308,
    ];
    let r = [
        0.138_185_702_296_482_8,
        0.0,
        0.245_944_914_930_952_9,
        0.088_960_097_657_740_14,
        1e6,
        1e300,
        0.365_285_725_185_015_6,
    ];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band =
        Band::with_response(1e-310, 1.779_886_502_699_879_4e156, Detector::Energy, table).unwrap();
    let mut previous = 0.0;
    for t in [100.0, 300.0, 1000.0, 4000.0, 1e5] {
        let l = band.radiance(t).unwrap();
        assert!(l > previous, "L({t}) = {l:e} after {previous:e}");
        previous = l;
        let back = band.temperature(l).unwrap();
        assert!((back - t).abs() <= 1e-9 * t, "T {t} -> {back}");
    }
}

/// A response rising to 1.4e284 at the band's long end (found by the CI fuzz run): the
/// floor below which an integral counts as unresolved scaled with that value, although the
/// quadrature only ever drops short wavelengths, so the band's radiance at 1000 K (an
/// integral of 7) was an underflow and a 292 K target did not invert. The floor now scales
/// with the response below c2/(710 T) only.
#[test]
fn a_huge_long_wave_response_does_not_set_the_floor() {
    use bandtemp::band::SpectralTable;
    let wl = [
        0.203_470_347_172_152_5,
        0.544_813_985_485_332_3,
        5.0,
        12.483_203_129_989_94,
        1.374_176_326_506_607_8e284,
    ];
    let r = [
        0.280_903_334_096_284_43,
        0.0,
        0.192_187_380_788_891_44,
        0.825_055_313_954_375_5,
        1.373_813_285_269_186_4e284,
    ];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(
        0.698_710_703_332_939_5,
        1.373_813_285_269_186_4e284,
        Detector::Energy,
        table,
    )
    .unwrap();
    let mut previous = 0.0;
    for t in [100.0, 291.585_838_436_227_7, 1000.0, 1e4] {
        let l = band.radiance(t).unwrap();
        assert!(l > previous, "L({t}) = {l:e} after {previous:e}");
        previous = l;
        let back = band.temperature(l).unwrap();
        assert!((back - t).abs() <= 1e-9 * t, "T {t} -> {back}");
    }
}

/// Two-point maps from stacks whose means reach the end of the double range (found by the
/// `raw_frame` fuzz target): one good pixel's low mean of -1.79e308 made the array mean
/// -9e307, the gain (<S_H> - <S_L>) / (S_H - S_L) ~ 2e304 did not fit an f32, and
/// `two_point` returned Ok with an infinite gain and offset written into the maps (which
/// every conversion then refuses). Multi-point maps of the same two levels already
/// refused; now both return `FrameCoefficientOverflow` and leave the maps untouched.
#[test]
fn two_point_maps_that_do_not_fit_an_f32_are_refused() {
    use bandtemp::frame::{multi_point, two_point, StackStats};
    let low = [7706.0, -1.79e308];
    let high = [11889.0, 9857.0];
    let m2 = [0.0, 0.0];
    let lo = StackStats::new(&low, &m2, 1).unwrap();
    let hi = StackStats::new(&high, &m2, 1).unwrap();
    let (mut gain, mut offset) = ([7.0f32; 2], [7.0f32; 2]);
    let r = two_point(&lo, &hi, None, &mut gain, &mut offset);
    assert_eq!(r, Err(Error::FrameCoefficientOverflow));
    assert_eq!(
        (gain, offset),
        ([7.0; 2], [7.0; 2]),
        "maps written on error"
    );
    let mut bad = [0u8; 2];
    let mut maps = [7.0f32; 4];
    let r = multi_point(&[lo, hi], &mut bad, &mut maps);
    assert_eq!(r.map(|_| ()), Err(Error::FrameCoefficientOverflow));
    assert_eq!(maps, [7.0; 4]);
}

/// A shutter refresh to a target of 4.07e297 counts (found by the `raw_frame` fuzz
/// target): the new offset (target - b) / a - G n_sh does not fit an f32, and
/// `shutter_refresh` returned Ok with an infinite offset written at a good pixel (a NaN
/// gain wrote NaN the same way). Now `FrameCoefficientOverflow`, offsets untouched.
#[test]
fn shutter_refresh_offsets_that_do_not_fit_an_f32_are_refused() {
    use bandtemp::frame::{shutter_refresh, DriftStep, StackStats};
    let mean = [1150.0, 1200.0];
    let m2 = [0.0, 0.0];
    let shutter = StackStats::new(&mean, &m2, 1).unwrap();
    let mut offset = [7.0f32; 2];
    let r = shutter_refresh(
        &shutter,
        &[1.0, 1.0],
        None,
        4.066_459_222_251_246e297,
        DriftStep::IDENTITY,
        &mut offset,
    );
    assert_eq!(r, Err(Error::FrameCoefficientOverflow));
    assert_eq!(offset, [7.0; 2]);
    let r = shutter_refresh(
        &shutter,
        &[1.0, f32::NAN],
        None,
        3000.0,
        DriftStep::IDENTITY,
        &mut offset,
    );
    assert_eq!(r, Err(Error::FrameCoefficientOverflow));
    assert_eq!(offset, [7.0; 2]);
    // A bad pixel's gain is not read: the refresh succeeds and leaves its offset alone.
    let r = shutter_refresh(
        &shutter,
        &[1.0, f32::NAN],
        Some(&[0, 1]),
        3000.0,
        DriftStep::IDENTITY,
        &mut offset,
    );
    assert_eq!(r, Ok(()));
    assert_eq!(offset, [1850.0, 7.0]);
}

/// Spatial statistics of a stack whose stored sums of squared deviations were altered to
/// a negative value (found by the `raw_frame` fuzz target): the temporal variance came
/// out Ok at -4e302 counts^2. A stack's m2 is never negative, and the stack update
/// already refuses one; now `spatial_stats` does too, at good pixels.
#[test]
fn spatial_stats_of_a_negative_stored_m2_is_refused() {
    use bandtemp::frame::{spatial_stats, StackStats};
    let mean = [4800.0, 4810.0, 4830.0];
    let m2 = [4.0, -1.99e303, 9.0];
    let stack = StackStats::new(&mean, &m2, 5).unwrap();
    assert_eq!(
        spatial_stats(&stack, None, None),
        Err(Error::MeritInputInvalid)
    );
    // Flagged bad, the pixel is not read.
    let s = spatial_stats(&stack, Some(&[0, 1, 0]), None).unwrap();
    assert!(s.temporal_variance >= 0.0, "{s:?}");
    // (4 + 9) / 4 frames-1 / 2 pixels, exact in binary.
    assert_eq!(s.temporal_variance, 1.625);
}

/// Normal emissivity of a dielectric with n = 1 + eps, k = 0: 4n / ((n + 1)^2 + k^2) came
/// out 1 + 2 eps (n + 1 rounds down to 2, the quotient is then n), an emissivity above 1.
/// The exact value is 1 - (eps / (2 + eps))^2, within 1e-32 of 1, so the correctly rounded
/// result is 1.0 (closed form, evaluated by hand). Near n = 1 every value must stay in
/// [0, 1]; n = 2 gives 8/9 (closed form).
#[test]
fn normal_emissivity_near_index_one_is_not_above_one() {
    use bandtemp::emissivity::OpticalConstants;
    let eps = f64::EPSILON;
    let m = OpticalConstants::new(1.0 + eps, 0.0).unwrap();
    assert_eq!(m.normal(), 1.0);
    for n in [
        1.0 - eps / 2.0,
        1.0,
        1.0 + eps,
        1.0 + 2.0 * eps,
        1.0 + 3.0 * eps,
        1.5,
    ] {
        for k in [0.0, 1e-300, 1e-9, 0.5] {
            let e = OpticalConstants::new(n, k).unwrap().normal();
            assert!((0.0..=1.0).contains(&e), "n {n:e} k {k:e}: e {e:e}");
            let d = OpticalConstants::new(n, k)
                .unwrap()
                .directional(0.0)
                .unwrap();
            assert!(d.unpolarised <= 1.0, "n {n:e} k {k:e}: {d:?}");
        }
    }
    let e2 = OpticalConstants::new(2.0, 0.0).unwrap().normal();
    assert!((e2 - 8.0 / 9.0).abs() <= 2.0 * eps, "{e2:e}");
}

/// Airy encircled energy at a radius far inside the core (v = pi r / (lambda N) near
/// 1e-23): 1 - J0^2 - J1^2 cancelled to -v^2/4 = -2.3e-47, a negative fraction. Now the
/// small-v series; reference values are mpmath (`1 - besselj(0,v)**2 - besselj(1,v)**2`
/// at 120 digits, which the cancellation at v = 1e-23 needs; v from the f64 radius, wavelength 0.1 um and f-number 300), checked to
/// 1e-13 relative on both sides of the switch at v = 1/4.
#[test]
fn airy_encircled_energy_at_tiny_radius_is_not_negative() {
    use bandtemp::optics::diffraction::airy_encircled_energy;
    let cases = [
        (9.249_643_008_374_909e-23, 2.345_563_459_869_190_5e-47),
        (0.000_954_929_658_551_372_2, 2.499_999_996_875_000_6e-9),
        (0.954_929_658_551_372_1, 0.002_496_877_169_189_738_4),
        (2.386_369_216_719_879, 0.015_491_154_490_220_808),
        (2.388_279_076_036_981_4, 0.015_515_766_399_041_021),
    ];
    for (r, want) in cases {
        let ee = airy_encircled_energy(r, 0.1, 300.0).unwrap();
        assert!(
            (ee - want).abs() <= 1e-13 * want,
            "r {r:e}: {ee:e} vs mpmath {want:e}"
        );
    }
    for r in [0.0, 5e-324, 1e-300, 1e-160, 1e-12] {
        let ee = airy_encircled_energy(r, 0.1, 300.0).unwrap();
        assert!((0.0..1.0).contains(&ee), "r {r:e}: {ee:e}");
    }
}

/// Grey-temperature correction of the Wien ratio model with a subnormal grey temperature:
/// 1/T_grey overflows to infinity and 1/inf = 0 came back as a temperature of 0 K. It is
/// now `RatioOutOfRange` (the model and kappa of the fuzz input).
#[test]
fn wien_grey_correction_never_returns_zero_kelvin() {
    use bandtemp::ratio::WienRatio;
    let m = WienRatio::new(
        0.207_984_498_837_927_94,
        1.797_693_134_862_315_7e308,
        2.2e-308,
    )
    .unwrap();
    assert_eq!(
        m.correct_grey(3.2284e-319, 10.0),
        Err(Error::RatioOutOfRange)
    );
    let t = m.correct_grey(1000.0, 10.0).unwrap();
    assert!(t.is_finite() && t > 0.0 && t < 1000.0, "{t:e}");
}

/// Footprint with an IFOV of 1e308 mrad: tan of a huge half-angle gave a negative
/// footprint (-62.9 m at 14 m). An IFOV at or beyond pi rad has no footprint: now
/// `OpticsGeometryInvalid`, also through the pixel rules of the target check. A physical
/// IFOV still gives 2 D tan(IFOV/2) (here against the small-angle value D x IFOV, whose
/// relative error is IFOV^2/12 = 4e-8 at 0.68 mrad: closed form).
#[test]
fn footprint_beyond_half_a_turn_is_an_error() {
    use bandtemp::optics::{check_target, footprint_m, TargetRule};
    for ifov in [1e308, 1000.0 * core::f64::consts::PI, 4000.0] {
        assert_eq!(
            footprint_m(14.0, ifov),
            Err(Error::OpticsGeometryInvalid),
            "{ifov:e}"
        );
        assert_eq!(
            check_target(TargetRule::ThreeByThree, 0.1, 14.0, ifov).map(|c| c.minimum_m),
            Err(Error::OpticsGeometryInvalid)
        );
    }
    let f = footprint_m(10.0, 0.68).unwrap();
    assert!((f - 0.0068).abs() <= 1e-7 * 0.0068, "{f:e}");
    assert!(footprint_m(10.0, 3000.0).unwrap() > 0.0);
}

/// Limit and mean effective wavelengths of a photon band reaching 2.2e-308 um at
/// T = 1.1e74 K: T^2 dL/dT overflowed and the limit wavelength came out 0 um (the mean
/// one, whose S(T2)/S(T1) and T1 T2 could overflow alike, is checked in the same regime). At such temperatures the band holds the
/// whole photon spectrum (the peak sits near 3670/T um, between the edges, and the tails
/// outside are below 1e-100 of the total), so L is the total photon radiance,
/// proportional to T^3 (the photon form of the Stefan-Boltzmann law): d ln L/dT = 3/T and
/// lambda_T = c2/(3T), lambda_12 = c2 (1/T1 - 1/T2) / (3 ln(T2/T1)) (closed forms); now
/// computed without intermediate overflow, to 1e-9 relative.
#[test]
fn effective_wavelengths_at_extreme_temperatures_do_not_collapse_to_zero() {
    use bandtemp::calibration::{limit_effective_wavelength_um, mean_effective_wavelength_um};
    use bandtemp::constants::C2_UMK;
    let b = Band::rectangular(2.2e-308, 0.203_812_885_050_018_27, Detector::Photon).unwrap();
    let t = 1.106_392_703_152_205_5e74;
    let l = limit_effective_wavelength_um(&b, t).unwrap();
    let want_l = C2_UMK / (3.0 * t);
    assert!((l - want_l).abs() <= 1e-9 * want_l, "{l:e} vs {want_l:e}");
    let (t1, t2) = (1e30, 1e70);
    let want = C2_UMK * (1.0 / t1 - 1.0 / t2) / (3.0 * (t2 / t1).ln());
    let m = mean_effective_wavelength_um(&b, t1, t2).unwrap();
    assert!(
        m > 0.0 && (m - want).abs() <= 1e-9 * want,
        "{m:e} vs {want:e}"
    );
}

/// Small-target fraction with a 300 um pitch at 5 um, F/1 (pitch 60 lambda N): the
/// quadrature's work bound let it through at 7564 panel pairs (66 ms, over the C ABI's
/// 50 ms per-call budget; the bound allowed up to 0.57 s). The bound now stops it with
/// `OpticsGeometryInvalid`; pitch and image radius of 30 lambda N still evaluate, to a
/// fraction in (0, 1].
#[test]
fn small_target_fraction_work_bound_fits_the_call_budget() {
    use bandtemp::optics::diffraction::small_target_fraction;
    assert_eq!(
        small_target_fraction(1e-30, 300.0, 5.0, 0.999_999_999_999_999_9),
        Err(Error::OpticsGeometryInvalid)
    );
    let f = small_target_fraction(300.0, 150.0, 5.0, 1.0).unwrap();
    assert!(f > 0.0 && f <= 1.0, "{f:e}");
}

/// Spectral-scene sensor radiance of a 1e-9..0.1 um band with everything at 0.1 K: every
/// term underflows and S = 0 came back as a success (then no temperature inverts it).
/// Now `RadianceUnderflow`, as the grey scene's sensor signal does.
#[test]
fn spectral_sensor_signal_that_underflows_is_an_error() {
    use bandtemp::scene::{Scene, SpectralScene};
    let band = Band::rectangular(1e-9, 0.1, Detector::Energy).unwrap();
    let scene = Scene::new(0.1, 1.0)
        .unwrap()
        .with_atmosphere(0.880_430_304_417_486_8, 0.1)
        .unwrap()
        .with_window(0.1, 0.1, 0.1, 0.1)
        .unwrap();
    let s = SpectralScene::new(band, scene).unwrap();
    assert_eq!(s.sensor_signal(0.1), Err(Error::RadianceUnderflow));
}

/// Grey multi-wavelength fit on two wide bands (0.2-273 um energy, 1e-310-4.1 um photon)
/// whose signals no temperature and emissivity explain: the fit ran all 60 Gauss-Newton
/// iterations of (terms + 1) weighted band integrals each, 82 ms, before reporting
/// non-convergence. The iteration bound is now 20 (a converging fit needs under 10); the
/// outcome is the same named error.
#[test]
fn multiwavelength_fit_that_does_not_converge_stops_early() {
    use bandtemp::multiwavelength::{fit, EmissivityModel, MAX_ITERATIONS};
    const { assert!(MAX_ITERATIONS <= 20) };
    let b1 = Band::rectangular(0.201_519_600_280_823_4, 273.15, Detector::Energy).unwrap();
    let b2 = Band::rectangular(1e-310, 4.088_517_769_776_175, Detector::Photon).unwrap();
    let r = fit(
        &[b1, b2],
        &[138_204.125_425_720_82, 3.810_281_458_474_072e24],
        EmissivityModel::GREY,
    );
    assert_eq!(
        r.map(|f| f.iterations),
        Err(Error::MultiwavelengthNotConverged)
    );
}

/// Wien-model signal ratio with a subnormal emissivity ratio (1.14e-314) and W = 0.001:
/// kappa W = 1.1e-317 kept only a few significant bits, so R (itself normal, 1.4e-294)
/// was 3e-8 off and the temperature back from it 9 uK off at 330 K. R now comes from
/// logarithms when kappa W is not normal: the round trip holds to 1e-12 relative, and
/// ln R agrees with the model's closed form ln kappa + ln W - c2/(lambda_R T) to 1e-13
/// relative (the documented accuracy of that path).
#[test]
fn wien_ratio_with_subnormal_emissivity_ratio_round_trips() {
    use bandtemp::constants::C2_UMK;
    use bandtemp::ratio::WienRatio;
    let m = WienRatio::new(1.369_728_300_331_119, 0.5, 0.001).unwrap();
    let kappa = 1.143_424_169_5e-314;
    let t = 329.848_908_459_613_4;
    let r = m.ratio(t, kappa).unwrap();
    let ln_r = kappa.ln() + 0.001_f64.ln() - C2_UMK / (m.equivalent_wavelength_um() * t);
    assert!((r.ln() - ln_r).abs() <= 1e-13 * ln_r.abs(), "{r:e}");
    let back = m.temperature(r, kappa).unwrap();
    assert!((back - t).abs() <= 1e-12 * t, "{t} -> {back}");
}

/// A band one ulp wide at 1 um (0.9999999999999999-1 um) in a spectral scene: the
/// weighted quadrature took each segment's width in x as the difference of its two x
/// values, which are one ulp apart, so its integral came out a factor 2.3 off at 522 K and
/// 0 at 720 K, and the spectral round trip missed T by 3.2 uK at 522 K. The width now
/// comes from the wavelengths. Reference: the band's own radiance (its rectangular path,
/// checked against the reference vectors of `tests/data`), to 1e-13 relative.
#[test]
fn one_ulp_wide_band_in_the_weighted_quadrature() {
    let b = Band::rectangular(0.999_999_999_999_999_9, 1.0, Detector::Energy).unwrap();
    for t in [267.75, 316.33, 522.103_999_004_713_7, 720.12, 3000.0] {
        let l = b.radiance(t).unwrap();
        let (w, _) = b.weighted_radiance_and_derivative(t, &[], |_| 1.0).unwrap();
        assert!((w - l).abs() <= 1e-13 * l, "T {t}: {w:e} vs {l:e}");
    }
}

/// A photon band over a response table whose last segment reaches from 0.41 um to 1e300 um
/// (rising to 4.1e299): within the band the response is 0.18 + 0.412 (lambda - 0.409 um).
/// In the Wien region (x = 57-316 at 197 K) the folded panel took the segment fraction
/// (4.1e-301 per um) times the Planck factor first, which went subnormal, and the radiance
/// came out 5e-3 low with status Ok; the inversion then returned a temperature 1.5e-2 K
/// off. Now the band radiance agrees with mpmath and the round trip holds.
#[test]
fn long_response_segment_in_the_wien_region() {
    use bandtemp::band::SpectralTable;
    let wavelengths_um = [0.230_493_413_962_491_8, 0.409_443_779_234_017_87, 1e300];
    let values = [
        0.250_858_319_981_689_17,
        0.180_163_271_534_294_65,
        4.122_236_758_698_561e299,
    ];
    let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
    let band = Band::with_response(
        0.229_368_301_704_179_8,
        1.276_886_268_813_521,
        Detector::Photon,
        table,
    )
    .unwrap();
    // mpmath 1.3 at 40 digits (0.44557999319035222, 0.44366873309786582, here rounded to
    // doubles): mpmath.quad of R(lambda) 2c 1e18 / lambda^4 / expm1(c2/(lambda T))
    // over the overlap [0.2305, 1.2769] um (breakpoints at the table's wavelength 0.409 and
    // every 0.2 um beyond), R piecewise linear through the table, CODATA 2018 exact h, c, k.
    for (t, want) in [
        (197.383_188_373_879_88, 0.445_579_993_190_352_24),
        (197.368_586_753_495_86, 0.443_668_733_097_865_8),
    ] {
        let got = band.radiance(t).unwrap();
        assert!(
            ((got - want) / want).abs() < 1e-13,
            "T {t}: {got:e} vs mpmath {want:e}"
        );
        let back = band.temperature(want).unwrap();
        assert!(((back - t) / t).abs() < 1e-12, "T {t}: inverted to {back}");
    }
}

/// An energy band from 3.8e-311 um to 1e300 um (all of the spectrum at any temperature) at
/// T = 8.9e78 K: the radiance sigma T^4/pi = 1.2e308 is just inside the double range, and
/// dL/dT = 4 L/T = 5.1e229 is far inside it, but the product scale * D was formed before
/// the division by T and overflowed, so the derivative was `RadianceOverflow` while the
/// radiance was Ok.
#[test]
fn derivative_of_a_radiance_near_the_double_range_end() {
    let band = Band::rectangular(3.803147183295e-311, 1e300, Detector::Energy).unwrap();
    let t = 8.915990871273347e78;
    let (radiance, derivative) = band.radiance_and_derivative(t).unwrap();
    // Stefan-Boltzmann: L = sigma T^4 / pi (sigma from CODATA 2018 exact h, c, k), and
    // dL/dT = 4 L / T for the whole spectrum.
    let sigma = 5.670_374_419e-8;
    let total = sigma / core::f64::consts::PI * (t * t) * (t * t);
    assert!(
        ((radiance - total) / total).abs() < 1e-9,
        "{radiance:e} vs {total:e}"
    );
    let slope = 4.0 * (total / t);
    assert!(
        ((derivative - slope) / slope).abs() < 1e-9,
        "{derivative:e} vs {slope:e}"
    );
    assert_eq!(band.radiance_derivative(t), Ok(derivative));
}

/// A photon band below 4.08 um over a tabulated energy band from 0.908 um to 1e38 um, on
/// the range 1081.6 K to 1e38 K: the ratio L1/L2 is not monotone (it falls between about
/// 2000 and 2576 K), but the 65 log-spaced points of the range check, 0.55 decades apart,
/// all saw a positive slope, so the pyrometer was accepted and the signals of 2576.29 K
/// returned Ok(1533.82 K), which has the same ratio. The check now refines where the
/// slope bends and refuses the range.
#[test]
fn ratio_that_is_not_monotone_between_the_check_points_is_refused() {
    use bandtemp::band::SpectralTable;
    use bandtemp::ratio::RatioPyrometer;
    let band1 =
        Band::rectangular(1.577131336563841e-273, 4.07696800990474, Detector::Photon).unwrap();
    let wl = [0.9080802264899752, 1e38];
    let r = [0.2585183489738308, 0.02851911192492561];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band2 = Band::with_response(0.9080802264899752, 1e308, Detector::Energy, table).unwrap();
    // mpmath 1.3 at 40 digits (CODATA 2018 exact h, c, k; quadrature of the Planck law
    // times the response): the two temperatures share ln(L1/L2) = 45.00173762466419, and
    // ln R at 2000 K lies above both.
    let cases = [
        (
            1533.8188665939501,
            8.969949721036179e+23,
            25632.070107463554,
        ),
        (2000.0, 2.5247118291125376e+24, 71576.01084422237),
        (2576.292651974296, 6.273466251221997e+24, 179267.36689618044),
    ];
    for (t, want1, want2) in cases {
        let (l1, l2) = (band1.radiance(t).unwrap(), band2.radiance(t).unwrap());
        assert!(
            ((l1 - want1) / want1).abs() < 1e-12,
            "band 1 at {t}: {l1:e}"
        );
        assert!(
            ((l2 - want2) / want2).abs() < 1e-12,
            "band 2 at {t}: {l2:e}"
        );
    }
    assert_eq!(
        RatioPyrometer::new(band1, band2, 1081.5982504757735, 1e38).map(|_| ()),
        Err(Error::BandsIndistinguishable)
    );
    // Above the dip the ratio is monotone with a healthy slope, and the range is taken;
    // a round trip through it recovers T.
    let pyrometer = RatioPyrometer::new(band1, band2, 3000.0, 1e6).unwrap();
    // Up to 1e38 K it is taken too, after refining three intervals of the 35 decades.
    let wide = RatioPyrometer::new(band1, band2, 3000.0, 1e38).unwrap();
    assert!(wide.range_check_evaluations() > 65);
    for t in [3000.0, 4500.0, 2e4, 9e5] {
        let ratio = band1.radiance(t).unwrap() / band2.radiance(t).unwrap();
        let back = pyrometer.temperature(ratio, 1.0).unwrap().temperature_k;
        assert!((back - t).abs() <= 1e-9 * t, "{t} -> {back}");
    }
}

/// The inversion of the largest double through a band whose radiance reaches it at
/// 11533.4 K (a response of 1e300 at its short end): the root lies within rounding of the
/// overflow threshold, and the solver's final Newton step landed one ulp below a
/// temperature it had seen overflow and returned it, a temperature whose radiance
/// overflows. Final steps next to an unrepresentable end are now evaluated first, and a
/// bracket collapsed against one answers with its other end.
#[test]
fn largest_radiance_inverts_to_a_temperature_that_has_one() {
    use bandtemp::band::SpectralTable;
    let wl = [
        0.2,
        0.308_722_386_591_138_43,
        0.685_849_103_443_855,
        1.271_819_722_636_664_8,
        1.327_355_225_851_437_2,
        16.418_476_064_048_956,
        1e6,
    ];
    let r = [
        1e300,
        1e300,
        0.999_999_999_999_999_9,
        0.926_756_694_895_857_2,
        0.800_427_252_613_107_5,
        0.116_594_186_312_657_36,
        1e300,
    ];
    // The second: a final step of under 1e-12 T towards the overflow, accepted as such.
    let wl2 = [
        0.2,
        0.697_696_429_837_230_7,
        0.739_891_365_633_940_5,
        1.271_819_722_636_664_8,
        1.327_355_225_851_437_2,
        16.418_476_064_048_956,
        1e6,
    ];
    let r2 = [
        1e300,
        2.225_073_858_507_201_4e-308,
        1e300,
        0.247_501_335_164_415_97,
        0.0,
        0.850_782_024_872_205_7,
        0.376_470_588_235_294_1,
    ];
    // The third: a final Newton step of one ulp, three ulp below an overflow.
    let mut r3 = r2;
    r3[0] = 0.376_470_588_235_294_1;
    for (wl, r) in [(wl, r), (wl2, r2), (wl2, r3)] {
        let table = SpectralTable::new(&wl, &r).unwrap();
        let band = Band::with_response(1e-310, 1e300, Detector::Energy, table).unwrap();
        let ulps = (0..8).map(|k| f64::from_bits(f64::MAX.to_bits() - k));
        for target in ulps.chain([f64::MAX * (1.0 - 1e-12), 1.7e308]) {
            let t = band.temperature(target).unwrap();
            let back = band.radiance(t).unwrap();
            let slope = band.radiance_derivative(t).unwrap();
            assert!(
                ((back - target) / slope).abs() <= 1e-12 * t,
                "L {target:e} -> T {t} -> L {back:e}"
            );
        }
    }
}

/// A signal above what any temperature up to the solver's ceiling (1e6 K) gives: the
/// spectral-mode inversion of 7.6e19 through a band from 1 nm to 3.8 um (0.34 ms per
/// evaluation) bisected some 40 times towards the ceiling before it said
/// `RadianceOutOfRange`, over the fuzz targets' 50 ms. A tangent that puts the root beyond
/// a limit not yet evaluated now goes to that limit at once. Counted on a toy curve
/// f = T^4 (its value at 1e6 K is 1e24), in evaluations rather than time.
#[test]
fn signal_beyond_the_search_limits_is_refused_in_a_few_evaluations() {
    use bandtemp::band::{solve_increasing, SOLVER_MAX_K, SOLVER_MIN_K};
    use std::cell::Cell;
    let count = Cell::new(0);
    let curve = |t: f64| {
        count.set(count.get() + 1);
        Ok((t * t * t * t, 4.0 * t * t * t))
    };
    for (target, guess) in [(1e30, 1000.0), (1e25, 300.0), (1e-8, 1000.0), (1e-5, 2.0)] {
        count.set(0);
        assert_eq!(
            solve_increasing(curve, target, guess),
            Err(Error::RadianceOutOfRange),
            "target {target:e}"
        );
        assert!(
            count.get() <= 8,
            "target {target:e}: {} evaluations",
            count.get()
        );
    }
    // Roots just inside the limits are still found, to full precision.
    for target in [
        (SOLVER_MAX_K * 0.999).powi(4),
        (SOLVER_MIN_K * 1.001).powi(4),
    ] {
        let solution = solve_increasing(curve, target, 1000.0).unwrap();
        let t = solution.temperature_k;
        assert!(
            (t.powi(4) - target).abs() <= 1e-13 * target,
            "{target:e} -> {t}"
        );
    }
}

/// A photon band over a response rising linearly from 0 at 0.743 um to the largest double
/// at 1e308 um (so 1.8 per um over any wavelength that matters): the folded panel forms
/// rise G with G = t/(e^t - 1) <= 1, which rounds to one ulp above 1 for t near 1e-16, and
/// rise = 1.8e308 made it infinite. The radiance was `RadianceOverflow` at 0.63 K and
/// 414.6 K between finite values, and the inversion of L(250.57 K) bisected onto the
/// spurious overflow and failed.
#[test]
fn response_rising_to_the_largest_double_has_a_finite_radiance() {
    use bandtemp::band::SpectralTable;
    let wl = [0.742_668_502_641_128, 1e308];
    let r = [0.0, f64::MAX];
    let table = SpectralTable::new(&wl, &r).unwrap();
    let band = Band::with_response(0.5, 1e300, Detector::Photon, table).unwrap();
    // mpmath 1.3 at 40 digits: the integral of r(lambda) times the photon Planck law
    // (CODATA 2018 exact h, c, k) over 0.743 um to 1e300 um, split at every decade.
    let cases = [
        (0.63, 3.399_290_741_976_481e18),
        (300.0, 7.534_047_101_364_943e23),
        (414.6, 1.426_217_181_223_511_5e24),
        (500.0, 2.060_483_168_911_667_2e24),
    ];
    for (t, want) in cases {
        let got = band.radiance(t).unwrap();
        assert!(
            ((got - want) / want).abs() < 1e-13,
            "{t} K: {got:e} vs {want:e}"
        );
    }
    let t = 250.567_091_684_478_13;
    let back = band.temperature(band.radiance(t).unwrap()).unwrap();
    assert!((back - t).abs() <= 1e-12 * t, "{t} -> {back}");
}

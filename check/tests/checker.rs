//! The checker on the invented example records: every check with a record that passes it
//! and one that fails it, the bad-input errors (field and line named), and the command
//! line (exit status, JSON read back by serde_json, JUnit XML read back by Python's
//! xml.etree, progress on stderr).

use bandtemp_check::record::{parse, RecordError};
use bandtemp_check::run::{run, Outcome, Status};
use std::path::{Path, PathBuf};
use std::process::Command;

fn examples() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../examples/records")
}

fn pass_text() -> String {
    std::fs::read_to_string(examples().join("line_scanner_pass.toml")).unwrap()
}

/// The passing record with each `(from, to)` replaced; each `from` must occur once.
fn patched(edits: &[(&str, &str)]) -> String {
    let mut text = pass_text();
    for (from, to) in edits {
        assert_eq!(text.matches(from).count(), 1, "`{from}` must occur once");
        text = text.replacen(from, to, 1);
    }
    text
}

/// The covariance block of the passing record.
const COVARIANCE: &str = "covariance = [
    [2.4686e-5, -4.1753e-3, -5.0386],
    [-4.1753e-3, 0.71166, 847.86],
    [-5.0386, 847.86, 1.0321e6],
]
";

fn outcome_of(text: &str) -> Outcome {
    let record = parse(text).unwrap_or_else(|e| panic!("record refused: {e}"));
    run("test.toml", &record, &mut |_| {})
}

fn status(outcome: &Outcome, id: &str) -> Status {
    outcome
        .checks
        .iter()
        .find(|c| c.id == id)
        .unwrap_or_else(|| panic!("no check `{id}` in {outcome:#?}"))
        .status
}

/// Asserts that check `id` passes on the passing record and has `want` after `edits`,
/// and that every other check keeps its status (the edit breaks that check alone) unless
/// listed in `also`.
fn breaks(id: &str, edits: &[(&str, &str)], want: Status, also: &[&str]) {
    let good = outcome_of(&pass_text());
    assert_eq!(status(&good, id), Status::Pass);
    let bad = outcome_of(&patched(edits));
    assert_eq!(status(&bad, id), want, "{bad:#?}");
    assert!(!bad.passed());
    for check in &bad.checks {
        if check.id != id && !also.contains(&check.id) {
            assert_eq!(
                check.status,
                Status::Pass,
                "{} changed too: {bad:#?}",
                check.id
            );
        }
    }
}

#[test]
fn the_passing_example_passes_every_check() {
    let outcome = outcome_of(&pass_text());
    let ids: Vec<&str> = outcome.checks.iter().map(|c| c.id).collect();
    assert_eq!(
        ids,
        [
            "fit_residuals",
            "coverage",
            "model",
            "calibration_uncertainty",
            "round_trip_calibration",
            "round_trip_band",
            "rails",
            "frame_table"
        ]
    );
    assert!(outcome.passed(), "{outcome:#?}");
    // The readings carry invented noise of under one count; at 80 to 270 counts per
    // kelvin over the range (the readings' own slope) that is at most about 10 mK.
    let fit = &outcome.checks[0];
    assert!(fit.value_k.unwrap() < 0.02 && fit.value_k.unwrap() > 1e-3);
}

#[test]
fn the_failing_example_fails_what_it_says() {
    let text = std::fs::read_to_string(examples().join("line_scanner_fail.toml")).unwrap();
    let outcome = outcome_of(&text);
    assert!(!outcome.passed());
    // 1.2 % more signal than the curve: residuals of a kelvin or two at the hot points.
    assert_eq!(status(&outcome, "fit_residuals"), Status::Fail);
    let fit = outcome
        .checks
        .iter()
        .find(|c| c.id == "fit_residuals")
        .unwrap();
    assert!(fit.value_k.unwrap() > 1.0 && fit.where_k == Some(473.15));
    // 573.15 - 473.15 K extrapolated.
    let coverage = outcome.checks.iter().find(|c| c.id == "coverage").unwrap();
    assert_eq!(coverage.status, Status::Fail);
    assert!((coverage.value_k.unwrap() - 100.0).abs() < 1e-9);
    assert_eq!(status(&outcome, "rails"), Status::Fail);
    assert_eq!(status(&outcome, "frame_table"), Status::Fail);
    assert_eq!(status(&outcome, "model"), Status::Pass);
}

#[test]
fn fit_residuals_max_and_rms_limits() {
    breaks(
        "fit_residuals",
        &[("fit_max_residual_k = 0.05", "fit_max_residual_k = 0.005")],
        Status::Fail,
        &[],
    );
    breaks(
        "fit_residuals",
        &[("fit_rms_residual_k = 0.03", "fit_rms_residual_k = 0.003")],
        Status::Fail,
        &[],
    );
}

#[test]
fn coverage_extrapolation_and_gap_limits() {
    // 10 K above the hottest point against a 5 K limit (the curve still meets the band
    // model and the rails there).
    breaks(
        "coverage",
        &[("hi_k = 473.15", "hi_k = 483.15")],
        Status::Fail,
        &[],
    );
    breaks(
        "coverage",
        &[("max_gap_k = 60.0", "max_gap_k = 40.0")],
        Status::Fail,
        &[],
    );
}

#[test]
fn model_limit() {
    // A counts map 1 % off: the curve no longer reads what the band model says.
    breaks(
        "model",
        &[("gain = 0.006", "gain = 0.00606")],
        Status::Fail,
        &[],
    );
}

#[test]
fn calibration_uncertainty_limit() {
    // The recorded covariance gives u(T) up to about 9 mK at the cold end.
    breaks(
        "calibration_uncertainty",
        &[("calibration_u_k = 0.02", "calibration_u_k = 0.005")],
        Status::Fail,
        &[],
    );
    // A covariance that is no covariance cannot be propagated: an error, not a pass.
    breaks(
        "calibration_uncertainty",
        &[("[-5.0386, 847.86, 1.0321e6]", "[-5.0386, 847.86, 0.0]")],
        Status::Error,
        &[],
    );
}

#[test]
fn round_trip_limits() {
    breaks(
        "round_trip_calibration",
        &[("round_trip_k = 1e-6", "round_trip_k = 1e-16")],
        Status::Fail,
        &["round_trip_band"],
    );
    breaks(
        "round_trip_band",
        &[("round_trip_k = 1e-6", "round_trip_k = 1e-16")],
        Status::Fail,
        &["round_trip_calibration"],
    );
}

#[test]
fn rails_limit() {
    // 45393 counts at 473.15 K against a 40000-count saturation rail.
    breaks(
        "rails",
        &[("saturation_counts = 65535", "saturation_counts = 40000")],
        Status::Fail,
        &[],
    );
    breaks(
        "rails",
        &[("dead_counts = 0", "dead_counts = 5000")],
        Status::Fail,
        &[],
    );
}

#[test]
fn frame_table_limits() {
    breaks(
        "frame_table",
        &[("max_rows = 256", "max_rows = 8")],
        Status::Fail,
        &[],
    );
    breaks(
        "frame_table",
        &[("frame_max_error_k = 0.01", "frame_max_error_k = 0.001")],
        Status::Fail,
        &[],
    );
    // f32 output cannot resolve a nanokelvin: no table exists.
    breaks(
        "frame_table",
        &[("tolerance_k = 0.01", "tolerance_k = 1e-9")],
        Status::Fail,
        &[],
    );
    // The band as the table's curve (radiometric firmware) passes too.
    let outcome = outcome_of(&patched(&[("curve = \"calibration\"", "curve = \"band\"")]));
    assert_eq!(status(&outcome, "frame_table"), Status::Pass);
}

#[test]
fn a_check_that_cannot_be_computed_is_an_error() {
    // A dark offset above the readings: no temperature reads back from them.
    breaks(
        "fit_residuals",
        &[("dark_offset = 1480.0", "dark_offset = 5000.0")],
        Status::Error,
        &["model", "rails", "coverage"],
    );
}

#[test]
fn a_record_without_parameters_is_fitted_to_its_points() {
    let outcome = outcome_of(&patched(&[
        ("a_um = 9.414095421\n", ""),
        ("b_umk = 166.990281302\n", ""),
        ("c = 9.439896535e5\n", ""),
        (COVARIANCE, ""),
        ("calibration_u_k = 0.02\n", ""),
    ]));
    assert!(
        outcome.calibration.contains("fitted to 7 points"),
        "{}",
        outcome.calibration
    );
    assert!(outcome.passed(), "{outcome:#?}");
}

fn refused(text: &str) -> RecordError {
    match parse(text) {
        Ok(_) => panic!("record accepted"),
        Err(e) => e,
    }
}

/// Line (1-based) of the first line of the passing record that starts with `start`.
fn line_of(start: &str) -> usize {
    pass_text()
        .lines()
        .position(|l| l.trim_start().starts_with(start))
        .unwrap_or_else(|| panic!("no line starts with {start}"))
        + 1
}

#[test]
fn unknown_fields_are_refused_with_field_and_line() {
    let e = refused(&patched(&[(
        "lo_um = 7.5\n",
        "lo_um = 7.5\nlo_nm = 7500\n",
    )]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("band.lo_nm", line_of("lo_um") + 1)
    );
    assert!(e.message.contains("unknown field `lo_nm`"), "{e}");
    let e = refused(&patched(&[(
        "{ t_k = 298.15, signal",
        "{ t_k = 298.15, sgnal",
    )]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("calibration.points[2].sgnal", line_of("{ t_k = 298.15"))
    );
    let e = refused(&patched(&[(
        "[tolerances]\n",
        "[tolerances]\nround_trip_mk = 1\n",
    )]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("tolerances.round_trip_mk", line_of("[tolerances]") + 1)
    );
    let e = refused(&format!("{}\n[extras]\nx = 1\n", pass_text()));
    assert_eq!(e.field, "extras");
}

#[test]
fn wrong_types_are_refused_with_field_and_line() {
    let e = refused(&patched(&[("gain = 0.006", "gain = \"fast\"")]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("counts.gain", line_of("gain ="))
    );
    assert!(e.message.contains("invalid type"), "{e}");
    let e = refused(&patched(&[("signal = 9018.0", "signal = \"9018\"")]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("calibration.points[2].signal", line_of("{ t_k = 298.15"))
    );
    let e = refused(&patched(&[(
        "saturation_counts = 65535",
        "saturation_counts = 70000",
    )]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("counts.saturation_counts", line_of("saturation_counts"))
    );
    let e = refused(&patched(&[(
        "detector = \"energy\"",
        "detector = \"bolometer\"",
    )]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("band.detector", line_of("detector"))
    );
    let e = refused(&patched(&[("[-4.1753e-3, 0.71166", "[-4.1753e-3, \"x\"")]));
    assert_eq!(e.field, "calibration.covariance[1][1]");
}

#[test]
fn missing_fields_are_refused_with_field_and_line() {
    let e = refused(&patched(&[("round_trip_k = 1e-6\n", "")]));
    assert_eq!(e.field, "tolerances.round_trip_k");
    assert!(e.message.contains("missing field"), "{e}");
    let e = refused(&patched(&[("c = 9.439896535e5\n", "")]));
    assert_eq!(e.field, "calibration.c");
    let e = refused(&patched(&[("model_max_error_k = 0.05\n", "")]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("tolerances.model_max_error_k", line_of("[tolerances]"))
    );
    let e = refused(&patched(&[(
        "response = [0.0, 0.42",
        "responses = [0.0, 0.42",
    )]));
    assert_eq!(e.field, "band.responses");
}

#[test]
fn versions_other_than_1_are_refused() {
    let e = refused(&patched(&[("version = 1", "version = 2")]));
    assert_eq!((e.field.as_str(), e.line), ("version", line_of("version")));
    assert!(e.message.contains("unsupported record version 2"), "{e}");
    let e = refused(&patched(&[("version = 1", "version = \"1\"")]));
    assert_eq!(e.field, "version");
    let e = refused(&patched(&[("version = 1\n", "")]));
    assert_eq!(e.field, "version");
    assert!(e.message.contains("missing"), "{e}");
}

#[test]
fn out_of_domain_values_are_refused_with_field_and_line() {
    let cases: &[(&str, &str, &str, &str)] = &[
        ("hi_um = 14.5", "hi_um = 7.0", "band.hi_um", "hi_um"),
        (
            "lo_k = 253.15",
            "lo_k = -253.15",
            "range.lo_k",
            "lo_k = -253.15",
        ),
        (
            "t_k = 298.15, signal = 9018.0",
            "t_k = -298.15, signal = 9018.0",
            "calibration.points[2].t_k",
            "{ t_k = -298.15",
        ),
        (
            "signal = 9018.0, u_signal = 1.0",
            "signal = 9018.0, u_signal = 0.0",
            "calibration.points[2].u_signal",
            "{ t_k = 298.15",
        ),
        (
            "signal = 9018.0, u_signal = 1.0",
            "signal = 9018.0",
            "calibration.points[2].u_signal",
            "{ t_k = 298.15",
        ),
        (
            "t_k = 298.15, signal",
            "t_k = 273.15, signal",
            "calibration.points[2].t_k",
            "{ t_k = 273.15, signal = 9018",
        ),
        (
            "a_um = 9.414095421",
            "a_um = -9.4",
            "calibration.a_um",
            "a_um",
        ),
        ("gain = 0.006", "gain = 0.0", "counts.gain", "gain"),
        (
            "tolerance_k = 0.01",
            "tolerance_k = -0.01",
            "frame.tolerance_k",
            "tolerance_k",
        ),
        (
            "max_gap_k = 60.0",
            "max_gap_k = nan",
            "tolerances.max_gap_k",
            "max_gap_k",
        ),
        (
            "response = [0.0, 0.42",
            "response = [-0.1, 0.42",
            "band.response",
            "response =",
        ),
        (
            "[2.4686e-5, -4.1753e-3",
            "[2.4686e-5, -4.1752e-3",
            "calibration.covariance",
            "covariance",
        ),
    ];
    for (from, to, field, line_start) in cases {
        let text = patched(&[(from, to)]);
        let e = refused(&text);
        let line = text
            .lines()
            .position(|l| l.trim_start().starts_with(line_start))
            .unwrap()
            + 1;
        assert_eq!(
            (e.field.as_str(), e.line),
            (*field, line),
            "{from} -> {to}: {e}"
        );
    }
    let e = refused(&patched(&[("dead_counts = 0", "dead_counts = 65535")]));
    assert_eq!(e.field, "counts.saturation_counts");
}

#[test]
fn syntax_errors_name_the_line() {
    let e = refused(&patched(&[("lo_k = 253.15", "lo_k = 253.15 253")]));
    assert_eq!(
        (e.field.as_str(), e.line),
        ("range.lo_k", line_of("lo_k = 253.15"))
    );
}

// ---- the command line --------------------------------------------------------------------

fn checker() -> Command {
    Command::new(env!("CARGO_BIN_EXE_bandtemp-check"))
}

fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("bandtemp-check");
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

#[test]
fn exit_status_is_0_1_or_2() {
    let pass = examples().join("line_scanner_pass.toml");
    let fail = examples().join("line_scanner_fail.toml");
    let out = checker().arg(&pass).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("8 checks: 8 passed, 0 failed, 0 errors"),
        "{text}"
    );
    // Progress goes to stderr only.
    let progress = String::from_utf8(out.stderr).unwrap();
    assert!(progress.contains("[8/8] frame table"), "{progress}");
    assert!(!text.contains("[1/8]"));

    let out = checker().arg(&fail).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("FAIL  fit residuals"), "{text}");
    assert!(
        text.contains("extrapolated 0.0000 K below, 100.0000 K above"),
        "{text}"
    );

    let bad = scratch("bad.toml");
    std::fs::write(&bad, patched(&[("version = 1", "version = 3")])).unwrap();
    let out = checker().args(["--quiet"]).arg(&bad).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let errors = String::from_utf8(out.stderr).unwrap();
    assert!(
        errors.contains("line 8: `version`: unsupported record version 3"),
        "{errors}"
    );

    for args in [&["--frobnicate"][..], &[][..], &["--junit"][..]] {
        let out = checker().args(args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
    }
    let out = checker().arg("--quiet").arg(&pass).output().unwrap();
    assert!(out.stderr.is_empty());
    let out = checker().arg("--help").output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    assert!(String::from_utf8(out.stdout)
        .unwrap()
        .contains("--junit FILE"));
}

#[test]
fn json_report_reads_back() {
    let out = checker()
        .args(["--json", "--quiet"])
        .arg(examples().join("line_scanner_pass.toml"))
        .arg(examples().join("line_scanner_fail.toml"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let report: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(report["passed"], false);
    let records = report["records"].as_array().unwrap();
    assert_eq!(records.len(), 2);
    assert_eq!(records[0]["passed"], true);
    assert_eq!(records[1]["passed"], false);
    let checks = records[1]["checks"].as_array().unwrap();
    assert_eq!(checks.len(), 7);
    let coverage = checks.iter().find(|c| c["id"] == "coverage").unwrap();
    assert_eq!(coverage["status"], "fail");
    assert!((coverage["value_k"].as_f64().unwrap() - 100.0).abs() < 1e-9);
    assert_eq!(coverage["limit_k"].as_f64(), Some(5.0));
    assert_eq!(coverage["where_k"].as_f64(), Some(573.15));
    let rails = checks.iter().find(|c| c["id"] == "rails").unwrap();
    assert!(rails["value_k"].is_null());
}

#[test]
fn junit_report_is_well_formed_xml_with_one_failure_per_broken_check() {
    let file = scratch("report.xml");
    let out = checker()
        .args(["--quiet", "--junit"])
        .arg(&file)
        .arg(examples().join("line_scanner_pass.toml"))
        .arg(examples().join("line_scanner_fail.toml"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    // Read back by an independent XML parser: Python's xml.etree (CI installs Python).
    let script = "import sys, xml.etree.ElementTree as ET\n\
        root = ET.parse(sys.argv[1]).getroot()\n\
        suites = root.findall('testsuite')\n\
        print(root.tag, root.get('tests'), root.get('failures'), root.get('errors'), len(suites),\n\
              sum(len(s.findall('testcase')) for s in suites),\n\
              sum(len(s.findall('testcase/failure')) for s in suites))\n";
    let py = Command::new("python3")
        .args(["-c", script])
        .arg(&file)
        .output()
        .expect("python3 is needed to read the JUnit report back");
    assert!(
        py.status.success(),
        "{}",
        String::from_utf8_lossy(&py.stderr)
    );
    assert_eq!(
        String::from_utf8(py.stdout).unwrap().trim(),
        "testsuites 15 4 0 2 15 4"
    );
}

/// An invented InGaAs pyrometer (photon detector, 1.0-1.6 um) whose Wien-form curve is
/// fitted to its points by the checker: the photon and Wien paths end to end.
fn pyrometer_record(max_residual_k: f64) -> String {
    use bandtemp::band::Band;
    use bandtemp::planck::Detector;
    let band = Band::rectangular(1.0, 1.6, Detector::Photon).unwrap();
    // 50 000 counts above a 200-count dark level at 1500 K.
    let gain = band.radiance(1500.0).unwrap() / 50_000.0;
    let points: Vec<String> = [900.0, 1000.0, 1100.0, 1200.0, 1300.0, 1400.0, 1500.0]
        .iter()
        .map(|&t: &f64| {
            let counts = (200.0 + band.radiance(t).unwrap() / gain).round();
            format!("    {{ t_k = {t:.1}, signal = {counts:.1} }},")
        })
        .collect();
    format!(
        "version = 1\n\
         [instrument]\nname = \"InGaAs pyrometer (invented)\"\n\
         [band]\nlo_um = 1.0\nhi_um = 1.6\ndetector = \"photon\"\n\
         [range]\nlo_k = 900.0\nhi_k = 1500.0\n\
         [calibration]\nform = \"sakuma-hattori-wien\"\ndark_offset = 200.0\npoints = [\n{}\n]\n\
         [counts]\ngain = {gain:e}\noffset = {:e}\n\
         [frame]\nlo_k = 900.0\nhi_k = 1600.0\ntolerance_k = 0.01\n\
         [tolerances]\nround_trip_k = 1e-6\nfit_max_residual_k = {max_residual_k}\n\
         model_max_error_k = 0.5\nmax_extrapolation_k = 1.0\n",
        points.join("\n"),
        -200.0 * gain
    )
}

#[test]
fn a_photon_pyrometer_with_a_wien_curve_fitted_to_its_points() {
    // Whole counts: 0.5 count of rounding at 6.4 counts per kelvin (900 K; 236 at 1500 K,
    // the band's dL/dT over the gain) is up to 0.08 K at the cold end: 0.5 K passes.
    let outcome = outcome_of(&pyrometer_record(0.5));
    assert!(
        outcome.calibration.contains("Wien form")
            && outcome.calibration.contains("fitted to 7 points")
    );
    assert!(outcome.passed(), "{outcome:#?}");
    // A millikelvin limit cannot be met by whole counts at 900 K.
    let outcome = outcome_of(&pyrometer_record(0.001));
    assert_eq!(status(&outcome, "fit_residuals"), Status::Fail);
}

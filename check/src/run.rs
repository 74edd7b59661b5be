//! Runs the checks a record has data for, each against its tolerance.
//!
//! | id | runs when | measures ([`bandtemp::verify`]) | fails when |
//! |---|---|---|---|
//! | `fit_residuals` | the calibration has points | T_curve(S_i) - T_i | max > `fit_max_residual_k`, or rms > `fit_rms_residual_k` |
//! | `coverage` | the calibration has points | extrapolation beyond the points over `[range]`, largest gap | extrapolation > `max_extrapolation_k`, or gap > `max_gap_k` |
//! | `model` | `[counts]` | calibration curve against the exact band model through the counts map | max > `model_max_error_k` |
//! | `calibration_uncertainty` | `calibration.covariance` | u(T) of the curve from the covariance of (A, B, C) over `[range]` | max u > `calibration_u_k` |
//! | `round_trip_calibration` | always | T(S(T)) - T of the calibration curve, monotonicity | error > `round_trip_k`, or not monotonic |
//! | `round_trip_band` | always | the same for the band model | as above |
//! | `rails` | `[counts]` | the calibration's counts at the range's ends against the rails | an end at or beyond a rail |
//! | `frame_table` | `[frame]` | the table the firmware builds against exact inversion | max > `frame_max_error_k` (default `frame.tolerance_k`), a refusal or a fall inside the range, more rows than `max_rows`, or no table meets the tolerance |
//!
//! A check whose computation fails (a curve undefined somewhere in the range, say) is an
//! error, which fails the record like a broken tolerance.

use crate::record::{Form, FrameCurve, Instrument, Record};
use bandtemp::band::{Band, SignalCurve};
use bandtemp::calibration::{fit_points_with, OffsetCurve, SakumaHattori, SakumaHattoriWien};
use bandtemp::frame::{FrameTable, TableRow};
use bandtemp::verify::{self, DEFAULT_SAMPLES};
use std::time::Instant;

/// How a check ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Status {
    /// Within every tolerance.
    Pass,
    /// A tolerance is broken.
    Fail,
    /// The check could not be computed; fails the record too.
    Error,
}

impl Status {
    /// "PASS", "FAIL" or "ERROR".
    #[must_use]
    pub fn label(self) -> &'static str {
        match self {
            Status::Pass => "PASS",
            Status::Fail => "FAIL",
            Status::Error => "ERROR",
        }
    }
}

/// The result of one check.
#[derive(Clone, Debug, PartialEq)]
pub struct CheckResult {
    /// Stable identifier (`fit_residuals`, `frame_table`, ...).
    pub id: &'static str,
    /// Human title.
    pub title: &'static str,
    /// Pass, fail or error.
    pub status: Status,
    /// The worst case and where it is, in words.
    pub summary: String,
    /// The limits it was held to, in words.
    pub limit: String,
    /// The main figure compared with `limit_k`, K.
    pub value_k: Option<f64>,
    /// The main limit, K.
    pub limit_k: Option<f64>,
    /// Where the worst case is, K.
    pub where_k: Option<f64>,
    /// Wall time of the check, s.
    pub seconds: f64,
}

/// Every check of one record.
#[derive(Clone, Debug, PartialEq)]
pub struct Outcome {
    /// Where the record came from (as given on the command line).
    pub source: String,
    /// The instrument.
    pub instrument: Instrument,
    /// How the calibration curve was obtained, in words.
    pub calibration: String,
    /// The checks, in the order they ran.
    pub checks: Vec<CheckResult>,
}

impl Outcome {
    /// Whether every check passed.
    #[must_use]
    pub fn passed(&self) -> bool {
        self.checks.iter().all(|c| c.status == Status::Pass)
    }

    /// Number of checks with `status`.
    #[must_use]
    pub fn count(&self, status: Status) -> usize {
        self.checks.iter().filter(|c| c.status == status).count()
    }
}

/// A temperature or temperature difference for a human: 4 decimals from 0.01 K up,
/// 3 significant digits below.
#[must_use]
pub fn kelvin(value_k: f64) -> String {
    if value_k == 0.0 || value_k.abs() >= 0.01 {
        format!("{value_k:.4} K")
    } else {
        format!("{value_k:.3e} K")
    }
}

/// The calibration curve with and without its dark offset.
struct Curves {
    with_offset: Box<dyn SignalCurve>,
    bare: Box<dyn SignalCurve>,
    form: Form,
    params: [f64; 3],
    description: String,
}

fn curves(record: &Record) -> Result<Curves, bandtemp::Error> {
    let cal = &record.calibration;
    let t_k: Vec<f64> = cal.points.iter().map(|p| p.t_k).collect();
    let signals: Vec<f64> = cal.points.iter().map(|p| p.signal).collect();
    let u: Option<Vec<f64>> = cal.points.iter().map(|p| p.u_signal).collect();
    let (params, how) = if let Some(p) = cal.params {
        (p, "as recorded".to_owned())
    } else {
        {
            let p = match cal.form {
                Form::SakumaHattori => {
                    let f = fit_points_with::<SakumaHattori>(
                        &t_k,
                        &signals,
                        u.as_deref(),
                        cal.dark_offset,
                    )?;
                    [f.params.a_um(), f.params.b_umk(), f.params.c()]
                }
                Form::SakumaHattoriWien => {
                    let f = fit_points_with::<SakumaHattoriWien>(
                        &t_k,
                        &signals,
                        u.as_deref(),
                        cal.dark_offset,
                    )?;
                    [f.params.a_um(), f.params.b_umk(), f.params.c()]
                }
            };
            (p, format!("fitted to {} points", t_k.len()))
        }
    };
    let [a, b, c] = params;
    let name = match cal.form {
        Form::SakumaHattori => "Sakuma-Hattori",
        Form::SakumaHattoriWien => "Sakuma-Hattori (Wien form)",
    };
    let description = format!(
        "{name} {how}: A = {a:.6} um, B = {b:.6} um K, C = {c:.6e}, dark offset {}",
        cal.dark_offset
    );
    Ok(match cal.form {
        Form::SakumaHattori => {
            let bare = SakumaHattori::new(a, b, c)?;
            Curves {
                with_offset: Box::new(OffsetCurve::new(bare, cal.dark_offset)?),
                bare: Box::new(bare),
                form: cal.form,
                params,
                description,
            }
        }
        Form::SakumaHattoriWien => {
            let bare = SakumaHattoriWien::new(a, b, c)?;
            Curves {
                with_offset: Box::new(OffsetCurve::new(bare, cal.dark_offset)?),
                bare: Box::new(bare),
                form: cal.form,
                params,
                description,
            }
        }
    })
}

/// What a check function returns: status, summary, limit, value, limit, where.
type Finding = (
    Status,
    String,
    String,
    Option<f64>,
    Option<f64>,
    Option<f64>,
);

/// One check: identifier, title, and the function that runs it.
type Check<'c> = (&'static str, &'static str, fn(&Checker<'c>) -> CheckOutput);

/// What a check function returns.
type CheckOutput = Result<Finding, bandtemp::Error>;

/// Everything the checks share.
struct Checker<'a> {
    record: &'a Record,
    curves: Curves,
    band: Band<'a>,
    t_k: Vec<f64>,
    signals: Vec<f64>,
}

/// The checks `record` has data for, in the order they run.
fn checks_for<'c>(record: &Record) -> Vec<Check<'c>> {
    let has_points = !record.calibration.points.is_empty();
    let has_counts = record.counts.is_some();
    let has_covariance = record.calibration.covariance.is_some();
    let candidates: [(bool, Check<'c>); 8] = [
        (
            has_points,
            ("fit_residuals", "fit residuals", Checker::fit_residuals),
        ),
        (has_points, ("coverage", "coverage", Checker::coverage)),
        (has_counts, ("model", "curve vs band model", Checker::model)),
        (
            has_covariance,
            (
                "calibration_uncertainty",
                "calibration uncertainty",
                Checker::calibration_uncertainty,
            ),
        ),
        (
            true,
            (
                "round_trip_calibration",
                "round trip, calibration",
                Checker::round_trip_calibration,
            ),
        ),
        (
            true,
            (
                "round_trip_band",
                "round trip, band model",
                Checker::round_trip_band,
            ),
        ),
        (has_counts, ("rails", "rails", Checker::rails)),
        (
            record.frame.is_some(),
            ("frame_table", "frame table", Checker::frame_table),
        ),
    ];
    candidates
        .into_iter()
        .filter_map(|(runs, check)| runs.then_some(check))
        .collect()
}

/// Runs every check the record has data for. `progress` receives a line as each check
/// starts (the binary prints them on stderr).
#[must_use]
pub fn run(source: &str, record: &Record, progress: &mut dyn FnMut(&str)) -> Outcome {
    let mut outcome = Outcome {
        source: source.to_owned(),
        instrument: record.instrument.clone(),
        calibration: String::new(),
        checks: Vec::new(),
    };
    let curves = match curves(record) {
        Ok(curves) => curves,
        Err(error) => {
            outcome.calibration = format!("no usable calibration curve: {error}");
            outcome
                .checks
                .push(error_result("calibration", "calibration curve", error));
            return outcome;
        }
    };
    outcome.calibration.clone_from(&curves.description);
    let band = match record.band.band() {
        Ok(band) => band,
        Err(error) => {
            outcome
                .checks
                .push(error_result("band", "band model", error));
            return outcome;
        }
    };
    let checker = Checker {
        record,
        curves,
        band,
        t_k: record.calibration.points.iter().map(|p| p.t_k).collect(),
        signals: record.calibration.points.iter().map(|p| p.signal).collect(),
    };
    let checks = checks_for(record);
    let total = checks.len();
    for (index, (id, title, check)) in checks.into_iter().enumerate() {
        progress(&format!("[{}/{total}] {title}", index + 1));
        let start = Instant::now();
        let result = match check(&checker) {
            Ok((status, summary, limit, value_k, limit_k, where_k)) => CheckResult {
                id,
                title,
                status,
                summary,
                limit,
                value_k,
                limit_k,
                where_k,
                seconds: 0.0,
            },
            Err(error) => error_result(id, title, error),
        };
        outcome.checks.push(CheckResult {
            seconds: start.elapsed().as_secs_f64(),
            ..result
        });
    }
    outcome
}

impl Checker<'_> {
    fn fit_residuals(&self) -> CheckOutput {
        let tol = self.record.tolerances;
        let r = verify::residuals(self.curves.with_offset.as_ref(), &self.t_k, &self.signals)?;
        let max_limit = tol.fit_max_residual_k.unwrap_or(f64::INFINITY);
        let rms_ok = tol.fit_rms_residual_k.is_none_or(|l| r.rms_residual_k <= l);
        let ok = r.max_abs_residual_k <= max_limit && rms_ok;
        let limit = match tol.fit_rms_residual_k {
            Some(l) => format!("max <= {}, rms <= {}", kelvin(max_limit), kelvin(l)),
            None => format!("max <= {}", kelvin(max_limit)),
        };
        Ok((
            verdict(ok),
            format!(
                "max {} at the {} K point (#{}), rms {}, mean {}, {} points",
                kelvin(r.worst_residual_k),
                r.worst_t_k,
                r.worst_index,
                kelvin(r.rms_residual_k),
                kelvin(r.mean_residual_k),
                r.points
            ),
            limit,
            Some(r.max_abs_residual_k),
            tol.fit_max_residual_k,
            Some(r.worst_t_k),
        ))
    }

    fn coverage(&self) -> CheckOutput {
        let (tol, range) = (self.record.tolerances, self.record.range);
        let c = verify::coverage(&self.t_k, range.lo_k, range.hi_k)?;
        let ext_limit = tol.max_extrapolation_k.unwrap_or(f64::INFINITY);
        let gap_ok = tol.max_gap_k.is_none_or(|l| c.largest_gap_k <= l);
        let ok = c.extrapolated_k() <= ext_limit && gap_ok;
        let limit = match tol.max_gap_k {
            Some(l) => format!(
                "extrapolation <= {}, gap <= {}",
                kelvin(ext_limit),
                kelvin(l)
            ),
            None => format!("extrapolation <= {}", kelvin(ext_limit)),
        };
        let where_k = if c.extrapolated_below_k >= c.extrapolated_above_k {
            range.lo_k
        } else {
            range.hi_k
        };
        Ok((
            verdict(ok),
            format!(
                "points {}..{} K over range {}..{} K: extrapolated {} below, {} above; largest gap {} ({}..{} K)",
                c.t_min_k,
                c.t_max_k,
                range.lo_k,
                range.hi_k,
                kelvin(c.extrapolated_below_k),
                kelvin(c.extrapolated_above_k),
                kelvin(c.largest_gap_k),
                c.gap_lo_k,
                c.gap_hi_k
            ),
            limit,
            Some(c.extrapolated_k()),
            tol.max_extrapolation_k,
            Some(where_k),
        ))
    }

    fn model(&self) -> CheckOutput {
        let (tol, range) = (self.record.tolerances, self.record.range);
        let Some(counts) = self.record.counts else {
            return Err(bandtemp::Error::FrameCountsMapInvalid);
        };
        let r = verify::curve_against_model(
            self.curves.with_offset.as_ref(),
            &self.band,
            counts.map,
            range.lo_k,
            range.hi_k,
            DEFAULT_SAMPLES,
        )?;
        let limit_k = tol.model_max_error_k.unwrap_or(f64::INFINITY);
        Ok((
            verdict(r.max_abs_error_k <= limit_k),
            format!(
                "max {} at {:.3} K, mean {} over {} temperatures",
                kelvin(r.worst_error_k),
                r.worst_t_k,
                kelvin(r.mean_error_k),
                r.samples
            ),
            format!("max <= {}", kelvin(limit_k)),
            Some(r.max_abs_error_k),
            tol.model_max_error_k,
            Some(r.worst_t_k),
        ))
    }

    fn calibration_uncertainty(&self) -> CheckOutput {
        let (tol, range) = (self.record.tolerances, self.record.range);
        let Some(covariance) = self.record.calibration.covariance else {
            return Err(bandtemp::Error::VerifyCovarianceInvalid);
        };
        let [a, b, c] = self.curves.params;
        let r = match self.curves.form {
            Form::SakumaHattori => verify::calibration_uncertainty(
                &SakumaHattori::new(a, b, c)?,
                &covariance,
                range.lo_k,
                range.hi_k,
                DEFAULT_SAMPLES,
            )?,
            Form::SakumaHattoriWien => verify::calibration_uncertainty(
                &SakumaHattoriWien::new(a, b, c)?,
                &covariance,
                range.lo_k,
                range.hi_k,
                DEFAULT_SAMPLES,
            )?,
        };
        let limit_k = tol.calibration_u_k.unwrap_or(f64::INFINITY);
        Ok((
            verdict(r.max_u_k <= limit_k),
            format!(
                "u(T) up to {} at {:.3} K ({} at {} K, {} at {} K), k = 1",
                kelvin(r.max_u_k),
                r.worst_t_k,
                kelvin(r.lo_u_k),
                range.lo_k,
                kelvin(r.hi_u_k),
                range.hi_k
            ),
            format!("u <= {}", kelvin(limit_k)),
            Some(r.max_u_k),
            tol.calibration_u_k,
            Some(r.worst_t_k),
        ))
    }

    fn round_trip_calibration(&self) -> CheckOutput {
        round_trip(self.curves.with_offset.as_ref(), self.record)
    }

    fn round_trip_band(&self) -> CheckOutput {
        round_trip(&self.band, self.record)
    }

    fn rails(&self) -> CheckOutput {
        let range = self.record.range;
        let Some(counts) = self.record.counts else {
            return Err(bandtemp::Error::FrameRailsInvalid);
        };
        let curve = self.curves.with_offset.as_ref();
        let lo = curve.signal(range.lo_k)?;
        let hi = curve.signal(range.hi_k)?;
        let dead = f64::from(counts.rails.dead_counts());
        let saturation = f64::from(counts.rails.saturation_counts());
        let ok = lo > dead && hi < saturation;
        let where_k = if lo > dead { range.hi_k } else { range.lo_k };
        Ok((
            verdict(ok),
            format!(
                "{lo:.1} counts at {} K, {hi:.1} counts at {} K",
                range.lo_k, range.hi_k
            ),
            format!("inside the rails {dead} < counts < {saturation}"),
            None,
            None,
            Some(where_k),
        ))
    }

    fn frame_table(&self) -> CheckOutput {
        let Some(frame) = self.record.frame else {
            return Err(bandtemp::Error::FrameTableInvalid);
        };
        let curve: &dyn SignalCurve = match frame.curve {
            FrameCurve::Calibration => self.curves.bare.as_ref(),
            FrameCurve::Band => &self.band,
        };
        let limit_k = self
            .record
            .tolerances
            .frame_max_error_k
            .unwrap_or(frame.tolerance_k);
        frame_table(curve, frame, limit_k)
    }
}

fn verdict(ok: bool) -> Status {
    if ok {
        Status::Pass
    } else {
        Status::Fail
    }
}

fn error_result(id: &'static str, title: &'static str, error: bandtemp::Error) -> CheckResult {
    CheckResult {
        id,
        title,
        status: Status::Error,
        summary: format!("could not be computed: {error}"),
        limit: String::new(),
        value_k: None,
        limit_k: None,
        where_k: None,
        seconds: 0.0,
    }
}

fn round_trip(curve: &dyn SignalCurve, record: &Record) -> Result<Finding, bandtemp::Error> {
    let range = record.range;
    let limit_k = record.tolerances.round_trip_k;
    let r = verify::round_trip(curve, range.lo_k, range.hi_k, DEFAULT_SAMPLES)?;
    let monotonic = match r.first_non_monotonic_k {
        None => "monotonic".to_owned(),
        Some(t) => format!("NOT monotonic from {t:.3} K"),
    };
    Ok((
        verdict(r.monotonic() && r.max_abs_error_k <= limit_k),
        format!(
            "max {} at {:.3} K over {} temperatures, {monotonic}",
            kelvin(r.worst_error_k),
            r.worst_t_k,
            r.samples
        ),
        format!("max <= {}, monotonic", kelvin(limit_k)),
        Some(r.max_abs_error_k),
        Some(limit_k),
        Some(r.first_non_monotonic_k.unwrap_or(r.worst_t_k)),
    ))
}

fn frame_table(
    curve: &dyn SignalCurve,
    frame: crate::record::FrameSpec,
    limit_k: f64,
) -> Result<Finding, bandtemp::Error> {
    let rows = match FrameTable::required_rows(curve, frame.range, frame.tolerance_k) {
        Ok(rows) => rows,
        Err(error @ bandtemp::Error::FrameToleranceUnreachable) => {
            return Ok((
                Status::Fail,
                format!("no table meets {}: {error}", kelvin(frame.tolerance_k)),
                format!("max <= {}", kelvin(limit_k)),
                None,
                Some(limit_k),
                None,
            ))
        }
        Err(error) => return Err(error),
    };
    let mut storage: Vec<TableRow> = vec![[0.0; 4]; rows];
    let table = FrameTable::build(curve, frame.range, frame.tolerance_k, &mut storage)?;
    let r = verify::frame_table(&table, curve, frame.points_per_row)?;
    let rows_ok = frame.max_rows.is_none_or(|m| r.rows <= m);
    let ok = r.max_abs_error_k <= limit_k && r.refused == 0 && r.non_monotonic == 0 && rows_ok;
    let limit = match frame.max_rows {
        Some(m) => format!("max <= {}, rows <= {m}", kelvin(limit_k)),
        None => format!("max <= {}", kelvin(limit_k)),
    };
    Ok((
        verdict(ok),
        format!(
            "max {} at {:.3} K (signal {:.6e}), {} rows ({} bytes), {} samples, {} refused, {} falls; construction claimed {}",
            kelvin(r.worst_error_k),
            r.worst_t_k,
            r.worst_signal,
            r.rows,
            r.rows * core::mem::size_of::<TableRow>(),
            r.samples,
            r.refused,
            r.non_monotonic,
            kelvin(r.claimed_max_error_k)
        ),
        limit,
        Some(r.max_abs_error_k),
        Some(limit_k),
        Some(r.worst_t_k),
    ))
}

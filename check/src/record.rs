//! The instrument record: a TOML file of our own design, versioned, that says what an
//! instrument is (band, calibration, counts map and rails, frame table) and what it must
//! meet (tolerances). The README documents it field by field.
//!
//! Reading is strict: an unknown field, a wrong type, a missing field, an unsupported
//! version or an out-of-domain value is a [`RecordError`] that names the field (its
//! dotted path, `calibration.points[2].t_k`) and the line.

use bandtemp::band::{Band, SpectralTable};
use bandtemp::calibration::{SakumaHattori, SakumaHattoriWien};
use bandtemp::frame::{CountsMap, Rails, TemperatureRange};
use bandtemp::planck::Detector;
use bandtemp::verify::{DEFAULT_POINTS_PER_ROW, MAX_POINTS_PER_ROW};
use serde::Deserialize;
use std::fmt;
use toml::Spanned;

/// The record version this checker reads.
pub const RECORD_VERSION: i64 = 1;

/// A record that cannot be used: the field (dotted path), its line (1-based) and why.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RecordError {
    /// Dotted path of the field, e.g. `band.lo_um` or `calibration.points[1].signal`.
    pub field: String,
    /// 1-based line of the field (or of its table when the field is missing).
    pub line: usize,
    /// What is wrong with it.
    pub message: String,
}

impl fmt::Display for RecordError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "line {}: `{}`: {}", self.line, self.field, self.message)
    }
}

impl std::error::Error for RecordError {}

/// Detector kind as written in the record.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum DetectorKind {
    /// A thermal detector (microbolometer, thermopile): integrates spectral radiance.
    Energy,
    /// A quantum detector (InGaAs, InSb, Si): integrates photon radiance.
    Photon,
}

/// Calibration curve form.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Form {
    /// S(T) = C / (exp(c2 / (A T + B)) - 1).
    SakumaHattori,
    /// S(T) = C exp(-c2 / (A T + B)).
    SakumaHattoriWien,
}

/// The curve a frame table is built over.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum FrameCurve {
    /// The calibration curve (offset-free), as firmware with a Sakuma-Hattori converter.
    Calibration,
    /// The band's exact radiance, as firmware with a radiometric counts map.
    Band,
}

// ---- the raw record, as serde reads it --------------------------------------------------

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRecord {
    // Checked first by `VersionProbe`; named here so that `deny_unknown_fields` takes it.
    #[serde(rename = "version")]
    _version: i64,
    instrument: RawInstrument,
    band: Spanned<RawBand>,
    range: Spanned<RawRange>,
    calibration: Spanned<RawCalibration>,
    counts: Option<Spanned<RawCounts>>,
    frame: Option<Spanned<RawFrame>>,
    tolerances: Spanned<RawTolerances>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawInstrument {
    name: String,
    serial: Option<String>,
    notes: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawBand {
    lo_um: Spanned<f64>,
    hi_um: Spanned<f64>,
    detector: DetectorKind,
    response_um: Option<Spanned<Vec<f64>>>,
    response: Option<Spanned<Vec<f64>>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRange {
    lo_k: Spanned<f64>,
    hi_k: Spanned<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCalibration {
    form: Form,
    a_um: Option<Spanned<f64>>,
    b_umk: Option<Spanned<f64>>,
    c: Option<Spanned<f64>>,
    dark_offset: Option<Spanned<f64>>,
    covariance: Option<Spanned<Vec<Vec<f64>>>>,
    #[serde(default)]
    points: Vec<Spanned<RawPoint>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPoint {
    t_k: Spanned<f64>,
    signal: Spanned<f64>,
    u_signal: Option<Spanned<f64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCounts {
    gain: Spanned<f64>,
    offset: Spanned<f64>,
    dead_counts: Option<Spanned<u16>>,
    saturation_counts: Option<Spanned<u16>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFrame {
    lo_k: Spanned<f64>,
    hi_k: Spanned<f64>,
    tolerance_k: Spanned<f64>,
    curve: Option<FrameCurve>,
    max_rows: Option<Spanned<u32>>,
    points_per_row: Option<Spanned<u32>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(clippy::struct_field_names)] // every tolerance is in kelvin: the record's names say so
struct RawTolerances {
    round_trip_k: Spanned<f64>,
    fit_max_residual_k: Option<Spanned<f64>>,
    fit_rms_residual_k: Option<Spanned<f64>>,
    model_max_error_k: Option<Spanned<f64>>,
    frame_max_error_k: Option<Spanned<f64>>,
    max_extrapolation_k: Option<Spanned<f64>>,
    max_gap_k: Option<Spanned<f64>>,
    calibration_u_k: Option<Spanned<f64>>,
}

/// Only the version, read first (unknown fields allowed) so that a record of another
/// version is refused for its version, not for the fields that version has.
#[derive(Deserialize)]
struct VersionProbe {
    version: Option<Spanned<toml::Value>>,
}

// ---- the validated record ----------------------------------------------------------------

/// Who the instrument is.
#[derive(Clone, Debug, PartialEq)]
pub struct Instrument {
    /// Free-text name.
    pub name: String,
    /// Serial number, if given.
    pub serial: Option<String>,
    /// Free-text notes, if given.
    pub notes: Option<String>,
}

/// The instrument's band, owned.
#[derive(Clone, Debug, PartialEq)]
pub struct BandSpec {
    /// Lower edge, um.
    pub lo_um: f64,
    /// Upper edge, um.
    pub hi_um: f64,
    /// Detector kind.
    pub detector: Detector,
    /// Tabulated relative response (wavelengths in um, values), if any.
    pub response: Option<(Vec<f64>, Vec<f64>)>,
}

impl BandSpec {
    /// The band (borrows the response table).
    ///
    /// # Errors
    /// The band's validation errors (already passed when the record was read).
    pub fn band(&self) -> bandtemp::Result<Band<'_>> {
        match &self.response {
            None => Band::rectangular(self.lo_um, self.hi_um, self.detector),
            Some((wavelengths_um, values)) => Band::with_response(
                self.lo_um,
                self.hi_um,
                self.detector,
                SpectralTable::new(wavelengths_um, values)?,
            ),
        }
    }
}

/// One blackbody point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Point {
    /// Blackbody temperature, K.
    pub t_k: f64,
    /// Instrument signal, calibration units (counts), dark offset included.
    pub signal: f64,
    /// Standard uncertainty of the signal, same units, if given.
    pub u_signal: Option<f64>,
}

/// The calibration.
#[derive(Clone, Debug, PartialEq)]
pub struct CalibrationSpec {
    /// Curve form.
    pub form: Form,
    /// (A um, B um K, C signal units), when the record states them; `None`: fit them to
    /// the points.
    pub params: Option<[f64; 3]>,
    /// Dark offset, signal units (0 when not given).
    pub dark_offset: f64,
    /// Covariance of (A, B, C), if given.
    pub covariance: Option<[[f64; 3]; 3]>,
    /// The blackbody points.
    pub points: Vec<Point>,
}

/// Counts map and rails.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CountsSpec {
    /// Band radiance = `map.gain()` counts + `map.offset()`.
    pub map: CountsMap,
    /// Dead and saturation rails (0 and 65535 unless given).
    pub rails: Rails,
}

/// The frame table the firmware builds.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FrameSpec {
    /// Table range.
    pub range: TemperatureRange,
    /// Requested table tolerance, K.
    pub tolerance_k: f64,
    /// The curve the table is built over.
    pub curve: FrameCurve,
    /// Rows the firmware has room for, if limited.
    pub max_rows: Option<usize>,
    /// Check points per row.
    pub points_per_row: usize,
}

/// What the instrument must meet, K. `None`: that check's limit is not set.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Tolerances {
    /// Round trip T -> S -> T of the calibration curve and the band model.
    pub round_trip_k: f64,
    /// Largest |residual| at the points.
    pub fit_max_residual_k: Option<f64>,
    /// RMS residual at the points.
    pub fit_rms_residual_k: Option<f64>,
    /// Calibration curve against the band model.
    pub model_max_error_k: Option<f64>,
    /// Frame table against exact inversion.
    pub frame_max_error_k: Option<f64>,
    /// Extrapolation beyond the points, each side.
    pub max_extrapolation_k: Option<f64>,
    /// Gap between neighbouring points.
    pub max_gap_k: Option<f64>,
    /// Standard uncertainty of the calibration curve from its covariance.
    pub calibration_u_k: Option<f64>,
}

/// A validated instrument record.
#[derive(Clone, Debug, PartialEq)]
pub struct Record {
    /// Who.
    pub instrument: Instrument,
    /// The band.
    pub band: BandSpec,
    /// The operating range the checks cover.
    pub range: TemperatureRange,
    /// The calibration.
    pub calibration: CalibrationSpec,
    /// Counts map and rails, if given.
    pub counts: Option<CountsSpec>,
    /// The frame table, if the instrument has one.
    pub frame: Option<FrameSpec>,
    /// The tolerances.
    pub tolerances: Tolerances,
}

// ---- reading -------------------------------------------------------------------------------

/// 1-based line of byte `offset` in `source`.
fn line_of(source: &str, offset: usize) -> usize {
    source
        .as_bytes()
        .iter()
        .take(offset)
        .filter(|&&b| b == b'\n')
        .count()
        + 1
}

/// Builds errors against one source text.
struct Context<'s> {
    source: &'s str,
}

impl Context<'_> {
    fn error<T>(
        &self,
        field: &str,
        spanned: &Spanned<T>,
        message: impl Into<String>,
    ) -> RecordError {
        RecordError {
            field: field.to_owned(),
            line: line_of(self.source, spanned.span().start),
            message: message.into(),
        }
    }

    /// A finite number.
    fn finite(&self, field: &str, value: &Spanned<f64>) -> Result<f64, RecordError> {
        let v = *value.get_ref();
        if v.is_finite() {
            Ok(v)
        } else {
            Err(self.error(field, value, "must be a finite number"))
        }
    }

    /// A finite positive number.
    fn positive(&self, field: &str, value: &Spanned<f64>, unit: &str) -> Result<f64, RecordError> {
        let v = self.finite(field, value)?;
        if v > 0.0 {
            Ok(v)
        } else {
            Err(self.error(field, value, format!("must be positive ({unit}), got {v}")))
        }
    }

    /// Converts a `toml` error (syntax, unknown field, wrong type, missing field).
    fn toml_error(&self, error: &toml::de::Error) -> RecordError {
        let offset = error.span().map_or(0, |span| span.start);
        let line = line_of(self.source, offset);
        let message = error.message().trim().to_owned();
        // The key path, which `toml` prints only when it has no source to quote.
        let mut bare = error.clone();
        bare.set_input(None);
        let keys = bare
            .to_string()
            .lines()
            .find_map(|l| l.strip_prefix("in `").and_then(|l| l.strip_suffix('`')))
            .map(str::to_owned);
        let located = self.path_at(offset);
        let field = match (
            message.strip_prefix("missing field `"),
            quoted_name(&message),
        ) {
            // A missing field: the error points at the table that lacks it.
            (Some(_), Some(name)) => join_path(&keys.or(located).unwrap_or_default(), &name),
            _ => located.or(keys).unwrap_or_else(|| self.key_at(offset)),
        };
        RecordError {
            field,
            line,
            message,
        }
    }

    /// The dotted path (with array indices) of the most specific key or value whose span
    /// holds byte `offset`, from `toml`'s spanned document tree; `None` when the text does
    /// not parse as TOML or nothing holds the offset.
    fn path_at(&self, offset: usize) -> Option<String> {
        let document = toml::de::DeTable::parse(self.source).ok()?;
        let mut best: Option<(usize, String)> = None;
        locate_table(document.get_ref(), offset, "", &mut best);
        best.map(|(_, path)| path)
    }

    /// The dotted name of the table whose header precedes `offset` ("" for the root).
    fn table_at(&self, offset: usize) -> String {
        let before = self.source.get(..offset).unwrap_or(self.source);
        before
            .lines()
            .rev()
            .map(str::trim)
            .find(|l| l.starts_with('['))
            .map(|l| l.trim_matches(|c| c == '[' || c == ']').trim().to_owned())
            .unwrap_or_default()
    }

    /// The dotted path of the key on the line of `offset` (for errors `toml` reports on a
    /// value without naming its key).
    fn key_at(&self, offset: usize) -> String {
        let start = self
            .source
            .get(..offset)
            .and_then(|s| s.rfind('\n'))
            .map_or(0, |i| i + 1);
        let line = self.source.get(start..).unwrap_or("");
        let line = line.lines().next().unwrap_or("").trim();
        let key = match line.split_once('=') {
            Some((key, _)) if !line.starts_with('[') => key.trim().to_owned(),
            _ => String::new(),
        };
        join_path(&self.table_at(start), &key)
    }
}

/// Records in `best` the narrowest span holding `offset` among the keys and values of
/// `table` and everything below it, with its path.
fn locate_table(
    table: &toml::de::DeTable<'_>,
    offset: usize,
    prefix: &str,
    best: &mut Option<(usize, String)>,
) {
    for (key, value) in table {
        let path = join_path(prefix, key.get_ref());
        offer_span(key.span(), offset, &path, best);
        locate_value(value, offset, &path, best);
    }
}

fn locate_value(
    value: &Spanned<toml::de::DeValue<'_>>,
    offset: usize,
    path: &str,
    best: &mut Option<(usize, String)>,
) {
    offer_span(value.span(), offset, path, best);
    match value.get_ref() {
        toml::de::DeValue::Table(table) => locate_table(table, offset, path, best),
        toml::de::DeValue::Array(items) => {
            for (i, item) in items.iter().enumerate() {
                locate_value(item, offset, &format!("{path}[{i}]"), best);
            }
        }
        _ => {}
    }
}

fn offer_span(
    span: core::ops::Range<usize>,
    offset: usize,
    path: &str,
    best: &mut Option<(usize, String)>,
) {
    let holds = span.contains(&offset) || (span.is_empty() && span.start == offset);
    if holds && best.as_ref().is_none_or(|(width, _)| span.len() <= *width) {
        *best = Some((span.len(), path.to_owned()));
    }
}

fn join_path(table: &str, key: &str) -> String {
    match (table.is_empty(), key.is_empty()) {
        (true, _) => key.to_owned(),
        (false, true) => table.to_owned(),
        (false, false) => format!("{table}.{key}"),
    }
}

/// The field a serde message names: "missing field `c`", "unknown field `x`, expected ...".
fn quoted_name(message: &str) -> Option<String> {
    let rest = message
        .strip_prefix("missing field `")
        .or_else(|| message.strip_prefix("unknown field `"))?;
    rest.split_once('`').map(|(name, _)| name.to_owned())
}

/// Reads and validates a record from its TOML text.
///
/// # Errors
/// A [`RecordError`] naming the first field that is wrong and its line.
pub fn parse(source: &str) -> Result<Record, RecordError> {
    let cx = Context { source };
    check_version(&cx)?;
    let raw: RawRecord = toml::from_str(source).map_err(|e| cx.toml_error(&e))?;
    let band = band(&cx, raw.band.get_ref())?;
    let range = temperature_range(
        &cx,
        "range",
        &raw.range.get_ref().lo_k,
        &raw.range.get_ref().hi_k,
    )?;
    let calibration = calibration(&cx, &raw.calibration)?;
    let counts = raw
        .counts
        .as_ref()
        .map(|c| counts(&cx, c.get_ref()))
        .transpose()?;
    let frame = raw
        .frame
        .as_ref()
        .map(|f| frame(&cx, f.get_ref()))
        .transpose()?;
    let tolerances = tolerances(&cx, &raw.tolerances, &calibration, counts.is_some())?;
    Ok(Record {
        instrument: Instrument {
            name: raw.instrument.name,
            serial: raw.instrument.serial,
            notes: raw.instrument.notes,
        },
        band,
        range,
        calibration,
        counts,
        frame,
        tolerances,
    })
}

fn check_version(cx: &Context<'_>) -> Result<(), RecordError> {
    let probe: VersionProbe = toml::from_str(cx.source).map_err(|e| cx.toml_error(&e))?;
    let Some(version) = probe.version else {
        return Err(RecordError {
            field: "version".to_owned(),
            line: 1,
            message: format!(
                "missing field `version` (this checker reads version {RECORD_VERSION})"
            ),
        });
    };
    match version.get_ref() {
        toml::Value::Integer(v) if *v == RECORD_VERSION => Ok(()),
        toml::Value::Integer(other) => Err(cx.error(
            "version",
            &version,
            format!(
                "unsupported record version {other}: this checker reads version {RECORD_VERSION}"
            ),
        )),
        other => Err(cx.error(
            "version",
            &version,
            format!(
                "must be the integer {RECORD_VERSION}, got a {}",
                other.type_str()
            ),
        )),
    }
}

fn band(cx: &Context<'_>, raw: &RawBand) -> Result<BandSpec, RecordError> {
    let lo_um = cx.positive("band.lo_um", &raw.lo_um, "um")?;
    let hi_um = cx.positive("band.hi_um", &raw.hi_um, "um")?;
    if lo_um >= hi_um {
        return Err(cx.error(
            "band.hi_um",
            &raw.hi_um,
            format!("must exceed band.lo_um = {lo_um}"),
        ));
    }
    let detector = match raw.detector {
        DetectorKind::Energy => Detector::Energy,
        DetectorKind::Photon => Detector::Photon,
    };
    let response = match (&raw.response_um, &raw.response) {
        (None, None) => None,
        (Some(w), None) => {
            return Err(cx.error(
                "band.response",
                w,
                "missing: `band.response_um` needs `band.response`",
            ))
        }
        (None, Some(r)) => {
            return Err(cx.error(
                "band.response_um",
                r,
                "missing: `band.response` needs `band.response_um`",
            ))
        }
        (Some(w), Some(r)) => {
            if let Err(error) = SpectralTable::new(w.get_ref(), r.get_ref()) {
                let (field, at) = match error {
                    bandtemp::Error::TableValueNegative => ("band.response", r),
                    _ => ("band.response_um", w),
                };
                return Err(cx.error(field, at, error.message()));
            }
            Some((w.get_ref().clone(), r.get_ref().clone()))
        }
    };
    let spec = BandSpec {
        lo_um,
        hi_um,
        detector,
        response,
    };
    if let Err(error) = spec.band() {
        // The edges are valid by now: what is left is the response against them.
        return Err(match &raw.response {
            Some(r) => cx.error("band.response", r, error.message()),
            None => cx.error("band.lo_um", &raw.lo_um, error.message()),
        });
    }
    Ok(spec)
}

fn temperature_range(
    cx: &Context<'_>,
    table: &str,
    lo_k: &Spanned<f64>,
    hi_k: &Spanned<f64>,
) -> Result<TemperatureRange, RecordError> {
    let lo = cx.positive(&format!("{table}.lo_k"), lo_k, "K")?;
    let hi = cx.positive(&format!("{table}.hi_k"), hi_k, "K")?;
    TemperatureRange::new(lo, hi).map_err(|_| {
        cx.error(
            &format!("{table}.hi_k"),
            hi_k,
            format!("must exceed {table}.lo_k = {lo}"),
        )
    })
}

/// The blackbody points: positive distinct temperatures, finite signals, uncertainties
/// positive and given for every point or for none.
fn points(cx: &Context<'_>, raw: &[Spanned<RawPoint>]) -> Result<Vec<Point>, RecordError> {
    let mut points = Vec::with_capacity(raw.len());
    for (i, p) in raw.iter().enumerate() {
        let p = p.get_ref();
        let name = |field: &str| format!("calibration.points[{i}].{field}");
        let t_k = cx.positive(&name("t_k"), &p.t_k, "K")?;
        let signal = cx.finite(&name("signal"), &p.signal)?;
        let u_signal = p
            .u_signal
            .as_ref()
            .map(|u| cx.positive(&name("u_signal"), u, "signal units"))
            .transpose()?;
        if points.iter().any(|q: &Point| q.t_k.total_cmp(&t_k).is_eq()) {
            return Err(cx.error(&name("t_k"), &p.t_k, format!("a second point at {t_k} K")));
        }
        points.push(Point {
            t_k,
            signal,
            u_signal,
        });
    }
    let with_u = points.first().is_some_and(|p| p.u_signal.is_some());
    if let Some((index, at)) = points
        .iter()
        .zip(raw)
        .enumerate()
        .find_map(|(i, (p, at))| (p.u_signal.is_some() != with_u).then_some((i, at)))
    {
        return Err(cx.error(
            &format!("calibration.points[{index}].u_signal"),
            at,
            "give `u_signal` for every point or for none",
        ));
    }
    Ok(points)
}

fn calibration(
    cx: &Context<'_>,
    raw: &Spanned<RawCalibration>,
) -> Result<CalibrationSpec, RecordError> {
    let c = raw.get_ref();
    let dark_offset = c
        .dark_offset
        .as_ref()
        .map(|d| cx.finite("calibration.dark_offset", d))
        .transpose()?
        .unwrap_or(0.0);
    let points = points(cx, &c.points)?;
    let params = match (&c.a_um, &c.b_umk, &c.c) {
        (None, None, None) => {
            if points.len() < 3 {
                return Err(cx.error(
                    "calibration.points",
                    raw,
                    "without a_um, b_umk and c the curve is fitted to the points: give at least 3",
                ));
            }
            None
        }
        (Some(a), Some(b), Some(cc)) => {
            let p = [
                cx.finite("calibration.a_um", a)?,
                cx.finite("calibration.b_umk", b)?,
                cx.finite("calibration.c", cc)?,
            ];
            let valid = match c.form {
                Form::SakumaHattori => SakumaHattori::new(p[0], p[1], p[2]).map(|_| ()),
                Form::SakumaHattoriWien => SakumaHattoriWien::new(p[0], p[1], p[2]).map(|_| ()),
            };
            if valid.is_err() {
                let (field, at) = if p[0] > 0.0 {
                    ("calibration.c", cc)
                } else {
                    ("calibration.a_um", a)
                };
                return Err(cx.error(field, at, "Sakuma-Hattori needs A > 0 and C > 0"));
            }
            Some(p)
        }
        _ => {
            let missing = [("a_um", &c.a_um), ("b_umk", &c.b_umk), ("c", &c.c)]
                .iter()
                .find(|(_, v)| v.is_none())
                .map_or("a_um", |(name, _)| *name);
            return Err(cx.error(
                &format!("calibration.{missing}"),
                raw,
                "missing: give all of a_um, b_umk and c, or none (to fit them to the points)",
            ));
        }
    };
    if let (Some(m), None) = (&c.covariance, &params) {
        return Err(cx.error(
            "calibration.covariance",
            m,
            "belongs to a_um, b_umk and c: give them too, or drop it",
        ));
    }
    let covariance = c
        .covariance
        .as_ref()
        .map(|m| covariance(cx, m))
        .transpose()?;
    Ok(CalibrationSpec {
        form: c.form,
        params,
        dark_offset,
        covariance,
        points,
    })
}

fn covariance(cx: &Context<'_>, m: &Spanned<Vec<Vec<f64>>>) -> Result<[[f64; 3]; 3], RecordError> {
    let field = "calibration.covariance";
    let rows = m.get_ref();
    if rows.len() != 3 || rows.iter().any(|r| r.len() != 3) {
        return Err(cx.error(field, m, "must be a 3x3 array of arrays (A, B, C)"));
    }
    let mut out = [[0.0; 3]; 3];
    for (out_row, row) in out.iter_mut().zip(rows) {
        out_row.copy_from_slice(row);
    }
    let transposed: [[f64; 3]; 3] =
        core::array::from_fn(|i| out.map(|row| row.get(i).copied().unwrap_or(0.0)));
    for (i, (row, column)) in out.iter().zip(&transposed).enumerate() {
        for (j, (&a, &b)) in row.iter().zip(column).enumerate() {
            if !a.is_finite() {
                return Err(cx.error(field, m, "entries must be finite"));
            }
            if a.total_cmp(&b).is_ne() {
                return Err(cx.error(
                    field,
                    m,
                    format!("must be symmetric: [{i}][{j}] = {a}, [{j}][{i}] = {b}"),
                ));
            }
            if i == j && a < 0.0 {
                return Err(cx.error(field, m, format!("variance [{i}][{i}] is negative")));
            }
        }
    }
    Ok(out)
}

fn counts(cx: &Context<'_>, raw: &RawCounts) -> Result<CountsSpec, RecordError> {
    let gain = cx.positive("counts.gain", &raw.gain, "band-radiance units per count")?;
    let offset = cx.finite("counts.offset", &raw.offset)?;
    let map = CountsMap::linear(gain, offset)
        .map_err(|e| cx.error("counts.gain", &raw.gain, e.message()))?;
    let dead = raw.dead_counts.as_ref().map_or(0, |d| *d.get_ref());
    let saturation = raw
        .saturation_counts
        .as_ref()
        .map_or(u16::MAX, |s| *s.get_ref());
    let rails = Rails::new(dead, saturation).map_err(|_| {
        let at = raw.saturation_counts.as_ref().or(raw.dead_counts.as_ref());
        RecordError {
            field: "counts.saturation_counts".to_owned(),
            line: at.map_or(line_of(cx.source, raw.gain.span().start), |s| {
                line_of(cx.source, s.span().start)
            }),
            message: format!("must exceed counts.dead_counts = {dead}"),
        }
    })?;
    Ok(CountsSpec { map, rails })
}

fn frame(cx: &Context<'_>, raw: &RawFrame) -> Result<FrameSpec, RecordError> {
    let range = temperature_range(cx, "frame", &raw.lo_k, &raw.hi_k)?;
    let tolerance_k = cx.positive("frame.tolerance_k", &raw.tolerance_k, "K")?;
    let max_rows = match &raw.max_rows {
        Some(m) if *m.get_ref() == 0 => {
            return Err(cx.error("frame.max_rows", m, "must be at least 1"))
        }
        Some(m) => Some(*m.get_ref() as usize),
        None => None,
    };
    let points_per_row = match &raw.points_per_row {
        Some(p) if !(1..=MAX_POINTS_PER_ROW).contains(&(*p.get_ref() as usize)) => {
            return Err(cx.error(
                "frame.points_per_row",
                p,
                format!("must be 1 to {MAX_POINTS_PER_ROW}"),
            ))
        }
        Some(p) => *p.get_ref() as usize,
        None => DEFAULT_POINTS_PER_ROW,
    };
    Ok(FrameSpec {
        range,
        tolerance_k,
        curve: raw.curve.unwrap_or(FrameCurve::Calibration),
        max_rows,
        points_per_row,
    })
}

fn tolerances(
    cx: &Context<'_>,
    raw: &Spanned<RawTolerances>,
    calibration: &CalibrationSpec,
    has_counts: bool,
) -> Result<Tolerances, RecordError> {
    let t = raw.get_ref();
    let limit = |name: &str, value: &Option<Spanned<f64>>| {
        value
            .as_ref()
            .map(|v| cx.positive(&format!("tolerances.{name}"), v, "K"))
            .transpose()
    };
    let out = Tolerances {
        round_trip_k: cx.positive("tolerances.round_trip_k", &t.round_trip_k, "K")?,
        fit_max_residual_k: limit("fit_max_residual_k", &t.fit_max_residual_k)?,
        fit_rms_residual_k: limit("fit_rms_residual_k", &t.fit_rms_residual_k)?,
        model_max_error_k: limit("model_max_error_k", &t.model_max_error_k)?,
        frame_max_error_k: limit("frame_max_error_k", &t.frame_max_error_k)?,
        max_extrapolation_k: limit("max_extrapolation_k", &t.max_extrapolation_k)?,
        max_gap_k: limit("max_gap_k", &t.max_gap_k)?,
        calibration_u_k: limit("calibration_u_k", &t.calibration_u_k)?,
    };
    // Every check the record has data for needs its limit: a check without one would
    // pass silently.
    let required = |name: &str, present: bool, because: &str| {
        if present {
            Ok(())
        } else {
            Err(cx.error(
                &format!("tolerances.{name}"),
                raw,
                format!("missing: required because {because}"),
            ))
        }
    };
    if !calibration.points.is_empty() {
        let because = "the calibration has points";
        required(
            "fit_max_residual_k",
            out.fit_max_residual_k.is_some(),
            because,
        )?;
        required(
            "max_extrapolation_k",
            out.max_extrapolation_k.is_some(),
            because,
        )?;
    }
    if calibration.covariance.is_some() {
        required(
            "calibration_u_k",
            out.calibration_u_k.is_some(),
            "the calibration has a covariance",
        )?;
    }
    if has_counts {
        required(
            "model_max_error_k",
            out.model_max_error_k.is_some(),
            "the record has [counts]",
        )?;
    }
    Ok(out)
}

//! Demo: a thermographic survey of a fictional plant, corrected target by target.
//!
//! EVERYTHING HERE IS INVENTED: the plant ("Larkspur Valley Paper Mill"), the instrument
//! (an 8-14 um microbolometer survey imager with a made-up spectral response), the targets,
//! their emissivities and the apparent readings. No value is a measurement.
//!
//! For each target the imager reports an apparent (blackbody-equivalent) temperature in its
//! band. The demo corrects it with the measurement equation (emissivity, reflected apparent
//! temperature, an infrared window, humid air estimated from distance, air temperature and
//! relative humidity), and gives the GUM uncertainty budget of the result with a flag where
//! the answer cannot be trusted. The report fits 100 columns: one table line per target,
//! then a block per target with every input needed to reproduce its reading.
//! `tests/demo_report.rs` checks the width and the report's cautions.
//!
//! Run: `cargo run --release --example plant_survey`
//!
//! A reading from this library is not a safety clearance: energised switchgear, kilns and
//! steam lines are inspected under the site's permits, local codes and licensed practice.

use bandtemp::atmosphere::{humidity::Air, Path, PathTransmittance};
use bandtemp::band::{Band, SignalCurve, SpectralTable};
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::uncertainty::{surface_budget, InputUncertainties, SURFACE_INPUT_NAMES};
use bandtemp::Error;
use core::fmt::Write as _;

/// Invented relative spectral response of the fictional survey imager (lens, filter and
/// microbolometer together), um -> relative response.
const RESPONSE_UM: [f64; 9] = [8.0, 8.5, 9.0, 10.0, 11.0, 12.0, 13.0, 13.5, 14.0];
const RESPONSE: [f64; 9] = [0.05, 0.55, 0.85, 1.0, 0.98, 0.92, 0.7, 0.35, 0.05];

const CELSIUS_OFFSET_K: f64 = 273.15;

/// The infrared inspection window fitted to the switchgear panels (invented values).
struct Window {
    transmittance: f64,
    reflectance: f64,
}

/// A humid air path, from what a thermographer knows on site.
struct AirPath {
    distance_m: f64,
    air_k: f64,
    relative_humidity: f64,
}

/// One survey target (all invented).
struct Target {
    name: &'static str,
    /// Energised electrical equipment (the report's caution names these targets).
    energised: bool,
    emissivity: f64,
    u_emissivity: f64,
    reflected_k: f64,
    u_reflected_k: f64,
    window: Option<Window>,
    air: Option<AirPath>,
    apparent_k: f64,
}

fn targets() -> [Target; 6] {
    [
        Target {
            name: "P-3 pump motor housing, painted",
            energised: false,
            emissivity: 0.92,
            u_emissivity: 0.02,
            reflected_k: 296.0,
            u_reflected_k: 2.0,
            window: None,
            air: Some(AirPath {
                distance_m: 3.0,
                air_k: 297.0,
                relative_humidity: 0.55,
            }),
            apparent_k: 326.4,
        },
        Target {
            name: "MCC-2 breaker lug, via IR window",
            energised: true,
            emissivity: 0.85,
            u_emissivity: 0.03,
            reflected_k: 299.0,
            u_reflected_k: 2.0,
            window: Some(Window {
                transmittance: 0.72,
                reflectance: 0.06,
            }),
            air: None,
            apparent_k: 318.7,
        },
        Target {
            name: "Bus-bar joint B7, bare copper",
            energised: true,
            emissivity: 0.12,
            u_emissivity: 0.04,
            reflected_k: 318.0,
            u_reflected_k: 4.0,
            window: Some(Window {
                transmittance: 0.72,
                reflectance: 0.06,
            }),
            air: None,
            apparent_k: 309.9,
        },
        Target {
            name: "Dryer steam line, aluminium clad",
            energised: false,
            emissivity: 0.10,
            u_emissivity: 0.03,
            reflected_k: 305.0,
            u_reflected_k: 3.0,
            window: None,
            air: Some(AirPath {
                distance_m: 6.0,
                air_k: 306.0,
                relative_humidity: 0.80,
            }),
            apparent_k: 309.5,
        },
        Target {
            name: "Lime kiln shell, across the yard",
            energised: false,
            emissivity: 0.88,
            u_emissivity: 0.03,
            reflected_k: 285.0,
            u_reflected_k: 10.0,
            window: None,
            air: Some(AirPath {
                distance_m: 60.0,
                air_k: 302.0,
                relative_humidity: 0.85,
            }),
            apparent_k: 508.0,
        },
        Target {
            name: "Cooling-water return pipe, taped",
            energised: false,
            emissivity: 0.95,
            u_emissivity: 0.02,
            reflected_k: 295.0,
            u_reflected_k: 2.0,
            window: None,
            air: Some(AirPath {
                distance_m: 2.0,
                air_k: 295.0,
                relative_humidity: 0.60,
            }),
            apparent_k: 306.1,
        },
    ]
}

/// The survey's trust rule (our own choice, not a standard): a result is UNSURE when its
/// expanded uncertainty (k = 2) exceeds 5 K, CHECK when one input carries over 80 % of the
/// variance, OK otherwise; REFUSED when no temperature can be given.
const FLAG_EXPANDED_K: f64 = 5.0;
const FLAG_DOMINANT_SHARE: f64 = 0.8;

/// Assumed instrument uncertainties (standard, k = 1; invented instrument figures): noise
/// equivalent temperature difference and calibration of the temperature scale.
const NETD_K: f64 = 0.05;
const CALIBRATION_K: f64 = 1.0;
/// Assumed standard uncertainties of the path and window inputs.
const U_ATM_TRANSMITTANCE: f64 = 0.01;
const U_ATM_K: f64 = 1.0;
const U_WINDOW_TRANSMITTANCE: f64 = 0.02;
const U_WINDOW_REFLECTANCE: f64 = 0.01;
const U_WINDOW_K: f64 = 2.0;
/// Air pressure assumed for every path, hPa.
const PRESSURE_HPA: f64 = 1013.25;
/// Paths at least this long get the continuum model's upper-bound caveat.
const LONG_PATH_M: f64 = 20.0;

/// Width of the report, characters.
pub const REPORT_COLUMNS: usize = 100;

struct Row {
    object_k: f64,
    expanded_k: f64,
    top_input: &'static str,
    top_share: f64,
    atm_transmittance: Option<f64>,
}

fn correct(band: &Band<'_>, target: &Target) -> Result<Row, Error> {
    let mut scene = Scene::new(target.emissivity, target.reflected_k)?;
    let mut atm_transmittance = None;
    if let Some(path) = &target.air {
        // Band transmittance of the humid path, weighted by the object's own spectrum: it
        // depends (weakly) on the object temperature, so take it at the apparent one and
        // iterate once at the corrected one.
        let air = Air::new(path.air_k, path.relative_humidity, PRESSURE_HPA)?;
        let model = PathTransmittance::Continuum(Path::new(air, path.distance_m)?);
        let first_guess = model.band_transmittance(band, target.apparent_k)?;
        let first = scene.with_atmosphere(first_guess, path.air_k)?;
        let object_k = first.object_temperature(band, band.signal(target.apparent_k)?)?;
        let transmittance = model.band_transmittance(band, object_k)?;
        scene = scene.with_atmosphere(transmittance, path.air_k)?;
        atm_transmittance = Some(transmittance);
    }
    if let Some(window) = &target.window {
        // The window sits at panel temperature and reflects the room behind the camera.
        scene = scene.with_window(
            window.transmittance,
            window.reflectance,
            target.reflected_k,
            target.reflected_k,
        )?;
    }
    let sensor_signal = band.signal(target.apparent_k)?;
    let with_air = |u: f64| if target.air.is_some() { u } else { 0.0 };
    let with_window = |u: f64| if target.window.is_some() { u } else { 0.0 };
    let uncertainties = InputUncertainties {
        // The NETD expressed in signal units at the reading.
        signal: NETD_K * band.radiance_derivative(target.apparent_k)?,
        calibration_k: CALIBRATION_K,
        emissivity: target.u_emissivity,
        reflected_k: target.u_reflected_k,
        atm_transmittance: with_air(U_ATM_TRANSMITTANCE),
        atm_k: with_air(U_ATM_K),
        window_transmittance: with_window(U_WINDOW_TRANSMITTANCE),
        window_reflectance: with_window(U_WINDOW_REFLECTANCE),
        window_k: with_window(U_WINDOW_K),
        window_reflected_k: with_window(U_WINDOW_K),
        ..InputUncertainties::default()
    };
    let budget = surface_budget(&scene, band, sensor_signal, &uncertainties)?;
    let top = budget.entries().first().copied();
    Ok(Row {
        object_k: budget.estimate,
        expanded_k: budget.expanded_uncertainty(2.0)?,
        top_input: top.map_or("-", |c| {
            SURFACE_INPUT_NAMES.get(c.index).copied().unwrap_or("-")
        }),
        top_share: top.map_or(0.0, |c| c.variance_share),
        atm_transmittance,
    })
}

/// The flag of a corrected reading, by the survey's rule.
fn flag(row: &Row) -> &'static str {
    if row.expanded_k > FLAG_EXPANDED_K {
        "UNSURE"
    } else if row.top_share > FLAG_DOMINANT_SHARE {
        "CHECK"
    } else {
        "OK"
    }
}

/// A fraction as a percentage without decimals.
fn percent(fraction: f64) -> String {
    format!("{:.0} %", 100.0 * fraction)
}

/// The whole report, lines of at most [`REPORT_COLUMNS`] characters.
///
/// # Errors
/// Errors of the band (none for the built-in response) and of formatting.
pub fn report() -> Result<String, Error> {
    let response = SpectralTable::new(&RESPONSE_UM, &RESPONSE)?;
    let band = Band::with_response(8.0, 14.0, Detector::Energy, response)?;
    let targets = targets();
    let rows: Vec<Result<Row, Error>> = targets.iter().map(|t| correct(&band, t)).collect();
    let mut out = String::new();
    // Writing to a String cannot fail.
    let mut line = |text: String| {
        let _ = writeln!(out, "{text}");
    };

    line(
        "Larkspur Valley Paper Mill: quarterly thermographic survey. INVENTED DATA, not measured."
            .into(),
    );
    line("Instrument: survey imager (fictional), 8-14 um microbolometer, invented spectral response.".into());
    line(format!(
        "Assumed instrument uncertainties (standard, k = 1): noise {NETD_K} K (NETD), calibration \
         {CALIBRATION_K:.1} K."
    ));
    line(format!(
        "Air: continuum model (Roberts, Selby and Biberman 1976) at {PRESSURE_HPA} hPa, u(ta) \
         {U_ATM_TRANSMITTANCE}, u(Ta) {U_ATM_K:.0} K."
    ));
    line(format!(
        "Window: at panel temperature, reflecting the room; u(tw) {U_WINDOW_TRANSMITTANCE}, u(rw) \
         {U_WINDOW_REFLECTANCE}, u(Tw) {U_WINDOW_K:.0} K."
    ));
    line(String::new());
    line("Flags (this survey's own rule, not a standard); the first that applies:".into());
    line(
        "  REFUSED  no temperature: the signal is at or below what the surroundings alone give"
            .into(),
    );
    line(format!(
        "  UNSURE   U(k=2) above {FLAG_EXPANDED_K:.0} K: do not act on the reading"
    ));
    line(format!(
        "  CHECK    one input above {} of the variance: firm up that input before acting",
        percent(FLAG_DOMINANT_SHARE)
    ));
    line("  OK       none of these".into());
    line(String::new());
    line(format!(
        "{:>2} {:<34} {:>5} {:>8} {:>6} {:>6} {:>8} {:>7} {:>7}  {}",
        "#", "target", "e", "apparent", "air", "window", "object", "object", "U(k=2)", "flag"
    ));
    line(format!(
        "{:>2} {:<34} {:>5} {:>8} {:>6} {:>6} {:>8} {:>7} {:>7}",
        "", "", "", "K", "ta", "tw", "K", "degC", "K"
    ));
    for (i, (target, row)) in targets.iter().zip(&rows).enumerate() {
        let air = match row {
            Ok(Row {
                atm_transmittance: Some(ta),
                ..
            }) => format!("{ta:.3}"),
            _ if target.air.is_some() => "?".into(),
            _ => "-".into(),
        };
        let window = target
            .window
            .as_ref()
            .map_or("-".into(), |w| format!("{:.2}", w.transmittance));
        let (object, celsius, expanded, flagged) = match row {
            Ok(row) => (
                format!("{:.1}", row.object_k),
                format!("{:.1}", row.object_k - CELSIUS_OFFSET_K),
                format!("{:.1}", row.expanded_k),
                flag(row),
            ),
            Err(_) => ("-".into(), "-".into(), "-".into(), "REFUSED"),
        };
        line(format!(
            "{:>2} {:<34} {:>5.2} {:>8.1} {:>6} {:>6} {:>8} {:>7} {:>7}  {}",
            i + 1,
            target.name,
            target.emissivity,
            target.apparent_k,
            air,
            window,
            object,
            celsius,
            expanded,
            flagged
        ));
    }

    line(String::new());
    line(
        "Inputs of each reading (standard uncertainties in brackets), and what the result says:"
            .into(),
    );
    for (i, (target, row)) in targets.iter().zip(&rows).enumerate() {
        line(format!("{:>2} {}", i + 1, target.name));
        line(format!(
            "   emissivity {:.2} [{:.2}], reflected apparent temperature {:.1} K [{:.1} K]",
            target.emissivity, target.u_emissivity, target.reflected_k, target.u_reflected_k
        ));
        match &target.air {
            Some(path) => line(format!(
                "   air path {:.0} m at {:.1} K, relative humidity {}",
                path.distance_m,
                path.air_k,
                percent(path.relative_humidity)
            )),
            None => line("   air path: negligible (ta = 1)".into()),
        }
        match &target.window {
            Some(w) => line(format!(
                "   window tw {:.2}, rw {:.2}, at {:.1} K, reflecting {:.1} K",
                w.transmittance, w.reflectance, target.reflected_k, target.reflected_k
            )),
            None => line("   window: none".into()),
        }
        match row {
            Ok(row) => line(format!(
                "   largest input: {}, {} of the variance",
                row.top_input,
                percent(row.top_share)
            )),
            Err(Error::SignalBelowBackground) => {
                line(
                    "   REFUSED: the reading is at or below what reflections and the window".into(),
                );
                line(format!(
                    "   alone give (e {:.2} against {:.0} K surroundings). Next: apply tape or paint",
                    target.emissivity, target.reflected_k
                ));
                line(
                    "   of known emissivity beside the spot (at the next outage for energised"
                        .into(),
                );
                line(
                    "   gear) and measure again, or shield the spot from the hot surroundings."
                        .into(),
                );
            }
            Err(error) => line(format!("   REFUSED: {error}")),
        }
        if let Some(path) = target.air.as_ref().filter(|p| p.distance_m >= LONG_PATH_M) {
            line(format!(
                "   caution: over {:.0} m the continuum model's ta is an upper bound (it leaves",
                path.distance_m
            ));
            line(
                "   out water-vapour lines, CO2 and haze): the true ta is lower and the object"
                    .into(),
            );
            line(
                "   hotter than shown. For a firmer figure use a radiative-transfer table.".into(),
            );
        }
    }

    let energised: Vec<String> = targets
        .iter()
        .enumerate()
        .filter(|(_, t)| t.energised)
        .map(|(i, _)| (i + 1).to_string())
        .collect();
    line(String::new());
    line(format!(
        "CAUTION: targets {} are energised electrical equipment: inspected only by qualified",
        energised.join(" and ")
    ));
    line(
        "persons with the required protective equipment, under the site's permits, lock-out rules"
            .into(),
    );
    line(
        "and local codes. A temperature in this report is not a safety clearance. The steam line"
            .into(),
    );
    line("and the kiln are burn hazards: keep the site's distances and permits there too.".into());
    Ok(out)
}

fn main() -> Result<(), Error> {
    print!("{}", report()?);
    Ok(())
}

//! Demo: a thermographic survey of a fictional plant, corrected target by target.
//!
//! EVERYTHING HERE IS INVENTED: the plant ("Larkspur Valley Paper Mill"), the instrument
//! (an "LV-T8" 8-14 um microbolometer survey imager with a made-up spectral response), the
//! targets, their emissivities and the apparent readings. No value is a measurement.
//!
//! For each target the imager reports an apparent (blackbody-equivalent) temperature in its
//! band. The demo corrects it with the measurement equation (emissivity, reflected apparent
//! temperature, an infrared window, humid air estimated from distance, air temperature and
//! relative humidity), and gives the GUM uncertainty budget of the result with a flag where
//! the answer cannot be trusted.
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

/// Invented relative spectral response of the fictional LV-T8 imager (lens, filter and
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
            name: "P-3 pump motor housing (painted)",
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
            name: "Dryer steam line, aluminium cladding",
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
            name: "Cooling-water return pipe (taped)",
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

/// The survey's trust rule (our own choice, not a standard): flag a result whose expanded
/// uncertainty (k = 2) exceeds 5 K, or where one input carries over 80 % of the variance.
const FLAG_EXPANDED_K: f64 = 5.0;
const FLAG_DOMINANT_SHARE: f64 = 0.8;

struct Row {
    object_k: f64,
    expanded_k: f64,
    top_input: &'static str,
    top_share: f64,
    transmittance: f64,
}

fn correct(band: &Band<'_>, target: &Target) -> Result<Row, Error> {
    let mut scene = Scene::new(target.emissivity, target.reflected_k)?;
    let mut transmittance = 1.0;
    if let Some(path) = &target.air {
        // Band transmittance of the humid path, weighted by the object's own spectrum: it
        // depends (weakly) on the object temperature, so take it at the apparent one and
        // iterate once at the corrected one.
        let air = Air::new(path.air_k, path.relative_humidity, 1013.25)?;
        let model = PathTransmittance::Continuum(Path::new(air, path.distance_m)?);
        transmittance = model.band_transmittance(band, target.apparent_k)?;
        let first = scene.with_atmosphere(transmittance, path.air_k)?;
        let object_k = first.object_temperature(band, band.signal(target.apparent_k)?)?;
        transmittance = model.band_transmittance(band, object_k)?;
        scene = scene.with_atmosphere(transmittance, path.air_k)?;
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
    let uncertainties = InputUncertainties {
        // Imager noise (NETD) of 0.05 K expressed in signal units, and a calibration
        // uncertainty of 1 K (both invented instrument figures).
        signal: 0.05 * band.radiance_derivative(target.apparent_k)?,
        calibration_k: 1.0,
        emissivity: target.u_emissivity,
        reflected_k: target.u_reflected_k,
        atm_transmittance: if target.air.is_some() { 0.01 } else { 0.0 },
        atm_k: if target.air.is_some() { 1.0 } else { 0.0 },
        window_transmittance: if target.window.is_some() { 0.02 } else { 0.0 },
        window_reflectance: if target.window.is_some() { 0.01 } else { 0.0 },
        window_k: if target.window.is_some() { 2.0 } else { 0.0 },
        window_reflected_k: if target.window.is_some() { 2.0 } else { 0.0 },
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
        transmittance,
    })
}

fn main() -> Result<(), Error> {
    let response = SpectralTable::new(&RESPONSE_UM, &RESPONSE)?;
    let band = Band::with_response(8.0, 14.0, Detector::Energy, response)?;

    println!("Larkspur Valley Paper Mill: quarterly thermographic survey (INVENTED DATA)");
    println!("Instrument: LV-T8 survey imager (fictional), 8-14 um microbolometer\n");
    println!(
        "{:<38} {:>5} {:>9} {:>6} {:>9} {:>8} {:>8}  {:<30} flag",
        "target", "e", "apparent", "tau", "object", "object", "U(k=2)", "largest input (share)"
    );
    println!(
        "{:<38} {:>5} {:>9} {:>6} {:>9} {:>8} {:>8}",
        "", "", "K", "", "K", "degC", "K"
    );
    for target in &targets() {
        match correct(&band, target) {
            Ok(row) => {
                let flag = if row.expanded_k > FLAG_EXPANDED_K {
                    "CHECK: uncertainty too large to act on"
                } else if row.top_share > FLAG_DOMINANT_SHARE {
                    "check: one input dominates"
                } else {
                    "ok"
                };
                println!(
                    "{:<38} {:>5.2} {:>9.1} {:>6.3} {:>9.1} {:>8.1} {:>8.1}  {:<30} {}",
                    target.name,
                    target.emissivity,
                    target.apparent_k,
                    row.transmittance,
                    row.object_k,
                    row.object_k - CELSIUS_OFFSET_K,
                    row.expanded_k,
                    format!("{} ({:.0} %)", row.top_input, 100.0 * row.top_share),
                    flag
                );
            }
            Err(error) => println!(
                "{:<38} {:>5.2} {:>9.1} {:>6} {:>9} {:>8} {:>8}  {:<30} CANNOT RESOLVE: {}",
                target.name, target.emissivity, target.apparent_k, "-", "-", "-", "-", "-", error
            ),
        }
    }
    println!(
        "\nFlags are this survey's own rule: U(k=2) > {FLAG_EXPANDED_K} K, or one input above \
         {:.0} % of the variance.",
        100.0 * FLAG_DOMINANT_SHARE
    );
    println!(
        "A reading is not a safety clearance: follow the site's permits, local codes and \
         licensed practice."
    );
    Ok(())
}

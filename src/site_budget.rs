//! Uncertainty budgets (JCGM 100:2008, the GUM) of the site methods that produce a
//! scene's emissivity and reflected apparent temperature, so that their uncertainty flows
//! into the surface-temperature budget ([`crate::uncertainty::surface_budget`]).
//!
//! - ASTM E1933 contact method: e from the signal and a contact probe's temperature
//!   ([`contact_emissivity_budget`]).
//! - ASTM E1933 reference-coating method: e from a coating (tape, paint) of known
//!   emissivity beside the spot ([`coating_emissivity_budget`]).
//! - ASTM E1862 reflector method: Tr from a diffuse reflector at the target
//!   ([`reflector_budget`]); the bias of taking the reflector as ideal
//!   ([`reflector_bias_k`]).
//! - ASTM E1862 direct method: Tr as the apparent temperature of the surroundings, read
//!   with emissivity 1 ([`direct_reflected_budget`]).
//!
//! Each budget is linear (first-order) propagation with the exact derivatives of the
//! closed forms of [`crate::scene::Scene`]'s site methods; inputs are taken as
//! uncorrelated. [`apply_site_budgets`] carries the results into the surface budget's
//! inputs; [`contact_reflected_correlation`] gives the correlation that the shared Tr
//! creates between the contact-method emissivity and Tr, for a correlated surface budget.
//!
//! Check values (8-14 um, recomputed with mpmath in `tools/refgen/site_refs.py`): contact
//! probe at 80 C, reflected 20 C, e = 0.85: de/dTc = -0.01738 1/K, de/dTr = -0.00193 1/K;
//! with u(Tc) = 0.5 K, u(Tr) = 2 K, u(S)/S = 0.5 %: u(e) = 0.0126. Foil at 20 C, true
//! reflected 10 C, foil emissivity 0.03 / 0.05 / 0.10 taken as 0: 10.315 / 10.525 /
//! 11.047 C.
//!
//! Caution: emissivity work on live electrical equipment or hot process plant needs the
//! usual permits and protective equipment; a contact probe on an energised part is a
//! hazard in itself. Defer to local codes and licensed practice.

use crate::band::SignalCurve;
use crate::error::{check_temperature_k, finite, Error, Result};
use crate::scene::Scene;
use crate::uncertainty::{combine, Budget, Input, InputUncertainties};

/// Labels of the contact-method inputs, in input order.
pub const CONTACT_INPUT_NAMES: [&str; 3] =
    ["signal", "reference temperature", "reflected temperature"];
/// Labels of the reference-coating inputs, in input order.
pub const COATING_INPUT_NAMES: [&str; 4] = [
    "surface signal",
    "coating signal",
    "coating emissivity",
    "reflected temperature",
];
/// Labels of the reflector-method inputs, in input order.
pub const REFLECTOR_INPUT_NAMES: [&str; 3] = [
    "reflector signal",
    "reflector emissivity",
    "reflector temperature",
];
/// Labels of the direct-method inputs, in input order.
pub const DIRECT_INPUT_NAMES: [&str; 3] = ["signal", "calibration (K)", "surroundings spread"];

fn check_u(values: &[f64]) -> Result<()> {
    for &u in values {
        if finite(u)? < 0.0 {
            return Err(Error::UncertaintyNegative);
        }
    }
    Ok(())
}

fn inputs<const N: usize>(
    names: [&'static str; N],
    u: [f64; N],
    c: [f64; N],
) -> Result<[Input; N]> {
    let mut out = [Input::new("", 0.0, 0.0); N];
    for (((slot, name), u), c) in out.iter_mut().zip(names).zip(u).zip(c) {
        *slot = Input::new(name, u, finite(c)?);
    }
    Ok(out)
}

/// Uncertainty budget of the emissivity from the ASTM E1933 contact method
/// ([`Scene::emissivity_from_reference`]): the estimate is e, the inputs (in the order of
/// [`CONTACT_INPUT_NAMES`]) are the sensor signal S (u in signal units), the probe's
/// reference temperature Tc (K) and the reflected apparent temperature Tr (K):
///
/// ```text
/// e = (S - W - g L(Tr)) / (g (L(Tc) - L(Tr))),   g = tw ta
/// de/dS  = 1 / (g (L(Tc) - L(Tr)))
/// de/dTc = -e L'(Tc) / (L(Tc) - L(Tr))
/// de/dTr = -(1 - e) L'(Tr) / (L(Tc) - L(Tr))
/// ```
///
/// The probe's uncertainty should include how far the probe reads below the surface
/// (contact resistance, stem conduction), often the largest term.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`], and those of
/// [`Scene::emissivity_from_reference`].
pub fn contact_emissivity_budget<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    sensor_signal: f64,
    reference_k: f64,
    u_signal: f64,
    u_reference_k: f64,
    u_reflected_k: f64,
) -> Result<Budget> {
    check_u(&[u_signal, u_reference_k, u_reflected_k])?;
    let e = scene.emissivity_from_reference(curve, sensor_signal, reference_k)?;
    let g = scene.window_transmittance() * scene.atm_transmittance();
    let (l_c, d_c) = curve.signal_and_derivative(reference_k)?;
    let (l_r, d_r) = curve.signal_and_derivative(scene.reflected_k())?;
    let difference = l_c - l_r;
    let c = [
        1.0 / (g * difference),
        -e * d_c / difference,
        -(1.0 - e) * d_r / difference,
    ];
    let list = inputs(
        CONTACT_INPUT_NAMES,
        [u_signal, u_reference_k, u_reflected_k],
        c,
    )?;
    combine(e, &list, None)
}

/// The correlation coefficient between the contact-method emissivity and the reflected
/// apparent temperature, when the same Tr (with standard uncertainty `u_reflected_k`)
/// enters both the contact method and the surface measurement: r = c_Tr u(Tr) / u(e),
/// with c_Tr the budget's Tr sensitivity. Use it as the (emissivity, reflected
/// temperature) entry of the surface budget's correlation matrix. 0 when u(e) = 0.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`].
pub fn contact_reflected_correlation(contact: &Budget, u_reflected_k: f64) -> Result<f64> {
    check_u(&[u_reflected_k])?;
    let uc = contact.combined_standard_uncertainty;
    let line = contact.entries().iter().find(|line| line.index == 2);
    match line {
        Some(line) if uc > 0.0 => finite(line.sensitivity * u_reflected_k / uc),
        _ => Ok(0.0),
    }
}

/// Uncertainty budget of the emissivity from the ASTM E1933 reference-coating method
/// ([`Scene::emissivity_from_reference_coating`]): the coating's signal Sc, read with its
/// emissivity ec, gives the common temperature T; the surface's signal S at T gives e.
/// Inputs in the order of [`COATING_INPUT_NAMES`]: S and Sc (signal units), ec, Tr (K).
///
/// ```text
/// coating:  Sc = W + g (ec L(T) + (1-ec) L(Tr))
///   dT/dSc = 1 / (g ec L'(T)),  dT/dec = -(L(T) - L(Tr)) / (ec L'(T)),
///   dT/dTr = -(1-ec) L'(Tr) / (ec L'(T))
/// surface:  de/dS = 1 / (g (L(T) - L(Tr))),  de/dT = -e L'(T) / (L(T) - L(Tr)),
///   de/dTr|T = -(1-e) L'(Tr) / (L(T) - L(Tr))
/// chain:    c_Sc = de/dT dT/dSc,  c_ec = de/dT dT/dec,  c_Tr = de/dTr|T + de/dT dT/dTr
/// ```
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`], those of
/// [`Scene::emissivity_from_reference_coating`].
pub fn coating_emissivity_budget<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    surface_signal: f64,
    coating_signal: f64,
    coating_emissivity: f64,
    uncertainties: [f64; 4],
) -> Result<Budget> {
    check_u(&uncertainties)?;
    let found = scene.emissivity_from_reference_coating(
        curve,
        surface_signal,
        coating_signal,
        coating_emissivity,
    )?;
    let e = found.emissivity;
    let ec = coating_emissivity;
    let g = scene.window_transmittance() * scene.atm_transmittance();
    let (l_t, d_t) = curve.signal_and_derivative(found.temperature_k)?;
    let (l_r, d_r) = curve.signal_and_derivative(scene.reflected_k())?;
    let difference = l_t - l_r;
    let de_dt = -e * d_t / difference;
    let dt_dsc = 1.0 / (g * ec * d_t);
    let dt_dec = -difference / (ec * d_t);
    let dt_dtr = -(1.0 - ec) * d_r / (ec * d_t);
    let c = [
        1.0 / (g * difference),
        de_dt * dt_dsc,
        de_dt * dt_dec,
        -(1.0 - e) * d_r / difference + de_dt * dt_dtr,
    ];
    let list = inputs(COATING_INPUT_NAMES, uncertainties, c)?;
    combine(e, &list, None)
}

/// Uncertainty budget of the reflected apparent temperature from the ASTM E1862 reflector
/// method ([`Scene::reflected_k_from_reflector`]). Inputs in the order of
/// [`REFLECTOR_INPUT_NAMES`]: the reflector's signal Sf (signal units), its emissivity ef
/// and its temperature Tf (K). Estimate Tr, K:
///
/// ```text
/// L(Tr) = ((Sf - W)/g - ef L(Tf)) / (1 - ef)
/// dTr/dSf = 1 / (g (1-ef) L'(Tr)),   dTr/def = (L(Tr) - L(Tf)) / ((1-ef) L'(Tr)),
/// dTr/dTf = -ef L'(Tf) / ((1-ef) L'(Tr))
/// ```
///
/// Taking a real reflector as ideal (ef = 0) is a bias, not an uncertainty: correct it
/// with the reflector's emissivity, or see [`reflector_bias_k`] for its size.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`], those of
/// [`Scene::reflected_k_from_reflector`].
pub fn reflector_budget<C: SignalCurve + ?Sized>(
    scene: &Scene,
    curve: &C,
    reflector_signal: f64,
    reflector_emissivity: f64,
    reflector_k: f64,
    uncertainties: [f64; 3],
) -> Result<Budget> {
    check_u(&uncertainties)?;
    let tr = scene.reflected_k_from_reflector(
        curve,
        reflector_signal,
        reflector_emissivity,
        reflector_k,
    )?;
    let ef = reflector_emissivity;
    let g = scene.window_transmittance() * scene.atm_transmittance();
    let (l_r, d_r) = curve.signal_and_derivative(tr)?;
    let (l_f, d_f) = curve.signal_and_derivative(reflector_k)?;
    let scale = (1.0 - ef) * d_r;
    let c = [1.0 / (g * scale), (l_r - l_f) / scale, -ef * d_f / scale];
    let list = inputs(REFLECTOR_INPUT_NAMES, uncertainties, c)?;
    combine(tr, &list, None)
}

/// The error, K, of the reflector method when a reflector of emissivity
/// `reflector_emissivity` at `reflector_k` is taken as ideal (ef = 0), for a true
/// reflected apparent temperature `reflected_k`: the reflector reads
/// L^-1(ef L(Tf) + (1-ef) L(Tr)) instead of Tr (no path or window; they cancel to first
/// order). Positive when the reflector is warmer than Tr.
///
/// # Errors
/// [`Error::NonFinite`], [`Error::TemperatureNotPositive`],
/// [`Error::ReflectorEmissivityOutOfRange`] outside [0, 1), errors of `curve`.
pub fn reflector_bias_k<C: SignalCurve + ?Sized>(
    curve: &C,
    reflected_k: f64,
    reflector_emissivity: f64,
    reflector_k: f64,
) -> Result<f64> {
    let tr = check_temperature_k(reflected_k)?;
    let tf = check_temperature_k(reflector_k)?;
    let ef = finite(reflector_emissivity)?;
    if !(0.0..1.0).contains(&ef) {
        return Err(Error::ReflectorEmissivityOutOfRange);
    }
    let reading = ef * curve.signal(tf)? + (1.0 - ef) * curve.signal(tr)?;
    finite(curve.temperature(reading)? - tr)
}

/// Uncertainty budget of the reflected apparent temperature from the ASTM E1862 direct
/// method: the instrument, set to emissivity 1 (no path correction), reads the
/// surroundings the target sees, from the target's position and facing its mirror
/// direction; Tr = L^-1(S). Inputs in the order of [`DIRECT_INPUT_NAMES`]: signal noise
/// (signal units; c = 1/L'(Tr)), calibration as a temperature (K; c = 1), and the spread
/// of the surroundings' apparent temperatures over the directions that matter (K, a
/// standard deviation; c = 1).
///
/// # Errors
/// [`Error::NonFinite`], [`Error::UncertaintyNegative`], errors of `curve`'s inversion.
pub fn direct_reflected_budget<C: SignalCurve + ?Sized>(
    curve: &C,
    signal: f64,
    uncertainties: [f64; 3],
) -> Result<Budget> {
    check_u(&uncertainties)?;
    let tr = curve.temperature(signal)?;
    let (_, slope) = curve.signal_and_derivative(tr)?;
    let list = inputs(DIRECT_INPUT_NAMES, uncertainties, [1.0 / slope, 1.0, 1.0])?;
    combine(tr, &list, None)
}

/// The surface budget's inputs with the emissivity and reflected-temperature
/// uncertainties replaced by the combined standard uncertainties of the site budgets
/// (`None` keeps the given value). The estimates themselves go into the
/// [`Scene`] (`Scene::with_emissivity`, `Scene::with_reflected_k`).
#[must_use]
pub fn apply_site_budgets(
    uncertainties: InputUncertainties,
    emissivity: Option<&Budget>,
    reflected: Option<&Budget>,
) -> InputUncertainties {
    let mut out = uncertainties;
    if let Some(budget) = emissivity {
        out.emissivity = budget.combined_standard_uncertainty;
    }
    if let Some(budget) = reflected {
        out.reflected_k = budget.combined_standard_uncertainty;
    }
    out
}

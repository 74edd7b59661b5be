//! The Wien closed form's predicted error for two narrow rectangular bands, derived
//! independently of the code under test (see the derivation in `bandtemp::ratio::WienRatio`):
//!
//! ```text
//! 1/T_W - 1/T = -(lambda_R / c2) [ ln((1 - e^-x2)/(1 - e^-x1)) + D1^2 h1/24 - D2^2 h2/24 ]
//! ```
//!
//! x_i = c2/(lambda_i T); h = f''/f for f = lambda^-n exp(-a/lambda), a = c2/T, n = 5
//! (energy) or 4 (photon): h = (n/lambda^2 - 2a/lambda^3) + (-n/lambda + a/lambda^2)^2.
//! The first term is exact for line bands (Planck = Wien / (1 - e^-x)); the second is the
//! midpoint-rule error of a band of width D, to order D^2.

/// c2 = h c / k in um K, CODATA 2018 (exact h, c, k), written out independently of the
/// crate's constant.
pub const C2_UMK: f64 = 14_387.768_775_039_34;

/// Parts of ln(rho_Planck / rho_Wien-line): (Wien's-law part, band-width part).
pub fn log_ratio_error(
    lambda1_um: f64,
    width1_um: f64,
    n1: f64,
    lambda2_um: f64,
    width2_um: f64,
    n2: f64,
    temperature_k: f64,
) -> (f64, f64) {
    let a = C2_UMK / temperature_k;
    let x1 = a / lambda1_um;
    let x2 = a / lambda2_um;
    let wien = ((1.0 - (-x2).exp()) / (1.0 - (-x1).exp())).ln();
    let h = |lambda: f64, n: f64| {
        let d1 = -n / lambda + a / (lambda * lambda);
        let d2 = n / (lambda * lambda) - 2.0 * a / (lambda * lambda * lambda);
        d2 + d1 * d1
    };
    let width = width1_um * width1_um * h(lambda1_um, n1) / 24.0
        - width2_um * width2_um * h(lambda2_um, n2) / 24.0;
    (wien, width)
}

/// Predicted T_W - T (K) and a bound on |T_W - T| (the sum of the parts' sizes, with 10 %
/// for the neglected higher orders).
pub fn predicted_wien_error_k(
    lambda1_um: f64,
    width1_um: f64,
    n1: f64,
    lambda2_um: f64,
    width2_um: f64,
    n2: f64,
    temperature_k: f64,
) -> (f64, f64) {
    let (wien, width) = log_ratio_error(
        lambda1_um,
        width1_um,
        n1,
        lambda2_um,
        width2_um,
        n2,
        temperature_k,
    );
    let lambda_r = lambda1_um * lambda2_um / (lambda2_um - lambda1_um);
    let inverse = 1.0 / temperature_k - lambda_r / C2_UMK * (wien + width);
    let predicted = 1.0 / inverse - temperature_k;
    let scale = temperature_k * temperature_k * lambda_r.abs() / C2_UMK;
    (predicted, 1.1 * scale * (wien.abs() + width.abs()))
}

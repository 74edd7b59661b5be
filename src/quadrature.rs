//! Fixed-order Gauss-Legendre quadrature on panels, shared by the optics and material
//! modules (no allocation, no adaptivity: callers choose panels where the integrand is
//! smooth).

/// Positive nodes and weights of the 10-point Gauss-Legendre rule on [-1, 1] (computed
/// with mpmath at 30 digits, rounded to 20; exact for polynomials of degree 19). The
/// digits beyond double precision are kept as printed so the table can be checked.
#[allow(clippy::excessive_precision)]
const GL10: [(f64, f64); 5] = [
    (0.973_906_528_517_171_72, 0.066_671_344_308_688_138),
    (0.865_063_366_688_984_51, 0.149_451_349_150_580_59),
    (0.679_409_568_299_024_41, 0.219_086_362_515_982_04),
    (0.433_395_394_129_247_19, 0.269_266_719_309_996_36),
    (0.148_874_338_981_631_21, 0.295_524_224_714_752_87),
];

/// Integral of `f` over [a, b] by the 10-point Gauss-Legendre rule.
pub(crate) fn gauss10<F: FnMut(f64) -> f64>(a: f64, b: f64, mut f: F) -> f64 {
    let half = 0.5 * (b - a);
    let mid = 0.5 * (a + b);
    let mut sum = 0.0;
    for (x, w) in GL10 {
        sum += w * (f(mid - half * x) + f(mid + half * x));
    }
    sum * half
}

#[cfg(test)]
mod tests {
    use super::gauss10;

    #[test]
    fn exact_for_degree_19_and_close_for_smooth_functions() {
        // integral of x^19 over [0, 1] = 1/20; of cos over [0, pi/2] = 1.
        let p = gauss10(0.0, 1.0, |x| libm::pow(x, 19.0));
        assert!((p - 0.05).abs() < 1e-15, "{p}");
        let c = gauss10(0.0, core::f64::consts::FRAC_PI_2, libm::cos);
        assert!((c - 1.0).abs() < 1e-15, "{c}");
    }
}

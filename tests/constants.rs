//! The crate's constants against CODATA 2018 (Tiesinga et al., "CODATA recommended values
//! of the fundamental physical constants: 2018", Rev. Mod. Phys. 93, 025010 (2021); NIST
//! SP 961 wallet card). h, c, k are exact since the SI redefinition of 2019 (BIPM, The
//! International System of Units, 9th edition, 2019, Table 1).

mod common;

use bandtemp::constants::{
    BOLTZMANN_J_K, C1L_UM, C1L_W_M2_SR, C1P_UM, C2_UMK, PLANCK_J_S, SPEED_OF_LIGHT_M_S,
    STEFAN_BOLTZMANN_W_M2_K4, WIEN_B_UMK, WIEN_X_ENERGY, WIEN_X_PHOTON, ZETA_3,
};
use common::{assert_close, tol};

#[test]
fn defining_constants_are_the_exact_si_values() {
    // SI Brochure 9th ed. Table 1 / CODATA 2018: exact by definition.
    assert_eq!(PLANCK_J_S, 6.626_070_15e-34, "h, CODATA 2018 (exact)");
    assert_eq!(SPEED_OF_LIGHT_M_S, 299_792_458.0, "c, CODATA 2018 (exact)");
    assert_eq!(BOLTZMANN_J_K, 1.380_649e-23, "k, CODATA 2018 (exact)");
}

#[test]
fn radiation_constants_match_codata_2018() {
    // CODATA 2018 "first radiation constant for spectral radiance" c1L = 2hc^2
    // = 1.191 042 972... e-16 W m^2 sr^-1 (exact); digits to 17 places from mpmath on the
    // exact h, c.
    assert_close(
        "c1L (CODATA 2018)",
        C1L_W_M2_SR,
        1.191_042_972_397_188_4e-16,
        tol::CONSTANT_REL,
        0.0,
    );
    assert_close(
        "c1L in um units",
        C1L_UM,
        1.191_042_972_397_188_4e8,
        tol::CONSTANT_REL,
        0.0,
    );
    // CODATA 2018 "second radiation constant" c2 = hc/k = 1.438 776 877... e-2 m K (exact);
    // 14 387.768 775 039 338 um K from mpmath on the exact h, c, k.
    assert_close(
        "c2 (CODATA 2018)",
        C2_UMK,
        14_387.768_775_039_338,
        tol::CONSTANT_REL,
        0.0,
    );
    // Photon first radiation constant 2c (exact), in um units.
    assert_close("c1p = 2c", C1P_UM, 5.995_849_16e26, tol::CONSTANT_REL, 0.0);
}

#[test]
fn stefan_boltzmann_constant_matches_codata_2018() {
    // CODATA 2018: sigma = 5.670 374 419... e-8 W m^-2 K^-4 (exact; printed to 10 digits).
    assert_close(
        "sigma (CODATA 2018)",
        STEFAN_BOLTZMANN_W_M2_K4,
        5.670_374_419e-8,
        tol::CODATA_10_DIGITS_REL,
        0.0,
    );
    // Its 17-digit value from mpmath, 2 pi^5 k^4 / (15 h^3 c^2) with the exact constants:
    // 5.670374419184429453970996...e-8.
    assert_close(
        "sigma (mpmath, exact constants)",
        STEFAN_BOLTZMANN_W_M2_K4,
        5.670_374_419_184_429_5e-8,
        tol::CONSTANT_REL,
        0.0,
    );
}

#[test]
fn wien_constant_matches_codata_2018() {
    // CODATA 2018 Wien wavelength displacement law constant b = 2.897 771 955 e-3 m K.
    assert_close(
        "Wien b (CODATA 2018), um K",
        WIEN_B_UMK,
        2.897_771_955e3,
        tol::CODATA_10_DIGITS_REL,
        0.0,
    );
    // The roots behind it: x5 = 5 + W0(-5 e^-5) and x4 = 4 + W0(-4 e^-4) (Lambert W,
    // mpmath: 4.965114231744276303698759..., 3.920690394872886343560891...). Independent
    // check here: each must satisfy x = p (1 - e^-x) to a few ulp.
    for (x, p) in [(WIEN_X_ENERGY, 5.0), (WIEN_X_PHOTON, 4.0)] {
        assert_close(
            "Wien root x = p (1 - e^-x)",
            x,
            p * -(-x).exp_m1(),
            tol::CONSTANT_REL,
            0.0,
        );
    }
    assert_close(
        "x5 (mpmath)",
        WIEN_X_ENERGY,
        4.965_114_231_744_276,
        tol::CONSTANT_REL,
        0.0,
    );
}

#[test]
fn apery_constant() {
    // zeta(3) = 1.202 056 903 159 594 285 399... (OEIS A002117).
    assert_close(
        "zeta(3)",
        ZETA_3,
        1.202_056_903_159_594_3,
        tol::CONSTANT_REL,
        0.0,
    );
}

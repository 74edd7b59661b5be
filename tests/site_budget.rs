//! Uncertainty budgets of the ASTM E1933 and E1862 site methods against mpmath
//! (`tests/data/site_*.csv`, `tools/refgen/site_refs.py`: estimates as explicit functions
//! of their inputs, sensitivities by mpmath.diff), and the printed check values.

mod common;

use bandtemp::band::Band;
use bandtemp::planck::Detector;
use bandtemp::scene::Scene;
use bandtemp::site_budget::{
    apply_site_budgets, coating_emissivity_budget, contact_emissivity_budget,
    contact_reflected_correlation, direct_reflected_budget, reflector_bias_k, reflector_budget,
};
use bandtemp::uncertainty::{surface_budget, Budget, InputUncertainties};
use bandtemp::Error;
use common::{assert_close, read_csv, Row};

/// Sensitivities: closed-form derivatives against mpmath.diff; both exact, the band
/// radiance and its derivative good to 1e-12 each, differences of L amplify by
/// L/(L(Tc) - L(Tr)) (up to 10 here).
const SENSITIVITY_REL: f64 = 1e-10;

fn lwir() -> Band<'static> {
    Band::rectangular(8.0, 14.0, Detector::Energy).unwrap()
}

fn scene(row: &Row, reflected_k: f64) -> Scene {
    Scene::new(0.5, reflected_k)
        .unwrap()
        .with_atmosphere(row.f64("ta"), row.f64("atm_k"))
        .unwrap()
        .with_window(
            row.f64("tw"),
            row.f64("rw"),
            row.f64("window_k"),
            row.f64("window_reflected_k"),
        )
        .unwrap()
}

fn sensitivity(budget: &Budget, index: usize) -> f64 {
    budget
        .entries()
        .iter()
        .find(|line| line.index == index)
        .unwrap()
        .sensitivity
}

#[test]
fn contact_method() {
    let band = lwir();
    for row in read_csv("site_contact.csv") {
        let s = scene(&row, row.f64("reflected_k"));
        let b = contact_emissivity_budget(
            &s,
            &band,
            row.f64("signal"),
            row.f64("reference_k"),
            row.f64("u_signal"),
            row.f64("u_reference_k"),
            row.f64("u_reflected_k"),
        )
        .unwrap();
        assert_close("e", b.estimate, row.f64("emissivity"), 1e-11, 0.0);
        for (i, column) in ["c_signal", "c_reference", "c_reflected"]
            .iter()
            .enumerate()
        {
            assert_close(
                column,
                sensitivity(&b, i),
                row.f64(column),
                SENSITIVITY_REL,
                0.0,
            );
        }
        assert_close(
            "u(e)",
            b.combined_standard_uncertainty,
            row.f64("u_e"),
            SENSITIVITY_REL,
            0.0,
        );
    }
}

#[test]
fn contact_method_printed_check_values() {
    // 8-14 um, probe at 80 C, reflected 20 C, e = 0.85, u(Tc) 0.5 K, u(Tr) 2 K, u(S)/S 0.5 %.
    let band = lwir();
    let scene = Scene::new(0.85, 293.15).unwrap();
    let l = |t: f64| band.radiance(t).unwrap();
    let signal = 0.85 * l(353.15) + 0.15 * l(293.15);
    let b =
        contact_emissivity_budget(&scene, &band, signal, 353.15, 0.005 * signal, 0.5, 2.0).unwrap();
    assert_close("e", b.estimate, 0.85, 1e-12, 0.0);
    assert_close("de/dTc", sensitivity(&b, 1), -0.01738, 0.0, 5e-6);
    assert_close("de/dTr", sensitivity(&b, 2), -0.00193, 0.0, 5e-6);
    assert_close("u(e)", b.combined_standard_uncertainty, 0.0126, 0.0, 5e-5);
    // The shared Tr correlates e and Tr negatively: r = c_Tr u(Tr) / u(e).
    let r = contact_reflected_correlation(&b, 2.0).unwrap();
    assert_close(
        "r(e, Tr)",
        r,
        sensitivity(&b, 2) * 2.0 / b.combined_standard_uncertainty,
        1e-15,
        0.0,
    );
    assert!(r < 0.0 && r > -1.0);
}

#[test]
fn coating_method() {
    let band = lwir();
    for row in read_csv("site_coating.csv") {
        let s = scene(&row, row.f64("reflected_k"));
        let u = [
            row.f64("u_surface"),
            row.f64("u_coating"),
            row.f64("u_coating_emissivity"),
            row.f64("u_reflected_k"),
        ];
        let b = coating_emissivity_budget(
            &s,
            &band,
            row.f64("surface_signal"),
            row.f64("coating_signal"),
            row.f64("coating_emissivity"),
            u,
        )
        .unwrap();
        assert_close("e", b.estimate, row.f64("emissivity"), 1e-10, 0.0);
        for (i, column) in [
            "c_surface",
            "c_coating",
            "c_coating_emissivity",
            "c_reflected",
        ]
        .iter()
        .enumerate()
        {
            assert_close(
                column,
                sensitivity(&b, i),
                row.f64(column),
                SENSITIVITY_REL,
                0.0,
            );
        }
        assert_close(
            "u(e)",
            b.combined_standard_uncertainty,
            row.f64("u_e"),
            SENSITIVITY_REL,
            0.0,
        );
    }
}

#[test]
fn reflector_method_and_bias() {
    let band = lwir();
    for row in read_csv("site_reflector.csv") {
        let s = scene(&row, 300.0);
        let u = [
            row.f64("u_signal"),
            row.f64("u_emissivity"),
            row.f64("u_reflector_k"),
        ];
        let b = reflector_budget(
            &s,
            &band,
            row.f64("reflector_signal"),
            row.f64("reflector_emissivity"),
            row.f64("reflector_k"),
            u,
        )
        .unwrap();
        assert_close("Tr", b.estimate, row.f64("true_reflected_k"), 1e-12, 0.0);
        for (i, column) in ["c_signal", "c_emissivity", "c_reflector_k"]
            .iter()
            .enumerate()
        {
            assert_close(
                column,
                sensitivity(&b, i),
                row.f64(column),
                SENSITIVITY_REL,
                0.0,
            );
        }
        assert_close(
            "u(Tr)",
            b.combined_standard_uncertainty,
            row.f64("u_tr"),
            SENSITIVITY_REL,
            0.0,
        );
    }
    for row in read_csv("site_reflector_bias.csv") {
        let bias = reflector_bias_k(
            &band,
            row.f64("reflected_k"),
            row.f64("reflector_emissivity"),
            row.f64("reflector_k"),
        )
        .unwrap();
        assert_close(
            "reading",
            row.f64("reflected_k") + bias - 273.15,
            row.f64("reading_c"),
            0.0,
            1e-9,
        );
    }
    // The printed figures: foil at 20 C, true Tr 10 C.
    for (ef, reading_c) in [(0.03, 10.315), (0.05, 10.525), (0.10, 11.047)] {
        let bias = reflector_bias_k(&band, 283.15, ef, 293.15).unwrap();
        assert_close("foil", 10.0 + bias, reading_c, 0.0, 5e-4);
    }
    assert_eq!(
        reflector_bias_k(&band, 283.15, 1.0, 293.15),
        Err(Error::ReflectorEmissivityOutOfRange)
    );
}

#[test]
fn direct_method_and_the_surface_budget() {
    let band = lwir();
    let signal = band.radiance(291.0).unwrap();
    let direct = direct_reflected_budget(&band, signal, [0.001 * signal, 0.5, 1.5]).unwrap();
    assert_close("Tr", direct.estimate, 291.0, 1e-12, 0.0);
    let slope = band.radiance_derivative(291.0).unwrap();
    let expected = ((0.001 * signal / slope).powi(2) + 0.25 + 2.25).sqrt();
    assert_close(
        "u(Tr)",
        direct.combined_standard_uncertainty,
        expected,
        1e-12,
        0.0,
    );

    // The site results feed the surface budget: its emissivity and Tr lines grow to
    // |c| u from the site budgets.
    let scene = Scene::new(0.85, 293.15).unwrap();
    let l = |t: f64| band.radiance(t).unwrap();
    let probe_signal = 0.85 * l(353.15) + 0.15 * l(293.15);
    let contact = contact_emissivity_budget(
        &scene,
        &band,
        probe_signal,
        353.15,
        0.005 * probe_signal,
        0.5,
        2.0,
    )
    .unwrap();
    let u = apply_site_budgets(InputUncertainties::default(), Some(&contact), Some(&direct));
    assert_eq!(u.emissivity, contact.combined_standard_uncertainty);
    assert_eq!(u.reflected_k, direct.combined_standard_uncertainty);
    let surface = surface_budget(&scene, &band, probe_signal, &u).unwrap();
    assert_close("surface T", surface.estimate, 353.15, 1e-10, 0.0);
    assert!(surface.combined_standard_uncertainty > 0.5, "{surface:?}");
    assert_eq!(
        contact_emissivity_budget(&scene, &band, probe_signal, 353.15, -1.0, 0.5, 2.0),
        Err(Error::UncertaintyNegative)
    );
}

//! `SpectralTable::value_at` at and between its nodes, including both ends (the segment
//! search is kept within the table by hand rather than by `Ord::clamp`, so the ends are
//! where a mistake would show). Expected values are linear interpolation worked by hand
//! from the nodes: v0 + (x - x0) / (x1 - x0) * (v1 - v0).

use bandtemp::band::SpectralTable;

#[test]
fn interpolates_at_nodes_between_them_and_at_both_ends() {
    let wavelengths_um = [1.0, 2.0, 4.0];
    let values = [0.0, 1.0, 0.5];
    let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
    // (wavelength, expected): nodes, the first node, the last node (upper end of the last
    // segment), midpoints worked by hand.
    let cases = [
        (1.0, 0.0),
        (1.5, 0.5),
        (2.0, 1.0),
        (3.0, 0.75),
        (3.5, 0.625),
        (4.0, 0.5),
    ];
    for (wavelength_um, expected) in cases {
        assert_eq!(
            table.value_at(wavelength_um),
            expected,
            "at {wavelength_um} um"
        );
    }
}

#[test]
fn two_point_table_and_outside() {
    let wavelengths_um = [8.0, 14.0];
    let values = [0.2, 0.8];
    let table = SpectralTable::new(&wavelengths_um, &values).unwrap();
    assert_eq!(table.value_at(8.0), 0.2);
    assert_eq!(table.value_at(14.0), 0.8);
    // 0.2 + (11 - 8) / 6 * 0.6 = 0.5 (to within one rounding of each step).
    assert!((table.value_at(11.0) - 0.5).abs() < 1e-15);
    // Zero outside the table and for NaN.
    for wavelength_um in [7.999, 14.001, 0.0, -1.0, f64::NAN, f64::INFINITY] {
        assert_eq!(table.value_at(wavelength_um), 0.0, "at {wavelength_um} um");
    }
}

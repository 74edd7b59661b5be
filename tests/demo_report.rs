//! The demo report (`examples/plant_survey.rs`, included here as a module) reads as a
//! thermographer needs it: it fits 100 columns, prints the inputs of every reading, one flag
//! vocabulary with its rule, a refusal that says what to do next, the long-path caveat, and
//! the caution for energised equipment; the fictional instrument has no model code.

#[allow(dead_code)]
#[path = "../examples/plant_survey.rs"]
mod plant_survey;

fn report() -> String {
    plant_survey::report().expect("the demo report")
}

#[test]
fn report_fits_100_columns() {
    let text = report();
    assert!(text.lines().count() > 40, "report too short:\n{text}");
    for line in text.lines() {
        assert!(
            line.chars().count() <= plant_survey::REPORT_COLUMNS,
            "line of {} characters: {line}",
            line.chars().count()
        );
    }
    assert_eq!(plant_survey::REPORT_COLUMNS, 100);
}

#[test]
fn one_flag_vocabulary_with_its_rule() {
    let text = report();
    let table: Vec<&str> = text
        .lines()
        .filter(|l| l.get(..3).is_some_and(|p| p.trim().parse::<u32>().is_ok()))
        .filter(|l| l.len() > 60)
        .collect();
    assert_eq!(table.len(), 6, "six table rows");
    for row in &table {
        let flag = row.split_whitespace().last().expect("a flag");
        assert!(
            ["OK", "CHECK", "UNSURE", "REFUSED"].contains(&flag),
            "unknown flag {flag} in {row}"
        );
    }
    for flag in ["REFUSED  ", "UNSURE   ", "CHECK    ", "OK       "] {
        assert!(
            text.contains(&format!("  {flag}")),
            "the rule for {flag} is printed"
        );
    }
}

#[test]
fn every_reading_carries_its_inputs() {
    let text = report();
    assert!(text.contains("noise 0.05 K (NETD), calibration 1.0 K"));
    assert_eq!(text.matches("reflected apparent temperature").count(), 6);
    assert!(text.contains("air path 60 m at 302.0 K, relative humidity 85 %"));
    assert!(text.contains("window tw 0.72, rw 0.06"));
    // Air and window transmittances are separate columns.
    assert!(text
        .lines()
        .any(|l| l.contains(" air ") && l.contains(" window ")));
    // Budget input names carry no nested parentheses.
    assert!(text.contains("largest input: calibration, temperature scale,"));
    assert!(!text.contains("((") && !text.contains("))"));
}

#[test]
fn refusal_says_what_to_do_next() {
    let text = report();
    assert!(text.contains("REFUSED: the reading is at or below"));
    assert!(text.contains("Next: apply tape or paint"));
}

#[test]
fn cautions_are_printed() {
    let text = report();
    assert!(text.contains("continuum model's ta is an upper bound"));
    assert!(text.contains("qualified\npersons with the required protective equipment"));
    assert!(text.contains("not a safety clearance"));
}

#[test]
fn instrument_has_a_plain_descriptive_name() {
    let text = report();
    let instrument = text
        .lines()
        .find(|l| l.starts_with("Instrument:"))
        .expect("an instrument line");
    // No letter-digit model code such as "XY-T8" or "T8".
    for word in instrument.split(|c: char| c.is_whitespace() || c == ',') {
        let letters = word.chars().any(|c| c.is_ascii_uppercase());
        let digits = word.chars().any(|c| c.is_ascii_digit());
        assert!(
            !(letters && digits),
            "model-code-like word {word:?} in {instrument}"
        );
    }
    assert!(instrument.contains("fictional"));
}

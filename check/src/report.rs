//! The three report formats: a compact text report for people, JSON for tools, JUnit XML
//! for CI systems that display test results.

use crate::run::{CheckResult, Outcome, Status};
use std::fmt::Write as _;

/// The compact human report of one record: a header, one line per check (status, title,
/// the worst case and where, the limit), and a count.
#[must_use]
pub fn text(outcome: &Outcome) -> String {
    let mut out = String::new();
    let serial = outcome
        .instrument
        .serial
        .as_deref()
        .map(|s| format!(", serial {s}"))
        .unwrap_or_default();
    let _ = writeln!(
        out,
        "{}: {}{serial}",
        outcome.source, outcome.instrument.name
    );
    if !outcome.calibration.is_empty() {
        let _ = writeln!(out, "  calibration: {}", outcome.calibration);
    }
    for check in &outcome.checks {
        let _ = writeln!(
            out,
            "  {:<5} {:<24} {}",
            check.status.label(),
            check.title,
            check.summary
        );
        if !check.limit.is_empty() {
            let _ = writeln!(out, "        {:<24} limit: {}", "", check.limit);
        }
    }
    let _ = writeln!(
        out,
        "  {} checks: {} passed, {} failed, {} errors",
        outcome.checks.len(),
        outcome.count(Status::Pass),
        outcome.count(Status::Fail),
        outcome.count(Status::Error)
    );
    out
}

/// A JSON string literal (RFC 8259 escapes).
fn json_string(text: &str) -> String {
    let mut out = String::with_capacity(text.len() + 2);
    out.push('"');
    for c in text.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if u32::from(c) < 0x20 => {
                let _ = write!(out, "\\u{:04x}", u32::from(c));
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// A JSON number, or `null` for a missing or non-finite value (JSON has no NaN).
fn json_number(value: Option<f64>) -> String {
    match value {
        // `{:?}` prints the shortest representation that reads back exactly, with a
        // decimal point or exponent: valid JSON for every finite double.
        Some(v) if v.is_finite() => format!("{v:?}"),
        _ => "null".to_owned(),
    }
}

fn json_check(check: &CheckResult) -> String {
    format!(
        "{{\"id\": {}, \"title\": {}, \"status\": {}, \"summary\": {}, \"limit\": {}, \"value_k\": {}, \"limit_k\": {}, \"where_k\": {}, \"seconds\": {}}}",
        json_string(check.id),
        json_string(check.title),
        json_string(&check.status.label().to_ascii_lowercase()),
        json_string(&check.summary),
        json_string(&check.limit),
        json_number(check.value_k),
        json_number(check.limit_k),
        json_number(check.where_k),
        json_number(Some(check.seconds)),
    )
}

/// The JSON report of several records:
/// `{"passed": bool, "records": [{"source", "instrument", "serial", "calibration",
/// "passed", "checks": [{"id", "title", "status", "summary", "limit", "value_k",
/// "limit_k", "where_k", "seconds"}]}]}`; `status` is "pass", "fail" or "error";
/// numbers are in K (seconds for `seconds`), `null` where a check has none.
#[must_use]
pub fn json(outcomes: &[Outcome]) -> String {
    let records: Vec<String> = outcomes
        .iter()
        .map(|o| {
            let checks: Vec<String> = o.checks.iter().map(|c| format!("      {}", json_check(c))).collect();
            format!(
                "    {{\"source\": {}, \"instrument\": {}, \"serial\": {}, \"calibration\": {}, \"passed\": {},\n     \"checks\": [\n{}\n     ]}}",
                json_string(&o.source),
                json_string(&o.instrument.name),
                o.instrument.serial.as_deref().map_or("null".to_owned(), json_string),
                json_string(&o.calibration),
                o.passed(),
                checks.join(",\n")
            )
        })
        .collect();
    format!(
        "{{\"passed\": {},\n  \"records\": [\n{}\n  ]\n}}\n",
        outcomes.iter().all(Outcome::passed),
        records.join(",\n")
    )
}

/// XML text with the five predefined entities escaped; characters XML 1.0 cannot carry
/// (controls other than tab and newline) become U+FFFD.
fn xml(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            '\t' | '\n' => out.push(c),
            c if u32::from(c) < 0x20 => out.push('\u{fffd}'),
            c => out.push(c),
        }
    }
    out
}

/// The JUnit XML report: one `<testsuite>` per record (named by its source), one
/// `<testcase>` per check; a broken tolerance is a `<failure>`, a check that could not be
/// computed an `<error>`, each with the summary and the limit as text. The form most CI
/// systems read (the Ant JUnit report's elements and attributes).
#[must_use]
pub fn junit(outcomes: &[Outcome]) -> String {
    let mut out = String::from("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    let tests: usize = outcomes.iter().map(|o| o.checks.len()).sum();
    let failures: usize = outcomes.iter().map(|o| o.count(Status::Fail)).sum();
    let errors: usize = outcomes.iter().map(|o| o.count(Status::Error)).sum();
    let _ = writeln!(
        out,
        "<testsuites name=\"bandtemp-check\" tests=\"{tests}\" failures=\"{failures}\" errors=\"{errors}\">"
    );
    for o in outcomes {
        let time: f64 = o.checks.iter().map(|c| c.seconds).sum();
        let _ = writeln!(
            out,
            "  <testsuite name=\"{}\" tests=\"{}\" failures=\"{}\" errors=\"{}\" skipped=\"0\" time=\"{time:.6}\">",
            xml(&o.source),
            o.checks.len(),
            o.count(Status::Fail),
            o.count(Status::Error)
        );
        let _ = writeln!(
            out,
            "    <properties><property name=\"instrument\" value=\"{}\"/><property name=\"calibration\" value=\"{}\"/></properties>",
            xml(&o.instrument.name),
            xml(&o.calibration)
        );
        for c in &o.checks {
            let _ = write!(
                out,
                "    <testcase classname=\"bandtemp-check.{}\" name=\"{}\" time=\"{:.6}\"",
                xml(&o.instrument.name),
                xml(c.title),
                c.seconds
            );
            let body = format!("{}\nlimit: {}", c.summary, c.limit);
            match c.status {
                Status::Pass => {
                    let _ = writeln!(out, "><system-out>{}</system-out></testcase>", xml(&body));
                }
                Status::Fail => {
                    let _ = writeln!(
                        out,
                        "><failure message=\"{}\" type=\"tolerance\">{}</failure></testcase>",
                        xml(&c.summary),
                        xml(&body)
                    );
                }
                Status::Error => {
                    let _ = writeln!(
                        out,
                        "><error message=\"{}\" type=\"error\">{}</error></testcase>",
                        xml(&c.summary),
                        xml(&body)
                    );
                }
            }
        }
        out.push_str("  </testsuite>\n");
    }
    out.push_str("</testsuites>\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn json_strings_escape_quotes_backslashes_and_controls() {
        // RFC 8259 section 7: quotation mark, reverse solidus and controls must be escaped.
        assert_eq!(json_string("a\"b\\c\nd\u{1}"), "\"a\\\"b\\\\c\\nd\\u0001\"");
    }

    #[test]
    fn json_numbers_are_null_when_not_finite() {
        assert_eq!(json_number(Some(f64::NAN)), "null");
        assert_eq!(json_number(None), "null");
        assert_eq!(json_number(Some(1e-300)), "1e-300");
        assert_eq!(json_number(Some(2.0)), "2.0");
    }

    #[test]
    fn xml_escapes_the_five_entities_and_drops_controls() {
        // XML 1.0 section 2.4 (markup characters) and 2.2 (allowed characters).
        assert_eq!(
            xml("<a & 'b'> \"c\"\u{7}"),
            "&lt;a &amp; &apos;b&apos;&gt; &quot;c&quot;\u{fffd}"
        );
    }
}

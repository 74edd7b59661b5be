//! Every reference file in `tests/data/` names the script that generated it in its first
//! lines, so that a reader can regenerate and audit it.

use std::path::Path;

#[test]
fn every_data_file_names_its_generator() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data");
    let mut checked = 0;
    for entry in std::fs::read_dir(&dir).expect("tests/data") {
        let path = entry.expect("a directory entry").path();
        if path.extension().is_some_and(|e| e == "py") {
            continue; // a generator kept beside its output is its own source
        }
        let text = std::fs::read_to_string(&path).expect("a text file");
        let head: Vec<&str> = text.lines().take(8).collect();
        let head = head.join("\n");
        let names_script = head
            .split(|c: char| c.is_whitespace() || matches!(c, '(' | ')' | ',' | ';' | '"'))
            .map(|word| word.trim_end_matches(['.', ':']))
            .any(|word| {
                Path::new(env!("CARGO_MANIFEST_DIR")).join(word).is_file()
                    && Path::new(word).extension().is_some_and(|e| e == "py")
            });
        assert!(
            names_script,
            "{} does not name its generator (an existing .py path) in its first lines",
            path.display()
        );
        checked += 1;
    }
    assert!(checked >= 19, "only {checked} files in tests/data");
}

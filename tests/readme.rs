//! The README cannot rot: its Rust blocks run as doc tests (`src/lib.rs`), and every C
//! block must stand verbatim in a C file under `capi/tests/c/` that `capi/tests/ffi_c.rs` compiles
//! and runs. Commands it names must exist.

use std::path::Path;

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// The fenced blocks of `text` with the given info string.
fn blocks<'a>(text: &'a str, info: &str) -> Vec<&'a str> {
    let fence = format!("```{info}\n");
    let mut found = Vec::new();
    let mut rest = text;
    while let Some(start) = rest.find(&fence) {
        let body = &rest[start + fence.len()..];
        let Some(end) = body.find("```") else { break };
        found.push(&body[..end]);
        rest = &body[end..];
    }
    found
}

#[test]
fn every_c_block_is_a_compiled_test_program() {
    let readme = std::fs::read_to_string(root().join("README.md")).expect("README.md");
    let c_files: Vec<String> = std::fs::read_dir(root().join("capi/tests/c"))
        .expect("capi/tests/c")
        .filter_map(|entry| {
            let path = entry.ok()?.path();
            (path.extension()? == "c").then(|| std::fs::read_to_string(path).ok())?
        })
        .collect();
    let c_blocks = blocks(&readme, "c");
    assert!(!c_blocks.is_empty(), "the README shows no C example");
    for block in c_blocks {
        assert!(
            c_files.iter().any(|file| file.contains(block)),
            "this README C block is not verbatim in any tests/c/*.c file:\n{block}"
        );
    }
}

#[test]
fn the_commands_the_readme_gives_exist() {
    let readme = std::fs::read_to_string(root().join("README.md")).expect("README.md");
    for (command, path) in [
        ("bash scripts/test.sh", "scripts/test.sh"),
        (
            "cargo run --release --example plant_survey",
            "examples/plant_survey.rs",
        ),
        ("capi/install.sh", "capi/install.sh"),
    ] {
        assert!(
            readme.contains(command),
            "README no longer says `{command}`"
        );
        assert!(root().join(path).is_file(), "`{command}` needs {path}");
    }
    let ci = std::fs::read_to_string(root().join(".ci/run")).expect(".ci/run");
    assert!(
        ci.contains("bash scripts/test.sh"),
        ".ci/run must run the README's test command"
    );
}

/// The README's install-and-link recipe is what `capi/tests/consumer/run.sh` runs (CI runs
/// that script), and its CMakeLists.txt is the consumer project's.
#[test]
fn the_c_install_recipe_is_the_one_ci_runs() {
    let readme = std::fs::read_to_string(root().join("README.md")).expect("README.md");
    let script = std::fs::read_to_string(root().join("capi/tests/consumer/run.sh"))
        .expect("capi/tests/consumer/run.sh");
    let begin = script
        .find("# README recipe begins\n")
        .expect("run.sh marks the recipe's beginning");
    let end = script
        .find("# README recipe ends")
        .expect("run.sh marks the recipe's end");
    let recipe = &script[begin + "# README recipe begins\n".len()..end];
    assert!(recipe.contains("capi/install.sh"), "the recipe installs");
    assert!(
        blocks(&readme, "sh").contains(&recipe),
        "the README has no sh block equal to run.sh's recipe:\n{recipe}"
    );
    let cmake = std::fs::read_to_string(root().join("capi/tests/consumer/CMakeLists.txt"))
        .expect("capi/tests/consumer/CMakeLists.txt");
    assert!(
        blocks(&readme, "cmake").contains(&cmake.as_str()),
        "the README's cmake block differs from capi/tests/consumer/CMakeLists.txt"
    );
}

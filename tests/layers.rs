//! Layering: no two modules of src/, at any level, import each other,
//! directly or around a loop (`tools/layers.sh`; `--top` lists the top-level
//! layers only).

use std::process::Command;

#[test]
fn no_module_imports_one_that_imports_it_back() {
    let root = env!("CARGO_MANIFEST_DIR");
    let out = Command::new("bash")
        .arg(format!("{root}/tools/layers.sh"))
        .output()
        .expect("bash runs tools/layers.sh");
    let text = String::from_utf8_lossy(&out.stdout);
    println!("{text}");
    assert!(out.status.success(), "import cycles:\n{text}\n{}", String::from_utf8_lossy(&out.stderr));
    assert!(text.contains("layer"), "the listing came out empty:\n{text}");
}

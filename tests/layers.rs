//! Layering: no two top-level modules of src/ import each other, directly or
//! around a loop (`tools/layers.sh --top`; run `tools/layers.sh` by hand for
//! every level).

use std::process::Command;

#[test]
fn top_level_modules_never_import_each_other() {
    let root = env!("CARGO_MANIFEST_DIR");
    let out = Command::new("bash")
        .arg(format!("{root}/tools/layers.sh"))
        .arg("--top")
        .output()
        .expect("bash runs tools/layers.sh");
    let text = String::from_utf8_lossy(&out.stdout);
    println!("{text}");
    assert!(out.status.success(), "import cycles between top-level modules:\n{text}\n{}", String::from_utf8_lossy(&out.stderr));
    assert!(text.contains("layer"), "the listing came out empty:\n{text}");
}

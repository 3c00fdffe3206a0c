//! Keeps the specs of the reference HDL units in `tests/hdl/specs` valid: every file must pass
//! the spec reader, carry its file name as `name`, point at a module that exists under
//! `tests/hdl`, and set the module's `W` parameter to the spec's width.

use std::fs;
use std::path::{Path, PathBuf};

use arithvec::{ParamValue, Spec};

fn hdl_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("hdl")
}

/// The source that defines `module`, if any (one module per file, named after it): Verilog,
/// or VHDL under `vhdl/` for a unit that exists only in VHDL.
fn module_source(module: &str) -> Option<PathBuf> {
    ["", "bugs", "behav"]
        .iter()
        .map(|sub| hdl_dir().join(sub).join(format!("{module}.v")))
        .chain([hdl_dir().join("vhdl").join(format!("{module}.vhd"))])
        .find(|p| p.is_file())
}

#[test]
fn every_hdl_spec_parses_and_names_an_existing_module() {
    let mut seen = 0;
    let mut entries: Vec<PathBuf> = fs::read_dir(hdl_dir().join("specs"))
        .expect("tests/hdl/specs exists")
        .map(|e| e.expect("directory entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    entries.sort();
    for path in entries {
        let text = fs::read_to_string(&path).expect("spec is readable");
        let file = path.display().to_string();
        let spec = match Spec::parse(&text, &file) {
            Ok(spec) => spec,
            Err(e) => panic!("{file} does not parse: {e}"),
        };
        let stem = path.file_stem().unwrap().to_string_lossy().to_string();
        assert_eq!(spec.name, stem, "{file}: name should match the file name");
        let dut = spec
            .dut
            .as_ref()
            .unwrap_or_else(|| panic!("{file}: no [dut] table"));
        let source = module_source(&dut.module)
            .unwrap_or_else(|| panic!("{file}: no source for module {}", dut.module));
        let verilog = fs::read_to_string(&source).expect("module source is readable");
        let declares = if source.extension().is_some_and(|x| x == "vhd") {
            format!("entity {} is", dut.module)
        } else {
            format!("module {} ", dut.module)
        };
        assert!(
            verilog.contains(&declares),
            "{}: does not define module {}",
            source.display(),
            dut.module
        );
        assert_eq!(
            dut.parameters.get("W"),
            Some(&ParamValue::Int(i64::from(spec.width))),
            "{file}: dut.parameters.W should equal width"
        );
        seen += 1;
    }
    // Six reference units, seven bug variants, seven behavioural models in two encodings, and
    // the offset-binary subtractor of the top-up tests, and the VHDL adder with numeric_std
    // ports.
    assert_eq!(
        seen,
        6 + 7 + 14 + 1 + 1,
        "number of spec files under tests/hdl/specs"
    );
}

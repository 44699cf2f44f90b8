//! Arbitrary bytes as an MPS file: a model that keeps the model invariants, or a typed error
//! naming the file and a line, never a panic.
#![no_main]

use kernstep::model::mps;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    match mps::read(&text, "fuzz.mps") {
        Ok(import) => {
            let m = &import.model;
            assert_eq!(m.rhs.len(), m.constraints());
            assert_eq!(m.variable_names.len(), m.variables());
            for (l, u) in m.lower.iter().zip(&m.upper) {
                if let (Some(l), Some(u)) = (l, u) {
                    assert!(l <= u);
                }
            }
        }
        Err(e) => assert!(e.to_string().starts_with("fuzz.mps: line "), "{e}"),
    }
});

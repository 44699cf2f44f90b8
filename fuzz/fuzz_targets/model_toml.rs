//! Arbitrary bytes as a TOML model file: a model or a typed error naming the file, never a
//! panic.
#![no_main]

use kernstep::model::{Model, ModelKind};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    if let Err(e) = Model::from_str(&text, ModelKind::Toml, "fuzz.toml") {
        assert!(e.to_string().starts_with("fuzz.toml: "), "{e}");
    }
});

//! Arbitrary bytes as a variants file (JSON Lines) applied to a small model: every line is a
//! variant or a typed error naming the file, never a panic.
#![no_main]

use std::sync::OnceLock;

use kernstep::model::{Model, ModelKind};
use kernstep::solve::parse_lines;
use libfuzzer_sys::fuzz_target;

fn model() -> &'static Model {
    static MODEL: OnceLock<Model> = OnceLock::new();
    MODEL.get_or_init(|| {
        let text = r#"{"matrix": [[1, 1, 0], [0, 1, 1]], "rhs": [3, 4], "cost": [1, 2, 3]}"#;
        Model::from_str(text, ModelKind::Json, "fuzz-model.json").expect("valid model")
    })
}

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    for (_, parsed) in parse_lines(&text, "fuzz.jsonl") {
        match parsed {
            Ok(variant) => {
                if let Err(e) = variant.apply(model(), "fuzz.jsonl") {
                    assert!(e.to_string().starts_with("fuzz.jsonl: "), "{e}");
                }
            }
            Err(e) => assert!(e.to_string().starts_with("fuzz.jsonl: line "), "{e}"),
        }
    }
});

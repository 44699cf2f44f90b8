//! Every parser on random and damaged input: model JSON and TOML, variants (JSON Lines), MPS
//! and cache files never panic and always answer with a typed error that names the file; and
//! values near the documented limits (`|a| <= 2^31 - 1` in the matrix, `2^62` elsewhere) give a
//! correct answer or an overflow error, never a panic or a wrong answer.

mod proptest_cases;
use proptest_cases::Class;

use std::path::Path;

use augment::{Coverage, Options, Status};
use cache::{
    BuildGuard, Completeness, EntryKey, SetKind, SetMetadata, Sign, Store, TestSetData, Truncation,
};
use kernstep::completion::{complete_kernel, Completion, Control, Request};
use kernstep::model::{mps, Model, ModelKind, MATRIX_ENTRY_LIMIT, VALUE_LIMIT};
use kernstep::solve::{parse_lines, Prepared, Verdict};
use kernstep::{Error, IntMatrix};
use proptest::prelude::*;
use proptest::sample::Index;

fn read(relative: &str) -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(relative)).unwrap()
}

/// One edit of a text: delete, insert or replace the character at a position.
#[derive(Clone, Debug)]
enum Edit {
    Delete(Index),
    Insert(Index, char),
    Replace(Index, char),
}

/// Characters that matter to the syntaxes, plus anything.
fn interesting_char() -> impl Strategy<Value = char> {
    prop_oneof![
        prop::sample::select(vec![
            '{', '}', '[', ']', '"', ',', ':', '=', '-', '.', 'e', '\n', ' ', '\t', '0', '9', '\'',
            '*', '#', '\\', 'n', '\u{0}', '\u{feff}',
        ]),
        any::<char>(),
    ]
}

fn edit() -> impl Strategy<Value = Edit> {
    prop_oneof![
        any::<Index>().prop_map(Edit::Delete),
        (any::<Index>(), interesting_char()).prop_map(|(i, c)| Edit::Insert(i, c)),
        (any::<Index>(), interesting_char()).prop_map(|(i, c)| Edit::Replace(i, c)),
    ]
}

fn apply_edits(text: &str, edits: &[Edit]) -> String {
    let mut chars: Vec<char> = text.chars().collect();
    for e in edits {
        match e {
            Edit::Delete(i) if !chars.is_empty() => {
                chars.remove(i.index(chars.len()));
            }
            Edit::Insert(i, c) => chars.insert(i.index(chars.len() + 1), *c),
            Edit::Replace(i, c) if !chars.is_empty() => {
                let at = i.index(chars.len());
                chars[at] = *c;
            }
            _ => {}
        }
    }
    chars.into_iter().collect()
}

/// Checks the invariants a parsed model promises.
fn assert_model_invariants(m: &Model) {
    assert_eq!(m.rhs.len(), m.constraints());
    for v in [&m.cost.len(), &m.lower.len(), &m.upper.len()] {
        assert_eq!(*v, m.variables());
    }
    assert_eq!(m.variable_names.len(), m.variables());
    assert_eq!(m.row_names.len(), m.constraints());
    for (l, u) in m.lower.iter().zip(&m.upper) {
        if let (Some(l), Some(u)) = (l, u) {
            assert!(l <= u);
        }
    }
    for i in 0..m.constraints() {
        for j in 0..m.variables() {
            assert!(i128::from(m.matrix.get(i, j)).abs() <= MATRIX_ENTRY_LIMIT);
        }
    }
    assert!(m.rhs.iter().all(|b| i128::from(*b).abs() <= VALUE_LIMIT));
}

/// A model parse result: the model keeps its invariants, an error is an input error naming
/// `origin`.
fn check_model(parsed: Result<Model, Error>, origin: &str) {
    match parsed {
        Ok(m) => assert_model_invariants(&m),
        Err(e @ Error::Input { .. }) => {
            assert!(e.to_string().starts_with(&format!("{origin}: ")), "{e}");
        }
        Err(other) => panic!("not an input error: {other}"),
    }
}

/// Numbers that probe the limits and the integer syntax.
fn number_text() -> impl Strategy<Value = String> {
    prop_oneof![
        (-5i64..=5).prop_map(|v| v.to_string()),
        prop::sample::select(vec![
            "2147483648",
            "-2147483648",
            "2147483649",
            "4611686018427387904",
            "4611686018427387905",
            "-4611686018427387905",
            "9223372036854775807",
            "18446744073709551616",
            "1e400",
            "2.0",
            "1.5",
            "-0",
            "1e2",
        ])
        .prop_map(str::to_string),
        any::<i64>().prop_map(|v| v.to_string()),
    ]
}

/// A JSON value shaped like a model field: numbers near the limits, bounds, strings, nesting.
fn json_value() -> impl Strategy<Value = String> {
    let leaf = prop_oneof![
        number_text(),
        prop::sample::select(vec!["null", "true", "\"inf\"", "\"-inf\"", "\"x\"", "{}"])
            .prop_map(str::to_string),
    ];
    leaf.prop_recursive(3, 24, 4, |inner| {
        prop::collection::vec(inner, 0..4).prop_map(|items| format!("[{}]", items.join(", ")))
    })
}

fn json_model() -> impl Strategy<Value = String> {
    let key = prop::sample::select(vec![
        "matrix", "rhs", "cost", "lower", "upper", "names", "extra",
    ]);
    prop::collection::vec((key, json_value()), 0..7).prop_map(|fields| {
        let body: Vec<String> = fields
            .iter()
            .map(|(k, v)| format!("\"{k}\": {v}"))
            .collect();
        format!("{{{}}}", body.join(", "))
    })
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::RandomText))]

    #[test]
    fn model_json_from_random_text(text in ".{0,200}") {
        check_model(Model::from_str(&text, ModelKind::Json, "p.json"), "p.json");
    }

    #[test]
    fn model_toml_from_random_text(text in ".{0,200}") {
        check_model(Model::from_str(&text, ModelKind::Toml, "p.toml"), "p.toml");
    }

    #[test]
    fn model_json_from_model_shaped_values(text in json_model()) {
        check_model(Model::from_str(&text, ModelKind::Json, "p.json"), "p.json");
    }

    #[test]
    fn model_files_with_edits(
        edits in prop::collection::vec(edit(), 1..6),
        which in 0usize..4,
    ) {
        let (file, kind) = [
            ("examples/transport_3x3.json", ModelKind::Json),
            ("examples/twisted_cubic.json", ModelKind::Json),
            ("examples/lane_plan.toml", ModelKind::Toml),
            ("examples/feed_blend.toml", ModelKind::Toml),
        ][which];
        let text = apply_edits(&read(file), &edits);
        check_model(Model::from_str(&text, kind, file), file);
    }

    #[test]
    fn mps_fixtures_with_edits(edits in prop::collection::vec(edit(), 1..6), which in 0usize..5) {
        let file = [
            "bakery_shifts.mps",
            "ferry_loading.mps",
            "kiln_schedule.mps",
            "orchard_crates.mps",
            "seed_mix.mps",
        ][which];
        let text = apply_edits(&read(&format!("tests/fixtures/mps/{file}")), &edits);
        check_mps(&text);
    }
}

fn check_mps(text: &str) {
    match mps::read(text, "m.mps") {
        Ok(import) => {
            assert_model_invariants(&import.model);
            assert_eq!(import.row_scales.len(), import.model.constraints());
            assert!(import.file_columns <= import.model.variables());
        }
        Err(e @ Error::Input { .. }) => {
            assert!(e.to_string().starts_with("m.mps: line "), "{e}");
        }
        Err(other) => panic!("not an input error: {other}"),
    }
}

/// MPS lines built from the format's own words, so that the reader gets past the first line.
fn mps_line() -> impl Strategy<Value = String> {
    let word = prop::sample::select(vec![
        "NAME",
        "ROWS",
        "COLUMNS",
        "RHS",
        "RANGES",
        "BOUNDS",
        "ENDATA",
        "OBJSENSE",
        "OBJNAME",
        "MAX",
        "N",
        "E",
        "L",
        "G",
        "r1",
        "r2",
        "obj",
        "x",
        "y",
        "'MARKER'",
        "'INTORG'",
        "'INTEND'",
        "UP",
        "LO",
        "FX",
        "MI",
        "PL",
        "FR",
        "BV",
        "LI",
        "UI",
        "BND",
        "0",
        "1",
        "-2",
        "2.5",
        "0.001",
        "1e20",
        "-inf",
        "1e-40",
        "4611686018427387904",
        "2147483648",
        "0.3333333333333",
        "*",
    ]);
    (any::<bool>(), prop::collection::vec(word, 1..6))
        .prop_map(|(indent, words)| format!("{}{}", if indent { " " } else { "" }, words.join(" ")))
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::FormatWords))]

    #[test]
    fn mps_from_format_words(lines in prop::collection::vec(mps_line(), 0..25)) {
        check_mps(&lines.join("\n"));
    }

    #[test]
    fn mps_from_random_text(text in ".{0,200}") {
        check_mps(&text);
    }
}

fn variant_line() -> impl Strategy<Value = String> {
    let key = prop::sample::select(vec!["id", "rhs", "cost", "lower", "upper", "other"]);
    prop_oneof![
        prop::collection::vec((key, json_value()), 0..5).prop_map(|fields| {
            let body: Vec<String> = fields
                .iter()
                .map(|(k, v)| format!("\"{k}\": {v}"))
                .collect();
            format!("{{\"id\": \"d\", {}}}", body.join(", "))
        }),
        ".{0,40}",
    ]
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::VariantLines))]

    #[test]
    fn variants_parse_and_apply(lines in prop::collection::vec(variant_line(), 0..6)) {
        let model = Model::from_str(&read("examples/twisted_cubic.json"), ModelKind::Json, "m")
            .unwrap();
        let text = lines.join("\n");
        let parsed = parse_lines(&text, "v.jsonl");
        let content = text.lines().filter(|l| !l.trim().is_empty()).count();
        prop_assert_eq!(parsed.len(), content);
        for (_, result) in parsed {
            match result {
                Ok(variant) => match variant.apply(&model, "v.jsonl") {
                    Ok(m) => {
                        prop_assert_eq!(m.rhs.len(), model.constraints());
                        prop_assert_eq!(m.cost.len(), model.variables());
                    }
                    Err(e) => prop_assert!(e.to_string().starts_with("v.jsonl: variant "), "{}", e),
                },
                Err(e) => prop_assert!(e.to_string().starts_with("v.jsonl: line "), "{}", e),
            }
        }
    }
}

/// A store holding one valid entry, and that entry's bytes.
fn stored_entry() -> (tempfile::TempDir, Store, EntryKey, Vec<u8>) {
    let dir = tempfile::tempdir().unwrap();
    let store = Store::open(dir.path()).unwrap();
    let key = EntryKey {
        row_space: "1 1 1".into(),
        kind: SetKind::Graver,
        signs: vec![Sign::Free; 3],
        truncation: Truncation::default(),
    };
    let metadata = SetMetadata {
        matrix: vec![vec![1, 1, 1]],
        rank: 1,
        delta: "1".into(),
        delta_exact: true,
        column_number: 1,
        norm_bound: Some(2),
        method: "proptest".into(),
        completeness: Completeness::Complete,
        build_seconds: 0.0,
        kernstep_version: "0.1.0".into(),
        created_unix: 0,
        model: None,
    };
    let set = TestSetData::new(3, vec![1, -1, 0, 1, 0, -1, 0, 1, -1]).unwrap();
    let BuildGuard::Build(lock) = store.lock_for_build(&key).unwrap() else {
        panic!("the store is new");
    };
    lock.commit(&set, &metadata).unwrap();
    let bytes = std::fs::read(store.entry_path(key.digest())).unwrap();
    (dir, store, key, bytes)
}

/// A damage to a file: flip bits, cut, append or overwrite.
#[derive(Clone, Debug)]
enum Damage {
    Flip(Index, u8),
    Truncate(Index),
    Append(Vec<u8>),
    Random(Vec<u8>),
}

fn damage() -> impl Strategy<Value = Damage> {
    prop_oneof![
        4 => (any::<Index>(), 1u8..=255).prop_map(|(i, m)| Damage::Flip(i, m)),
        2 => any::<Index>().prop_map(Damage::Truncate),
        1 => prop::collection::vec(any::<u8>(), 1..16).prop_map(Damage::Append),
        1 => prop::collection::vec(any::<u8>(), 0..300).prop_map(Damage::Random),
    ]
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Checks))]

    #[test]
    fn damaged_cache_files_give_typed_errors(damages in prop::collection::vec(damage(), 1..4)) {
        let (_dir, store, key, original) = stored_entry();
        let mut bytes = original.clone();
        for d in &damages {
            match d {
                Damage::Flip(i, mask) if !bytes.is_empty() => {
                    let at = i.index(bytes.len());
                    bytes[at] ^= mask;
                }
                Damage::Truncate(i) => bytes.truncate(i.index(bytes.len() + 1)),
                Damage::Append(extra) => bytes.extend_from_slice(extra),
                Damage::Random(all) => bytes.clone_from(all),
                Damage::Flip(..) => {}
            }
        }
        let path = store.entry_path(key.digest());
        std::fs::write(&path, &bytes).unwrap();
        let name = path.display().to_string();
        match store.load(&key) {
            Ok(found) => {
                prop_assert_eq!(&bytes, &original, "a changed file was accepted");
                prop_assert!(found.is_some());
            }
            Err(e) => prop_assert!(e.to_string().contains(&name), "{}", e),
        }
        let listed = store.list().unwrap();
        prop_assert_eq!(listed.len(), 1);
        if let Err(e) = &listed[0] {
            prop_assert!(e.to_string().contains(&name), "{}", e);
        }
    }
}

/// The Graver basis of `a`, `None` when the completion stops at its limits.
fn graver(a: &IntMatrix, seconds: u64) -> Result<Option<Vec<Vec<i64>>>, Error> {
    let control = Control::new()
        .max_elements(20_000)
        .time_limit(std::time::Duration::from_secs(seconds));
    Ok(
        match complete_kernel(a, &Request::graver(a.cols()), &control, None)? {
            Completion::Finished(set, _) => Some(set.to_rows()),
            Completion::Stopped(_) => None,
        },
    )
}

fn gcd(a: i128, b: i128) -> i128 {
    if b == 0 {
        a.abs()
    } else {
        gcd(b, a % b)
    }
}

/// Entries within 40 of `±(2^31 - 1)`, the largest accepted.
fn near_matrix_limit() -> impl Strategy<Value = i64> {
    (0i64..40, any::<bool>()).prop_map(|(d, neg)| {
        let v = (1i64 << 31) - 1 - d;
        if neg {
            -v
        } else {
            v
        }
    })
}

/// Checks that `set` is `±(b, -a) / gcd(a, b)`: the kernel of `[a b]` is spanned by that
/// primitive vector, so it and its negation are the whole Graver basis (elementary: every
/// kernel vector is an integer multiple of it).
fn is_two_column_basis(set: &[Vec<i64>], a: i64, b: i64) -> bool {
    let g = gcd(i128::from(a), i128::from(b));
    let v = [i128::from(b) / g, -i128::from(a) / g];
    set.len() == 1 && {
        let got = [i128::from(set[0][0]), i128::from(set[0][1])];
        got == v || got == [-v[0], -v[1]]
    }
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::SmallExact))]

    #[test]
    fn graver_of_two_columns(a in -100_000i64..100_000, b in 1i64..100_000) {
        let m = IntMatrix::from_rows(&[vec![a, b]]).unwrap();
        let set = graver(&m, 30).unwrap().expect("finishes");
        prop_assert!(is_two_column_basis(&set, a, b), "{:?}", set);
    }

    /// Multiplying rows by factors near `2^31` leaves the kernel, hence the Graver basis,
    /// unchanged (the lattice depends only on the row space): same set, or an overflow error.
    #[test]
    fn rows_scaled_near_the_entry_limit_keep_the_graver_basis(
        small in prop::collection::vec(prop::collection::vec(-1i64..=1, 4), 2),
        factors in prop::collection::vec(near_matrix_limit(), 2),
    ) {
        let plain = IntMatrix::from_rows(&small).unwrap();
        let scaled: Vec<Vec<i64>> = small
            .iter()
            .zip(&factors)
            .map(|(row, f)| row.iter().map(|v| v * f).collect())
            .collect();
        let expected = graver(&plain, 30).unwrap().expect("small sets finish");
        match graver(&IntMatrix::from_rows(&scaled).unwrap(), 30) {
            Ok(found) => prop_assert_eq!(found, Some(expected)),
            Err(e) => prop_assert!(matches!(e, Error::Overflow(_)), "{}", e),
        }
    }

    /// `min c1 x1 + c2 x2` over `a x1 + x2 = b` with `a` near `2^31`, `b` near `±2^62`, `x1`
    /// in a small box and `0 <= x2 <= 2^62`, solved over its Graver basis `±(1, -a)`: agrees
    /// with enumerating the box, or reports an overflow.
    #[test]
    fn solve_near_the_value_limits(
        a in near_matrix_limit(),
        b_offset in 0i64..1_000_000,
        b_negative in any::<bool>(),
        box_low in -6i64..6,
        width in 0i64..8,
        c1 in -3i64..4,
        c2 in -3i64..4,
    ) {
        let limit = 1i64 << 62;
        let b = if b_negative { -(limit - b_offset) } else { limit - b_offset };
        let upper_x1 = box_low + width;
        let model = Model {
            matrix: IntMatrix::from_rows(&[vec![a, 1]]).unwrap(),
            rhs: vec![b],
            cost: vec![c1, c2],
            convex: Default::default(),
            change_cost: Vec::new(),
            lower: vec![Some(box_low), Some(0)],
            upper: vec![Some(upper_x1), Some(limit)],
            variable_names: vec!["x1".into(), "x2".into()],
            row_names: vec!["r".into()],
            units: Default::default(),
        };
        let brute = (box_low..=upper_x1)
            .filter_map(|x1| {
                let x2 = i128::from(b) - i128::from(a) * i128::from(x1);
                (0..=i128::from(limit)).contains(&x2)
                    .then(|| i128::from(c1) * i128::from(x1) + i128::from(c2) * x2)
            })
            .min();
        let set = kernstep::completion::ElementSet::from_rows(2, &[vec![1, -a]]).unwrap();
        let solved = Prepared::new(&model.matrix, &set, Coverage::Complete)
            .and_then(|p| p.solve(&model, &Options::default(), None, &|| false));
        match solved {
            Ok(Verdict::Solved(s)) => match s.status {
                Status::Optimal => prop_assert_eq!(s.objective, brute),
                Status::Infeasible(_) => prop_assert_eq!(brute, None),
                other => prop_assert!(false, "unexpected status {:?}", other),
            },
            Ok(Verdict::NoIntegerSolution(_)) => prop_assert!(false, "a unit column always solves"),
            Ok(Verdict::Flow(_)) => prop_assert!(false, "a set of moves was prepared"),
            Err(e) => prop_assert!(
                matches!(e, Error::Overflow(_)) || e.to_string().contains("overflow"),
                "{}", e
            ),
        }
    }
}

/// `[2^31 - 1, 1]` has the one-element Graver basis `±(1, 1 - 2^31)`; the completion either
/// finds it or stops at its time limit, never errs or returns anything else.
#[test]
fn graver_with_an_entry_at_the_limit_is_exact_or_stopped() {
    let a = (1i64 << 31) - 1;
    let m = IntMatrix::from_rows(&[vec![a, 1]]).unwrap();
    if let Some(set) = graver(&m, 2).unwrap() {
        assert!(is_two_column_basis(&set, a, 1), "{set:?}");
    }
}

#[test]
fn model_limits_are_inclusive() {
    let at =
        |a: i128, b: i128| format!(r#"{{"matrix": [[{a}, 1]], "rhs": [{b}], "lower": [0, 0]}}"#);
    let ok = Model::from_str(&at((1 << 31) - 1, 1 << 62), ModelKind::Json, "l.json");
    assert!(ok.is_ok());
    for (a, b, field) in [
        (1 << 31, 0, "matrix[0][0]"),
        (-(1 << 31), 0, "matrix[0][0]"),
        (1, (1 << 62) + 1, "rhs[0]"),
    ] {
        let err = Model::from_str(&at(a, b), ModelKind::Json, "l.json").unwrap_err();
        assert!(
            err.to_string().starts_with(&format!("l.json: {field}: ")),
            "{err}"
        );
    }
}

//! How many cases each property test runs: the one table of weights for the test suites of
//! all three crates (the root crate's tests take it as `mod proptest_cases;`, those of
//! `augment` and `cache` by `#[path]`), scaled together by `KERNSTEP_PROPTEST_SCALE`.
//!
//! A property names the class of work one of its cases does; the class gives its number of
//! cases at scale 1. `.cargo/config.toml` sets the scale for every test process cargo runs
//! in this workspace (`1`: the counts below); a run may override it, e.g.
//! `KERNSTEP_PROPTEST_SCALE=0.1 cargo test` for a quick pass or `=10` for a long soak. Each
//! count is rounded and at least 1.
#![allow(dead_code)] // each test binary uses its own classes

/// The environment variable that scales every count.
pub const SCALE_VAR: &str = "KERNSTEP_PROPTEST_SCALE";

/// What one case of a property costs, cheapest first.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Class {
    /// Parsing short text shaped like a format's words (MPS lines).
    FormatWords,
    /// Parsing short variant lines and applying them to a model.
    VariantLines,
    /// Parsing arbitrary random text as a model.
    RandomText,
    /// Reading damaged store files, or checking moves against a dense oracle.
    Checks,
    /// Writing and reading back records, or brute force over small convex instances.
    RoundTrips,
    /// Exact linear algebra, a network solve or a dual bound on a small instance.
    SmallExact,
    /// Augmentation compared with a brute-force oracle.
    Augmentation,
    /// Augmentation on wide instances, or under every selection rule with rays to check.
    WideAugmentation,
    /// A test-set completion (or a store of a random set) per case.
    Completion,
}

impl Class {
    /// The number of cases at scale 1.
    pub const fn weight(self) -> u32 {
        match self {
            Class::FormatWords => 3000,
            Class::VariantLines => 2000,
            Class::RandomText => 1500,
            Class::Checks => 600,
            Class::RoundTrips => 300,
            Class::SmallExact => 200,
            Class::Augmentation => 96,
            Class::WideAugmentation => 64,
            Class::Completion => 48,
        }
    }
}

/// The number of cases for a property of `class`: its weight times the scale (unset: 1),
/// rounded, at least 1. A scale that is not a positive number stops the test with a message.
pub fn cases(class: Class) -> u32 {
    let scale = match std::env::var(SCALE_VAR) {
        Err(std::env::VarError::NotPresent) => 1.0,
        Ok(text) => match text.trim().parse::<f64>() {
            Ok(scale) if scale.is_finite() && scale > 0.0 => scale,
            _ => panic!("{SCALE_VAR}={text:?}: expected a positive number"),
        },
        Err(e) => panic!("{SCALE_VAR}: {e}"),
    };
    let scaled = (f64::from(class.weight()) * scale).round();
    if scaled >= f64::from(u32::MAX) {
        u32::MAX
    } else {
        (scaled as u32).max(1)
    }
}

/// A proptest configuration with the cases of `class` (the rest proptest's defaults).
pub fn config(class: Class) -> proptest::test_runner::Config {
    proptest::test_runner::Config::with_cases(cases(class))
}

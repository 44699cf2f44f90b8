//! The cache's contents in words: the listing of stored sets, checkpoints and locks, one
//! entry's facts, the verification table and the prune report (what `kernstep cache` prints).
//! Ages are shown relative to `now` (seconds since the Unix epoch).

use cache::{Completeness, Digest, EntrySummary, PruneReport, SetKind, Sign, Truncation};

use super::layout::{cell, labelled, table};
use crate::testset::{CheckpointRecord, CheckpointState, EntryRecord, Listing, VerifyRecord};

/// Hex digits of a digest shown in tables (any unique prefix names the entry).
pub const SHORT_KEY: usize = 12;

/// The listing: one row per stored set, then the checkpoints and the locks, when any.
pub fn listing_text(listing: &Listing, now: u64) -> String {
    let rows: Vec<Vec<String>> = listing
        .entries
        .iter()
        .map(|s| summary_row(s, now))
        .collect();
    let head = [
        "key",
        "model",
        "kind",
        "width",
        "elements",
        "encoding",
        "bytes",
        "truncation",
        "complete",
        "age",
    ];
    let mut out = table(&head, &rows);
    if !listing.checkpoints.is_empty() {
        let rows: Vec<Vec<String>> = listing
            .checkpoints
            .iter()
            .map(|c| checkpoint_row(c, now))
            .collect();
        let head = ["key", "lifted", "moves", "work", "bytes", "age", "state"];
        out.push_str("\ncheckpoints\n");
        out.push_str(&table(&head, &rows));
    }
    if !listing.locks.is_empty() {
        let rows: Vec<Vec<String>> = listing
            .locks
            .iter()
            .map(|l| {
                vec![
                    short_key(l.digest),
                    age_text(now.saturating_sub(l.modified_unix)),
                    if l.held { "held" } else { "stale" }.to_string(),
                ]
            })
            .collect();
        out.push_str("\nlocks\n");
        out.push_str(&table(&["key", "age", "state"], &rows));
    }
    out
}

/// One checkpoint's row of the listing.
fn checkpoint_row(c: &CheckpointRecord, now: u64) -> Vec<String> {
    let state = match c.state {
        CheckpointState::SetAside => "set aside",
        CheckpointState::Building => "building",
        CheckpointState::Unreadable => "unreadable",
        CheckpointState::Stopped => "stopped",
    };
    let lifted = match (c.lifted, c.components, c.mid_stage) {
        (Some(k), Some(n), Some(mid)) => format!("{k}/{n}{}", if mid { "+" } else { "" }),
        _ => "-".into(),
    };
    vec![
        short_key(c.file.digest),
        lifted,
        cell(c.moves),
        c.work_seconds.map_or("-".into(), |w| age_text(w as u64)),
        c.file.size_bytes.to_string(),
        age_text(now.saturating_sub(c.file.modified_unix)),
        state.to_string(),
    ]
}

/// The first [`SHORT_KEY`] hex digits of `digest`.
pub fn short_key(digest: Digest) -> String {
    digest.to_hex()[..SHORT_KEY].to_string()
}

fn summary_row(s: &EntrySummary, now: u64) -> Vec<String> {
    vec![
        short_key(s.digest),
        cell(s.model.as_deref()),
        kind_name(s.kind).to_string(),
        s.width.to_string(),
        s.elements.to_string(),
        format!("{:?}", s.encoding).to_lowercase(),
        s.size_bytes.to_string(),
        truncation_text(&s.truncation),
        completeness_text(&s.completeness),
        age_text(now.saturating_sub(s.created_unix)),
    ]
}

/// `graver`, `hilbert` or `cycles`.
pub fn kind_name(kind: SetKind) -> &'static str {
    match kind {
        SetKind::Graver => "graver",
        SetKind::Hilbert => "hilbert",
        SetKind::Cycles => "cycles",
    }
}

fn truncation_text(t: &Truncation) -> String {
    let mut parts = Vec::new();
    if let Some(n) = t.norm_limit {
        parts.push(format!("norm<={n}"));
    }
    if let Some(b) = &t.bounds {
        parts.push(format!("box({} bounds)", b.len()));
    }
    if parts.is_empty() {
        "none".to_string()
    } else {
        parts.join(",")
    }
}

fn completeness_text(c: &Completeness) -> String {
    match c {
        Completeness::Complete => "yes".to_string(),
        Completeness::BoxTruncated => "box only".to_string(),
        Completeness::NormTruncated { limit } => format!("norm<={limit} only"),
    }
}

/// An age in the units a prune takes (`30d`, `12h`, `90m`, `45s`), rounded down to the
/// largest unit.
pub fn age_text(seconds: u64) -> String {
    match seconds {
        s if s >= 86_400 => format!("{}d", s / 86_400),
        s if s >= 3_600 => format!("{}h", s / 3_600),
        s if s >= 60 => format!("{}m", s / 60),
        s => format!("{s}s"),
    }
}

/// One stored set's key, build facts, counts, encoding and size, a line each.
pub fn entry_text(set: &EntryRecord, now: u64) -> String {
    let m = &set.metadata;
    let rows = m.matrix.len();
    let cols = m.matrix.first().map_or(set.key.width(), Vec::len);
    let per_element = match set.elements {
        0 => "-".to_string(),
        n => format!("{:.2}", set.size_bytes as f64 / n as f64),
    };
    let delta = format!("{}{}", if m.delta_exact { "" } else { "<= " }, m.delta);
    labelled(vec![
        ("key", set.digest.to_hex()),
        ("file", set.path.clone()),
        ("model", cell(m.model.as_deref())),
        ("kind", kind_name(set.key.kind).to_string()),
        ("signs", Sign::pattern(&set.key.signs)),
        ("truncation", truncation_text(&set.key.truncation)),
        ("complete", completeness_text(&m.completeness)),
        ("matrix", format!("{rows} x {cols}")),
        ("rank", m.rank.to_string()),
        ("Δ", delta),
        ("column number", m.column_number.to_string()),
        ("norm bound", cell(m.norm_bound)),
        ("method", m.method.clone()),
        ("build seconds", format!("{:.2}", m.build_seconds)),
        ("built by", format!("kernstep {}", m.kernstep_version)),
        ("age", age_text(now.saturating_sub(m.created_unix))),
        ("elements", set.elements.to_string()),
        ("width", set.width.to_string()),
        ("encoding", format!("{:?}", set.encoding).to_lowercase()),
        ("bytes", set.size_bytes.to_string()),
        ("bytes per element", per_element),
    ])
}

/// One row per checked entry: its key, elements and whether it passed.
pub fn verify_text(checked: &[VerifyRecord]) -> String {
    let rows: Vec<Vec<String>> = checked
        .iter()
        .map(|c| {
            let state = match (c.ok, c.foreign) {
                (true, false) => "ok",
                (true, true) => "ok (foreign: sealed on first use)",
                (false, _) => "refused",
            };
            vec![short_key(c.digest), cell(c.elements), state.to_string()]
        })
        .collect();
    table(&["key", "elements", "state"], &rows)
}

/// What a prune removed and what it left alone.
pub fn prune_text(report: &PruneReport) -> String {
    let short = |ds: &[Digest]| match ds {
        [] => "-".to_string(),
        _ => ds
            .iter()
            .map(|d| short_key(*d))
            .collect::<Vec<_>>()
            .join(" "),
    };
    labelled(vec![
        ("entries removed", report.removed.len().to_string()),
        ("removed keys", short(&report.removed)),
        (
            "checkpoints removed",
            report.checkpoints_removed.len().to_string(),
        ),
        (
            "set-aside checkpoints removed",
            report.set_aside_removed.to_string(),
        ),
        ("unused locks removed", report.locks_removed.to_string()),
        (
            "temporary files removed",
            report.temp_files_removed.to_string(),
        ),
        ("busy (left alone)", short(&report.busy)),
        (
            "unreadable (left alone)",
            report.unreadable.len().to_string(),
        ),
    ])
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ages_are_shown_in_the_largest_whole_unit() {
        assert_eq!(age_text(59), "59s");
        assert_eq!(age_text(60), "1m");
        assert_eq!(age_text(7_199), "1h");
        assert_eq!(age_text(86_400 * 3 + 5), "3d");
    }
}

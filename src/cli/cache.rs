//! `kernstep cache ...`: look after the stored test sets: list them, show one, verify the
//! files, remove or prune entries, and export one as JSON.
//!
//! `KEY` is a key digest or any unique prefix of one (hexadecimal, either case).

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::{Duration, SystemTime, UNIX_EPOCH};

use ::cache::{Completeness, Digest, EntrySummary, PruneReport, SetKind, Sign, Store, Truncation};
use anyhow::Context;
use clap::{Args, Subcommand, ValueEnum};
use kernstep::testset::{
    CheckpointRecord, CheckpointState, EntryRecord, Listing, SetLibrary, VerifyRecord,
};

use super::common::{interrupted, CacheArgs};
use super::table::{write_pairs, write_table};

/// Hex digits of a digest shown in tables (any unique prefix is accepted back as `KEY`).
const SHORT_KEY: usize = 12;

/// Arguments of `cache`.
#[derive(Debug, Args)]
pub struct CacheVerbArgs {
    /// What to do with the stored sets.
    #[command(subcommand)]
    pub action: Action,
    #[command(flatten)]
    pub cache: CacheArgs,
    /// Print the result as JSON instead of a table.
    #[arg(long, global = true)]
    pub json: bool,
}

/// The `cache` sub-verbs.
#[derive(Debug, Subcommand)]
pub enum Action {
    /// One line per stored set, read from the file heads (fast; `verify` checks whole files),
    /// then the checkpoints of interrupted builds and the build locks.
    List,
    /// Key, build facts, counts, encoding and size of one stored set.
    Show {
        /// Key digest or a unique prefix of one.
        key: String,
    },
    /// Check whole files (checksum, key, every section, seal) and their content (every element
    /// in the kernel, signs, truncation, no duplicates; a complete Graver set generates the
    /// kernel lattice); exit 2 if any fails.
    Verify {
        /// Key digest or a unique prefix of one (default: every entry).
        #[arg(conflicts_with = "all")]
        key: Option<String>,
        /// Check every entry (the default when no KEY is given).
        #[arg(long)]
        all: bool,
    },
    /// Delete one stored set with its checkpoint and lock (waiting for a builder of it to
    /// finish); KEY may also name a key that has only a checkpoint.
    Remove {
        /// Key digest or a unique prefix of one.
        key: String,
    },
    /// Delete sets built longer ago than the given age, and checkpoints, unused locks and
    /// leftover temporary files not modified since; never the files of a running build, and
    /// only in a directory kernstep marked as its cache.
    Prune {
        /// Age such as `30d`, `12h`, `90m` or `3600s`.
        #[arg(long, value_name = "AGE", default_value = "30d", value_parser = super::parse::age)]
        older_than: Duration,
    },
    /// Print one stored set as the JSON document `build --out` writes (key, metadata, elements).
    Export {
        /// Key digest or a unique prefix of one.
        key: String,
        /// Output format.
        #[arg(long, value_enum, default_value_t = ExportFormat::Json)]
        format: ExportFormat,
    },
    /// Store the set in FILE (a document `build --out` or `cache export` wrote) after checking
    /// it in full, as a foreign entry is checked; replaces an entry under the same key.
    Import {
        /// The set document (`-` reads standard input; .gz compressed too).
        file: PathBuf,
    },
}

/// `cache export --format`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ExportFormat {
    /// One JSON document, the one `build --out` writes.
    Json,
}

/// Runs one `cache` sub-verb.
pub fn run(args: &CacheVerbArgs) -> anyhow::Result<ExitCode> {
    let library = args.cache.open()?;
    let mut out = io::stdout().lock();
    let json = args.json;
    let code = match &args.action {
        Action::List => list(&library.listing()?, json, &mut out)?,
        Action::Show { key } => show(&library.entry_record(key)?, json, &mut out)?,
        Action::Verify { key, .. } => {
            verify(&library.verify_records(key.as_deref())?, json, &mut out)?
        }
        Action::Remove { key } => remove(library.store(), key, json, &mut out)?,
        Action::Prune { older_than } => prune(&library.prune(*older_than)?, json, &mut out)?,
        Action::Export { key, format } => export(&library, key, *format, &mut out)?,
        Action::Import { file } => import(&library, file, json, &mut out)?,
    };
    out.flush()?;
    Ok(code)
}

fn list(listing: &Listing, json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(out, "{}", serde_json::to_string_pretty(listing)?)?;
    } else {
        let now = now_unix();
        let rows: Vec<Vec<String>> = listing
            .entries
            .iter()
            .map(|s| summary_row(s, now))
            .collect();
        let head = [
            "key",
            "kind",
            "width",
            "elements",
            "encoding",
            "bytes",
            "truncation",
            "complete",
            "age",
        ];
        write_table(out, &head, &rows)?;
        if !listing.checkpoints.is_empty() {
            writeln!(out, "\ncheckpoints")?;
            let rows: Vec<Vec<String>> = listing
                .checkpoints
                .iter()
                .map(|c| checkpoint_row(c, now))
                .collect();
            let head = ["key", "lifted", "moves", "work", "bytes", "age", "state"];
            write_table(out, &head, &rows)?;
        }
        if !listing.locks.is_empty() {
            writeln!(out, "\nlocks")?;
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
            write_table(out, &["key", "age", "state"], &rows)?;
        }
    }
    warn_unreadable(&listing.unreadable);
    Ok(ExitCode::SUCCESS)
}

/// Each entry whose head could not be read, on stderr.
fn warn_unreadable(unreadable: &[String]) {
    for problem in unreadable {
        eprintln!("kernstep: warning: {problem} (run `kernstep cache verify`)");
    }
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
        c.moves.map_or("-".into(), |m| m.to_string()),
        c.work_seconds.map_or("-".into(), |w| age_text(w as u64)),
        c.file.size_bytes.to_string(),
        age_text(now.saturating_sub(c.file.modified_unix)),
        state.to_string(),
    ]
}

fn short_key(digest: Digest) -> String {
    digest.to_hex()[..SHORT_KEY].to_string()
}

fn summary_row(s: &EntrySummary, now: u64) -> Vec<String> {
    vec![
        s.digest.to_hex()[..SHORT_KEY].to_string(),
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

fn kind_name(kind: SetKind) -> &'static str {
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

/// An age in the units `prune --older-than` takes, rounded down to the largest unit.
fn age_text(seconds: u64) -> String {
    match seconds {
        s if s >= 86_400 => format!("{}d", s / 86_400),
        s if s >= 3_600 => format!("{}h", s / 3_600),
        s if s >= 60 => format!("{}m", s / 60),
        s => format!("{s}s"),
    }
}

fn now_unix() -> u64 {
    SystemTime::now()
        .duration_since(UNIX_EPOCH)
        .map_or(0, |d| d.as_secs())
}

fn show(entry: &EntryRecord, json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(out, "{}", serde_json::to_string_pretty(entry)?)?;
    } else {
        write_pairs(out, &shown_pairs(entry))?;
    }
    Ok(ExitCode::SUCCESS)
}

fn shown_pairs(set: &EntryRecord) -> Vec<(String, String)> {
    let m = &set.metadata;
    let rows = m.matrix.len();
    let cols = m.matrix.first().map_or(set.key.width(), Vec::len);
    let per_element = match set.elements {
        0 => "-".to_string(),
        n => format!("{:.2}", set.size_bytes as f64 / n as f64),
    };
    let pair = |label: &str, value: String| (label.to_string(), value);
    vec![
        pair("key", set.digest.to_hex()),
        pair("file", set.path.clone()),
        pair("kind", kind_name(set.key.kind).to_string()),
        pair("signs", sign_pattern(&set.key.signs)),
        pair("truncation", truncation_text(&set.key.truncation)),
        pair("complete", completeness_text(&m.completeness)),
        pair("matrix", format!("{rows} x {cols}")),
        pair("rank", m.rank.to_string()),
        pair(
            "Δ",
            format!("{}{}", if m.delta_exact { "" } else { "<= " }, m.delta),
        ),
        pair("column number", m.column_number.to_string()),
        pair(
            "norm bound",
            m.norm_bound.map_or("-".into(), |b| b.to_string()),
        ),
        pair("method", m.method.clone()),
        pair("build seconds", format!("{:.2}", m.build_seconds)),
        pair("built by", format!("kernstep {}", m.kernstep_version)),
        pair("age", age_text(now_unix().saturating_sub(m.created_unix))),
        pair("elements", set.elements.to_string()),
        pair("width", set.width.to_string()),
        pair("encoding", format!("{:?}", set.encoding).to_lowercase()),
        pair("bytes", set.size_bytes.to_string()),
        pair("bytes per element", per_element),
    ]
}

/// The sign pattern in the characters `build --signs` takes.
fn sign_pattern(signs: &[Sign]) -> String {
    signs
        .iter()
        .map(|s| match s {
            Sign::Free => 'f',
            Sign::NonNegative => '+',
            Sign::NonPositive => '-',
        })
        .collect()
}

fn verify(checked: &[VerifyRecord], json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(out, "{}", serde_json::to_string_pretty(checked)?)?;
    } else {
        let rows: Vec<Vec<String>> = checked
            .iter()
            .map(|c| {
                let state = match (c.ok, c.foreign) {
                    (true, false) => "ok",
                    (true, true) => "ok (foreign: sealed on first use)",
                    (false, _) => "refused",
                };
                vec![
                    short_key(c.digest),
                    c.elements.map_or("-".into(), |e| e.to_string()),
                    state.to_string(),
                ]
            })
            .collect();
        write_table(out, &["key", "elements", "state"], &rows)?;
    }
    let refused: Vec<&String> = checked.iter().filter_map(|c| c.problem.as_ref()).collect();
    for problem in &refused {
        eprintln!("kernstep: {problem}");
    }
    Ok(if refused.is_empty() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(2)
    })
}

fn remove(store: &Store, key: &str, json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    let digest = store.remove(key)?;
    if json {
        let doc = serde_json::json!({ "removed": digest });
        writeln!(out, "{}", serde_json::to_string_pretty(&doc)?)?;
    } else {
        writeln!(out, "removed {digest}")?;
    }
    Ok(ExitCode::SUCCESS)
}

fn prune(report: &PruneReport, json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(out, "{}", serde_json::to_string_pretty(report)?)?;
    } else {
        let short = |ds: &[Digest]| match ds {
            [] => "-".to_string(),
            _ => ds
                .iter()
                .map(|d| short_key(*d))
                .collect::<Vec<_>>()
                .join(" "),
        };
        let pairs = [
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
        ]
        .map(|(label, value)| (label.to_string(), value));
        write_pairs(out, &pairs)?;
    }
    warn_unreadable(&report.unreadable);
    Ok(ExitCode::SUCCESS)
}

fn export(
    library: &SetLibrary,
    key: &str,
    format: ExportFormat,
    out: &mut impl Write,
) -> anyhow::Result<ExitCode> {
    let ExportFormat::Json = format;
    let document = library
        .export_document(key, Some(interrupted()))
        .with_context(|| format!("exporting entry {key}"))?;
    out.write_all(document.as_bytes())?;
    Ok(ExitCode::SUCCESS)
}

fn import(
    library: &SetLibrary,
    file: &Path,
    json: bool,
    out: &mut impl Write,
) -> anyhow::Result<ExitCode> {
    let imported = library.import(file)?;
    if json {
        let doc = serde_json::json!({
            "imported": imported.digest,
            "elements": imported.elements,
            "replaced": imported.replaced,
        });
        writeln!(out, "{}", serde_json::to_string_pretty(&doc)?)?;
    } else {
        writeln!(
            out,
            "imported {} ({} elements){}",
            imported.digest,
            imported.elements,
            imported
                .replaced
                .map_or_else(String::new, |d| format!(", replacing a damaged entry: {d}"))
        )?;
    }
    Ok(ExitCode::SUCCESS)
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

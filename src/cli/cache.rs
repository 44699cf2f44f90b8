//! `kernstep cache ...`: look after the stored test sets: list them, show one, verify the
//! files, remove or prune entries, and export one as JSON.
//!
//! `KEY` is a key digest or any unique prefix of one (hexadecimal, either case).

use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::time::{Duration, SystemTime, UNIX_EPOCH};

use ::cache::{PruneReport, Store};
use anyhow::Context;
use clap::{Args, Subcommand, ValueEnum};
use kernstep::formats::published::{ImportReport, Removed, VerifyReport};
use kernstep::formats::tagged;
use kernstep::testset::{EntryRecord, Listing, SetLibrary, VerifyRecord};
use kernstep::text::{entry_text, listing_text, prune_text, verify_text};

use super::common::{interrupted, CacheArgs};

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
        writeln!(out, "{}", tagged::pretty(listing)?)?;
    } else {
        out.write_all(listing_text(listing, now_unix()).as_bytes())?;
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

fn now_unix() -> u64 {
    SystemTime::now()
        .duration_since(UNIX_EPOCH)
        .map_or(0, |d| d.as_secs())
}

fn show(entry: &EntryRecord, json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(out, "{}", tagged::pretty(entry)?)?;
    } else {
        out.write_all(entry_text(entry, now_unix()).as_bytes())?;
    }
    Ok(ExitCode::SUCCESS)
}

fn verify(checked: &[VerifyRecord], json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(
            out,
            "{}",
            tagged::pretty(&VerifyReport {
                entries: checked.to_vec()
            })?
        )?;
    } else {
        out.write_all(verify_text(checked).as_bytes())?;
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
        let doc = Removed {
            removed: digest.to_string(),
        };
        writeln!(out, "{}", tagged::pretty(&doc)?)?;
    } else {
        writeln!(out, "removed {digest}")?;
    }
    Ok(ExitCode::SUCCESS)
}

fn prune(report: &PruneReport, json: bool, out: &mut impl Write) -> anyhow::Result<ExitCode> {
    if json {
        writeln!(out, "{}", tagged::pretty(report)?)?;
    } else {
        out.write_all(prune_text(report).as_bytes())?;
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
        let doc = ImportReport {
            imported: imported.digest.to_string(),
            elements: imported.elements,
            replaced: imported.replaced.clone(),
        };
        writeln!(out, "{}", tagged::pretty(&doc)?)?;
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

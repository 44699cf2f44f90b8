//! Plain text layout: label/value lists, column tables whose cells are padded to their
//! column's width, lines wrapped at spaces, and counts in words.

use std::fmt::Write;

/// `rows` as `label  value` lines with the values aligned.
pub fn pairs(rows: &[(String, String)]) -> String {
    let width = rows
        .iter()
        .map(|(l, _)| l.chars().count())
        .max()
        .unwrap_or(0);
    let mut out = String::new();
    for (label, value) in rows {
        let pad = width - label.chars().count();
        let _ = writeln!(out, "{label}{:pad$}  {value}", "");
    }
    out
}

/// [`pairs`] from borrowed labels.
pub fn labelled(rows: Vec<(&str, String)>) -> String {
    let owned: Vec<(String, String)> = rows.into_iter().map(|(l, v)| (l.to_string(), v)).collect();
    pairs(&owned)
}

/// A table with a header row; numeric-looking cells are right-aligned.
pub fn table(header: &[&str], rows: &[Vec<String>]) -> String {
    let mut widths: Vec<usize> = header.iter().map(|h| h.chars().count()).collect();
    for row in rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(cell.chars().count());
        }
    }
    let line = |cells: Vec<&str>| {
        let parts: Vec<String> = cells
            .iter()
            .zip(&widths)
            .map(|(c, &w)| {
                let pad = w - c.chars().count();
                if is_number(c) {
                    format!("{:pad$}{c}", "")
                } else {
                    format!("{c}{:pad$}", "")
                }
            })
            .collect();
        parts.join("  ").trim_end().to_string()
    };
    let mut out = String::new();
    let _ = writeln!(out, "{}", line(header.to_vec()));
    for row in rows {
        let _ = writeln!(out, "{}", line(row.iter().map(String::as_str).collect()));
    }
    out
}

fn is_number(cell: &str) -> bool {
    !cell.is_empty()
        && cell
            .chars()
            .all(|c| c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | ',' | '%' | 'x' | '/'))
        && cell.chars().any(|c| c.is_ascii_digit())
}

/// Breaks `text` at spaces into lines of at most `width` characters (a longer word keeps its
/// own line); lines after the first start with `indent` spaces.
pub fn wrap(text: &str, width: usize, indent: usize) -> Vec<String> {
    wrap_units(text.split(' ').filter(|w| !w.is_empty()), width, indent)
}

/// Like [`wrap`], for units that must not be split (such as `+2 fennick_north,`).
pub fn wrap_units<'a>(
    units: impl IntoIterator<Item = &'a str>,
    width: usize,
    indent: usize,
) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for unit in units {
        let used = line.chars().count();
        if used > 0 && used + 1 + unit.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if line.is_empty() {
            if !lines.is_empty() {
                line.push_str(&" ".repeat(indent));
            }
        } else {
            line.push(' ');
        }
        line.push_str(unit);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// [`wrap`]ped lines, each ended by a newline.
pub fn wrapped(text: &str, width: usize, indent: usize) -> String {
    let mut out = String::new();
    for line in wrap(text, width, indent) {
        out.push_str(&line);
        out.push('\n');
    }
    out
}

/// `1 move`, `4 moves`.
pub fn count_moves(n: usize) -> String {
    if n == 1 {
        "1 move".to_string()
    } else {
        format!("{n} moves")
    }
}

/// `value` or `-` when absent, for table cells.
pub fn cell<T: ToString>(value: Option<T>) -> String {
    value.map_or_else(|| "-".to_string(), |v| v.to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_start_in_one_column() {
        let rows = vec![
            ("rank r".to_string(), "2".to_string()),
            ("Δ".to_string(), "3".to_string()),
        ];
        assert_eq!(pairs(&rows), "rank r  2\nΔ       3\n");
    }

    #[test]
    fn columns_are_padded_and_numbers_right_aligned() {
        let rows = vec![
            vec!["north".to_string(), "12".to_string()],
            vec!["harbourside".to_string(), "3".to_string()],
        ];
        assert_eq!(
            table(&["depot", "trucks"], &rows),
            "depot        trucks\nnorth            12\nharbourside       3\n"
        );
    }

    #[test]
    fn wrapped_lines_fit_and_indent() {
        let text = "certified: none of the 42 moves improves in either sign";
        let lines = wrap(text, 20, 2);
        assert!(lines.iter().all(|l| l.chars().count() <= 20), "{lines:?}");
        assert!(lines[1].starts_with("  ") && !lines[0].starts_with(' '));
        let words: Vec<&str> = lines.iter().flat_map(|l| l.split_whitespace()).collect();
        assert_eq!(words.join(" "), text);
    }
}

//! Plain tables for human output: two-column label/value lists and column tables whose
//! cells are padded to their column's width.

use std::io::{self, Write};

/// Writes `rows` as `label  value` lines with the values aligned.
pub fn write_pairs(out: &mut impl Write, rows: &[(String, String)]) -> io::Result<()> {
    let width = rows
        .iter()
        .map(|(l, _)| l.chars().count())
        .max()
        .unwrap_or(0);
    for (label, value) in rows {
        let pad = width - label.chars().count();
        writeln!(out, "{label}{:pad$}  {value}", "")?;
    }
    Ok(())
}

/// Writes a table with a header row; numeric-looking cells are right-aligned.
pub fn write_table(out: &mut impl Write, header: &[&str], rows: &[Vec<String>]) -> io::Result<()> {
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
    writeln!(out, "{}", line(header.to_vec()))?;
    for row in rows {
        writeln!(out, "{}", line(row.iter().map(String::as_str).collect()))?;
    }
    Ok(())
}

fn is_number(cell: &str) -> bool {
    !cell.is_empty()
        && cell
            .chars()
            .all(|c| c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | ',' | '%' | 'x'))
        && cell.chars().any(|c| c.is_ascii_digit())
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
        let mut out = Vec::new();
        write_pairs(&mut out, &rows).unwrap();
        assert_eq!(String::from_utf8(out).unwrap(), "rank r  2\nΔ       3\n");
    }

    #[test]
    fn columns_are_padded_and_numbers_right_aligned() {
        let rows = vec![
            vec!["north".to_string(), "12".to_string()],
            vec!["harbourside".to_string(), "3".to_string()],
        ];
        let mut out = Vec::new();
        write_table(&mut out, &["depot", "trucks"], &rows).unwrap();
        let text = String::from_utf8(out).unwrap();
        assert_eq!(
            text,
            "depot        trucks\nnorth            12\nharbourside       3\n"
        );
    }
}

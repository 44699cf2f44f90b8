//! Plain two-column tables for human output: labels padded to one width, then values.

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
}

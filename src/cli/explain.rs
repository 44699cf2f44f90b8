//! Text layout for the human output of `solve` and `trace`: wrapped lines and counts.

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

/// `1 move`, `4 moves`.
pub fn count_moves(n: usize) -> String {
    if n == 1 {
        "1 move".to_string()
    } else {
        format!("{n} moves")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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

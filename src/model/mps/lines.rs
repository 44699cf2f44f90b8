//! Splits MPS text into section headers and data lines, with 1-based line numbers.
//!
//! A line whose first character is `*` is a comment; blank lines are skipped. A line that
//! starts in the first column is a section header, an indented line is data; fields are
//! separated by blanks or tabs (free format), so names cannot contain blanks.

/// The sections kernstep reads, in the order a file writes them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub(super) enum Section {
    /// `NAME [model name]`.
    Name,
    /// `OBJSENSE [MIN|MAX]`.
    ObjSense,
    /// `OBJNAME [row]`: which free row is the objective.
    ObjName,
    /// `ROWS`.
    Rows,
    /// `COLUMNS`.
    Columns,
    /// `RHS`.
    Rhs,
    /// `RANGES`.
    Ranges,
    /// `BOUNDS`.
    Bounds,
    /// `ENDATA`.
    End,
}

impl Section {
    /// The keyword that opens the section.
    pub(super) fn keyword(self) -> &'static str {
        match self {
            Self::Name => "NAME",
            Self::ObjSense => "OBJSENSE",
            Self::ObjName => "OBJNAME",
            Self::Rows => "ROWS",
            Self::Columns => "COLUMNS",
            Self::Rhs => "RHS",
            Self::Ranges => "RANGES",
            Self::Bounds => "BOUNDS",
            Self::End => "ENDATA",
        }
    }

    fn from_keyword(word: &str) -> Option<Self> {
        [
            Self::Name,
            Self::ObjSense,
            Self::ObjName,
            Self::Rows,
            Self::Columns,
            Self::Rhs,
            Self::Ranges,
            Self::Bounds,
            Self::End,
        ]
        .into_iter()
        .find(|s| s.keyword().eq_ignore_ascii_case(word))
    }
}

/// Section keywords of richer MPS dialects that a linear pure integer model does not use.
const FOREIGN_SECTIONS: [&str; 9] = [
    "SOS",
    "QUADOBJ",
    "QMATRIX",
    "QSECTION",
    "QCMATRIX",
    "CSECTION",
    "INDICATORS",
    "GENCONS",
    "PWLOBJ",
];

/// One meaningful line.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(super) enum Line<'t> {
    /// A section header with the fields after the keyword.
    Header {
        /// 1-based line number.
        number: usize,
        /// The section opened.
        section: Section,
        /// Fields after the keyword (`NAME plan` gives `["plan"]`).
        rest: Vec<&'t str>,
    },
    /// An indented data line.
    Data {
        /// 1-based line number.
        number: usize,
        /// Its blank-separated fields.
        fields: Vec<&'t str>,
    },
}

/// A header line whose keyword is not a section kernstep reads.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(super) struct UnknownHeader<'t> {
    /// 1-based line number.
    pub(super) number: usize,
    /// The keyword found.
    pub(super) word: &'t str,
    /// Whether it is a section of a richer dialect (quadratic, SOS, indicators, ...).
    pub(super) foreign: bool,
}

/// The meaningful lines of `text` up to `ENDATA` (anything after it is ignored), or the first
/// header that is not a known section.
pub(super) fn split(text: &str) -> Result<Vec<Line<'_>>, UnknownHeader<'_>> {
    let mut out = Vec::new();
    for (index, raw) in text.lines().enumerate() {
        let number = index + 1;
        if raw.starts_with('*') || raw.trim().is_empty() {
            continue;
        }
        let mut fields = raw.split_whitespace();
        if raw.starts_with(|c: char| c.is_whitespace()) {
            out.push(Line::Data {
                number,
                fields: fields.collect(),
            });
            continue;
        }
        let word = fields.next().unwrap_or_default();
        let Some(section) = Section::from_keyword(word) else {
            let foreign = FOREIGN_SECTIONS
                .iter()
                .any(|f| f.eq_ignore_ascii_case(word));
            return Err(UnknownHeader {
                number,
                word,
                foreign,
            });
        };
        out.push(Line::Header {
            number,
            section,
            rest: fields.collect(),
        });
        if section == Section::End {
            break;
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn comments_blanks_headers_and_data() {
        let text = "* note\nNAME  plan\n\nROWS\n N cost\n\tE r1\n";
        let lines = split(text).unwrap();
        assert_eq!(lines.len(), 4);
        assert_eq!(
            lines[0],
            Line::Header {
                number: 2,
                section: Section::Name,
                rest: vec!["plan"]
            }
        );
        assert_eq!(
            lines[3],
            Line::Data {
                number: 6,
                fields: vec!["E", "r1"]
            }
        );
    }

    #[test]
    fn unknown_headers_are_reported_with_their_line() {
        let err = split("ROWS\nQUADOBJ\n").unwrap_err();
        assert_eq!((err.number, err.word, err.foreign), (2, "QUADOBJ", true));
        assert_eq!(split("ENDATA\nanything\n").unwrap().len(), 1);
        let err = split("ROWS\nE r1\n").unwrap_err();
        assert_eq!((err.number, err.word, err.foreign), (2, "E", false));
    }
}

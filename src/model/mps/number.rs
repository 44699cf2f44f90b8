//! Exact decimal numbers as MPS files write them (`3`, `-2.5`, `1.000000000000e+00`, `.5`,
//! `7E-3`), and the infinities that bound fields accept.
//!
//! Invariant of [`Decimal`]: the value is `mantissa * 10^exponent`, the mantissa has no
//! trailing zeros (zero is `0 * 10^0`), so equal values have equal representations and the
//! number of decimal places is `max(0, -exponent)`.

/// Most significant digits kept exactly (so that the mantissa fits `i128` with room).
const MAX_DIGITS: usize = 36;
/// Largest exponent magnitude accepted in `e` notation.
const MAX_EXPONENT: i64 = 100_000;
/// Largest power of ten that fits `i128`.
const MAX_POW10: u32 = 38;
/// Values of at least `10^INFINITY_EXP10` in magnitude mean "infinite" in bound fields, as in
/// the general-purpose HiGHS reader (whose default infinity is `1e20`).
pub(super) const INFINITY_EXP10: i64 = 20;

/// An exact decimal `mantissa * 10^exponent`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) struct Decimal {
    mantissa: i128,
    exponent: i64,
}

/// A parsed numeric field.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Number {
    /// A finite decimal.
    Finite(Decimal),
    /// `inf`, `+infinity`, `-Inf`, ...; `true` for minus infinity.
    Infinite(bool),
}

/// Why a field is not a usable number.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum NumberError {
    /// Not decimal syntax at all.
    Syntax,
    /// More significant digits than can be held exactly.
    TooManyDigits,
    /// An exponent beyond `±100000`.
    Exponent,
}

impl NumberError {
    /// The message shown after the offending text.
    pub(super) fn describe(self) -> String {
        match self {
            Self::Syntax => "is not a number".to_string(),
            Self::TooManyDigits => {
                format!("has more than {MAX_DIGITS} significant digits")
            }
            Self::Exponent => format!("has an exponent beyond ±{MAX_EXPONENT}"),
        }
    }
}

/// Parses a numeric field (an optional sign, digits with at most one `.`, an optional `e`/`E`
/// exponent), or an infinity word.
pub(super) fn parse(text: &str) -> Result<Number, NumberError> {
    let (negative, body) = match text.as_bytes().first() {
        Some(b'-') => (true, &text[1..]),
        Some(b'+') => (false, &text[1..]),
        _ => (false, text),
    };
    if body.eq_ignore_ascii_case("inf") || body.eq_ignore_ascii_case("infinity") {
        return Ok(Number::Infinite(negative));
    }
    let (digits_part, exp_part) = match body.find(['e', 'E']) {
        Some(at) => (&body[..at], Some(&body[at + 1..])),
        None => (body, None),
    };
    let (int_part, frac_part) = match digits_part.split_once('.') {
        Some((i, f)) => (i, f),
        None => (digits_part, ""),
    };
    let all_digits = |s: &str| s.bytes().all(|b| b.is_ascii_digit());
    if int_part.len() + frac_part.len() == 0 || !all_digits(int_part) || !all_digits(frac_part) {
        return Err(NumberError::Syntax);
    }
    let exponent = match exp_part {
        Some(e) => parse_exponent(e)?,
        None => 0,
    };
    let digits = format!("{int_part}{frac_part}");
    let frac_len = i64::try_from(frac_part.len()).map_err(|_| NumberError::TooManyDigits)?;
    Decimal::from_digits(negative, &digits, exponent - frac_len).map(Number::Finite)
}

fn parse_exponent(text: &str) -> Result<i64, NumberError> {
    let (negative, digits) = match text.as_bytes().first() {
        Some(b'-') => (true, &text[1..]),
        Some(b'+') => (false, &text[1..]),
        _ => (false, text),
    };
    if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return Err(NumberError::Syntax);
    }
    let significant = digits.trim_start_matches('0');
    if significant.len() > 6 {
        return Err(NumberError::Exponent);
    }
    let value: i64 = significant.parse().unwrap_or(0);
    if value > MAX_EXPONENT {
        return Err(NumberError::Exponent);
    }
    Ok(if negative { -value } else { value })
}

impl Decimal {
    /// The integer `value` as a decimal.
    pub(super) fn from_int(value: i64) -> Self {
        let mut d = Self {
            mantissa: i128::from(value),
            exponent: 0,
        };
        d.normalise();
        d
    }

    fn from_digits(negative: bool, digits: &str, exponent: i64) -> Result<Self, NumberError> {
        let significant = digits.trim_start_matches('0');
        let kept = significant.trim_end_matches('0');
        if kept.is_empty() {
            return Ok(Self::from_int(0));
        }
        if kept.len() > MAX_DIGITS {
            return Err(NumberError::TooManyDigits);
        }
        let magnitude: i128 = kept.parse().map_err(|_| NumberError::Syntax)?;
        let trailing = i64::try_from(significant.len() - kept.len()).unwrap_or(i64::MAX);
        let exponent = exponent.saturating_add(trailing);
        if exponent.abs() > 2 * MAX_EXPONENT {
            return Err(NumberError::Exponent);
        }
        Ok(Self {
            mantissa: if negative { -magnitude } else { magnitude },
            exponent,
        })
    }

    fn normalise(&mut self) {
        if self.mantissa == 0 {
            self.exponent = 0;
            return;
        }
        while self.mantissa % 10 == 0 {
            self.mantissa /= 10;
            self.exponent += 1;
        }
    }

    /// Number of decimal places: the smallest `k` with `10^k * self` integral.
    pub(super) fn places(&self) -> u32 {
        u32::try_from((-self.exponent).max(0)).unwrap_or(u32::MAX)
    }

    /// `10^k * self` if it is an integer that fits `i128`.
    pub(super) fn scaled(&self, k: u32) -> Option<i128> {
        if self.mantissa == 0 {
            return Some(0);
        }
        let shift = u32::try_from(self.exponent.checked_add(i64::from(k))?).ok()?;
        if shift > MAX_POW10 {
            return None;
        }
        10i128.checked_pow(shift)?.checked_mul(self.mantissa)
    }

    /// The largest integer `<= self`, if it fits `i128`.
    pub(super) fn floor(&self) -> Option<i128> {
        if self.exponent >= 0 {
            return self.scaled(0);
        }
        match u32::try_from(-self.exponent) {
            Ok(d) if d <= MAX_POW10 => Some(self.mantissa.div_euclid(10i128.pow(d))),
            _ => Some(if self.mantissa < 0 { -1 } else { 0 }),
        }
    }

    /// The smallest integer `>= self`, if it fits `i128`.
    pub(super) fn ceil(&self) -> Option<i128> {
        let negated = Self {
            mantissa: -self.mantissa,
            exponent: self.exponent,
        };
        negated.floor().map(|f| -f)
    }

    /// Whether `|self| >= 10^20`, which bound fields read as infinite.
    pub(super) fn is_huge(&self) -> bool {
        if self.mantissa == 0 {
            return false;
        }
        let digits = i64::try_from(self.mantissa.unsigned_abs().to_string().len()).unwrap_or(0);
        digits - 1 + self.exponent >= INFINITY_EXP10
    }

    /// `|self| * 10^k`.
    pub(super) fn abs_shifted(&self, k: u32) -> Self {
        Self {
            mantissa: self.mantissa.abs(),
            exponent: self.exponent + i64::from(k),
        }
    }

    /// Whether the value is below zero.
    pub(super) fn is_negative(&self) -> bool {
        self.mantissa < 0
    }

    /// Whether the value is zero.
    pub(super) fn is_zero(&self) -> bool {
        self.mantissa == 0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn finite(text: &str) -> Decimal {
        match parse(text) {
            Ok(Number::Finite(d)) => d,
            other => panic!("{text}: {other:?}"),
        }
    }

    #[test]
    fn equal_values_have_one_representation() {
        assert_eq!(finite("1.000000000000e+00"), Decimal::from_int(1));
        assert_eq!(finite("+0250"), finite("2.5e2"));
        assert_eq!(finite("-0.0"), Decimal::from_int(0));
        assert_eq!(finite(".5"), finite("5E-1"));
        assert_eq!(finite("5."), Decimal::from_int(5));
    }

    #[test]
    fn places_and_scaling_are_exact() {
        let d = finite("-3.125");
        assert_eq!(d.places(), 3);
        assert_eq!(d.scaled(3), Some(-3125));
        assert_eq!(d.scaled(4), Some(-31250));
        assert_eq!(finite("1e-40").scaled(40), Some(1));
        assert_eq!(finite("1e30").scaled(10), None);
    }

    #[test]
    fn floor_and_ceil_round_towards_the_right_side() {
        assert_eq!(finite("2.5").floor(), Some(2));
        assert_eq!(finite("2.5").ceil(), Some(3));
        assert_eq!(finite("-2.5").floor(), Some(-3));
        assert_eq!(finite("-2.5").ceil(), Some(-2));
        assert_eq!(finite("-1e-60").floor(), Some(-1));
        assert_eq!(finite("1e-60").ceil(), Some(1));
        assert_eq!(finite("7").floor(), Some(7));
    }

    #[test]
    fn infinities_and_huge_values() {
        assert_eq!(parse("-Infinity"), Ok(Number::Infinite(true)));
        assert_eq!(parse("inf"), Ok(Number::Infinite(false)));
        assert!(finite("1e20").is_huge());
        assert!(finite("-100000000000000000000").is_huge());
        assert!(!finite("99999999999999999999").is_huge());
    }

    #[test]
    fn malformed_fields_are_refused() {
        for text in [
            "",
            "-",
            "1.2.3",
            "e5",
            "1e",
            "1e+",
            "0x10",
            "1,5",
            "nan",
            "1e5000000",
        ] {
            assert!(parse(text).is_err(), "{text}");
        }
        assert_eq!(parse("1e9999999"), Err(NumberError::Exponent));
        let long = "1".repeat(40);
        assert_eq!(parse(&long), Err(NumberError::TooManyDigits));
    }
}

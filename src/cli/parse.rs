//! Command-line values read with standard parsers: durations with `humantime` (`90s`,
//! `1h30m`, `1d`; a bare number is seconds), sizes with `parse-size` (`6GB`, `6GiB`, `512M`:
//! decimal units unless the binary `i` is written). Infinite, negative and (where it makes no
//! sense) zero values are refused with the text given.

use std::time::Duration;

/// A positive duration (`--budget`, `--time-limit`, `--checkpoint-every`, `--estimate`).
pub fn duration(text: &str) -> Result<Duration, String> {
    match age(text)? {
        d if d.is_zero() => Err(format!(
            "{text:?} is no time at all; give a positive duration"
        )),
        d => Ok(d),
    }
}

/// A duration that may be zero (`prune --older-than 0s` removes everything old).
pub fn age(text: &str) -> Result<Duration, String> {
    let text = text.trim();
    if let Ok(seconds) = text.parse::<f64>() {
        return Duration::try_from_secs_f64(seconds)
            .map_err(|_| format!("{text:?} is not a finite number of seconds of at least 0"));
    }
    humantime::parse_duration(text)
        .map_err(|e| format!("{text:?}: {e}; write a duration such as 90s, 40m, 1h30m or 1d"))
}

/// A positive number of bytes (`--max-memory`).
pub fn size(text: &str) -> Result<u64, String> {
    match parse_size::parse_size(text.trim()) {
        Ok(0) => Err(format!(
            "{text:?} is no memory at all; give a positive size"
        )),
        Ok(bytes) => Ok(bytes),
        Err(e) => Err(format!(
            "{text:?}: {e}; write a size such as 6GB, 6GiB or 512M"
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Units as `humantime` documents them (s, m, h, d, w; combined as in `1h30m`).
    #[test]
    fn durations_in_every_unit() {
        assert_eq!(duration("90s"), Ok(Duration::from_secs(90)));
        assert_eq!(duration("1h30m"), Ok(Duration::from_secs(5_400)));
        assert_eq!(duration("1d"), Ok(Duration::from_secs(86_400)));
        assert_eq!(duration("3w"), Ok(Duration::from_secs(3 * 7 * 86_400)));
        assert_eq!(duration("0.5"), Ok(Duration::from_millis(500)));
        assert_eq!(age("0s"), Ok(Duration::ZERO));
        assert_eq!(age("0"), Ok(Duration::ZERO));
    }

    #[test]
    fn bad_durations_are_refused_with_the_text() {
        for text in ["", "inf", "NaN", "-1", "-1d", "soon", "3q", "h", "1e400"] {
            let e = age(text).unwrap_err();
            assert!(e.contains(&format!("{:?}", text.trim())), "{text}: {e}");
        }
        assert!(duration("0s").is_err());
    }

    /// Decimal units unless binary ones are written (the `parse-size` documentation).
    #[test]
    fn sizes_in_decimal_and_binary_units() {
        assert_eq!(size("800"), Ok(800));
        assert_eq!(size("6GB"), Ok(6_000_000_000));
        assert_eq!(size("6GiB"), Ok(6 << 30));
        assert_eq!(size("512M"), Ok(512_000_000));
        assert_eq!(size("512MiB"), Ok(512 << 20));
        for text in ["0", "lots", "16EiB", "-5M"] {
            assert!(size(text).is_err(), "{text}");
        }
    }
}

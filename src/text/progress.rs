//! A running build in words: the stage, norm level, moves, rate and time left of one
//! progress record.

use crate::formats::progress::ProgressRecord;

/// `stage 3/5, norm level 8, 1200 moves, 450 moves/s, about 12 min left`.
pub fn progress_text(record: &ProgressRecord) -> String {
    let left = record.eta_seconds.map_or(String::new(), |s| {
        format!(", about {} left", duration_text(s))
    });
    format!(
        "stage {}/{}, norm level {}, {} moves, {:.0} moves/s{left}",
        record.stage, record.stages, record.norm_level, record.moves, record.moves_per_second
    )
}

/// Seconds as the largest one or two units (`45 s`, `12 min`, `3 h 20 min`).
pub fn duration_text(seconds: f64) -> String {
    let s = seconds.round() as u64;
    match s {
        0..=119 => format!("{s} s"),
        120..=7199 => format!("{} min", s / 60),
        _ => format!("{} h {} min", s / 3600, s % 3600 / 60),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn durations_show_their_largest_units() {
        assert_eq!(duration_text(75.0), "75 s");
        assert_eq!(duration_text(725.0), "12 min");
        assert_eq!(duration_text(12_000.0), "3 h 20 min");
    }
}

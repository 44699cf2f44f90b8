//! The batch result documents read back what they wrote: JSON Lines and CSV records, the
//! tally rebuilt from a results file, and the errors of a damaged file.

mod proptest_cases;
use proptest_cases::Class;

use std::borrow::Cow;

use kernstep::formats::batch::{
    read_csv, read_jsonl, write_csv_header, write_csv_rows, write_jsonl, ChangeColumns, DayRecord,
    DayStatus, Plan, Tally,
};
use kernstep::solve::{PlanFigures, Stability};
use kernstep::trace::Decimal;
use proptest::prelude::*;

/// Variable names with the characters CSV must quote (RFC 4180: comma, quote, line break).
fn names() -> Vec<String> {
    ["north->harbour", "a,b", "say \"hi\"", "two\nlines", "plain"]
        .map(String::from)
        .to_vec()
}

fn status() -> impl Strategy<Value = DayStatus> {
    prop::sample::select(DayStatus::ALL.to_vec())
}

prop_compose! {
    fn record()(
        day in proptest::option::of("[a-z0-9,\" -]{0,12}"),
        line in 1usize..100_000,
        status in status(),
        detail in proptest::option::of("[a-z ,\"]{1,20}"),
        answer in proptest::option::of((any::<i64>(), prop::collection::vec(-5i64..5, 5))),
        bound in proptest::option::of(any::<i64>()),
        steps in proptest::option::of(any::<u32>()),
        micros in 0u32..10_000_000,
        change in proptest::option::of((figures(), proptest::option::of(figures()))),
    ) -> DayRecord<'static> {
        let names = names();
        let plan = answer.as_ref().map(|(_, x)| Plan(
            names.iter().zip(x).filter(|(_, v)| **v != 0)
                .map(|(n, v)| (Cow::Owned(n.clone()), *v)).collect()));
        let mut r = blank(line, status);
        r.day = day.map(Cow::Owned);
        r.detail = detail;
        r.objective = answer.map(|(o, _)| Decimal::from(i128::from(o)));
        r.bound = bound.map(|b| b.to_string());
        r.gap = bound.map(|b| (i128::from(b) - 1).to_string());
        r.steps = steps.map(u64::from);
        r.seconds = f64::from(micros) / 1e6;
        r.plan = plan;
        r.change = change.map(|(priced, unpriced)| Stability { priced, unpriced });
        r
    }
}

prop_compose! {
    fn figures()(
        plan_cost in any::<i64>(),
        change_cost in 0i64..i64::MAX,
        changed in 0usize..1_000,
        moved in any::<u64>(),
    ) -> PlanFigures {
        PlanFigures {
            plan_cost: i128::from(plan_cost),
            change_cost: i128::from(change_cost),
            changed,
            moved: u128::from(moved),
        }
    }
}

/// A record with only its line and status; the rest empty.
fn blank(line: usize, status: DayStatus) -> DayRecord<'static> {
    let text = format!(
        r#"{{"day":null,"line":{line},"status":"{}","objective":null,"bound":null,"gap":null,"steps":null,"seconds":0.0,"plan":null}}"#,
        status.word()
    );
    serde_json::from_str(&text).unwrap()
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::RoundTrips))]

    /// JSON Lines: every field back as written.
    #[test]
    fn json_lines_read_back_what_they_wrote(records in prop::collection::vec(record(), 0..8)) {
        let mut text = Vec::new();
        write_jsonl(&mut text, &records).unwrap();
        let back = read_jsonl(text.as_slice(), "results.jsonl").unwrap();
        prop_assert_eq!(&back, &records);
        prop_assert_eq!(Tally::of(&back), Tally::of(&records));
    }

    /// CSV: every field back as written (seconds to the microsecond the CSV keeps, and an
    /// empty day name reads as none: CSV has no null), the change figures as far as the
    /// columns hold them (none without a price, the priced plan's with one, the unpriced
    /// plan's too when compared).
    #[test]
    fn csv_reads_back_what_it_wrote(
        records in prop::collection::vec(record(), 0..8),
        columns in prop::sample::select(vec![
            ChangeColumns::None, ChangeColumns::Priced, ChangeColumns::Compared,
        ]),
    ) {
        let names = names();
        let mut text = Vec::new();
        write_csv_header(&mut text, &names, columns).unwrap();
        write_csv_rows(&mut text, &records, &names, columns).unwrap();
        let back = read_csv(text.as_slice(), "results.csv").unwrap();
        prop_assert_eq!(back.len(), records.len());
        for (got, want) in back.iter().zip(&records) {
            let mut want = want.clone();
            want.day = want.day.filter(|d| !d.is_empty());
            want.detail = want.detail.filter(|d| !d.is_empty());
            want.change = match columns {
                ChangeColumns::None => None,
                ChangeColumns::Priced => want.change.map(|c| Stability { unpriced: None, ..c }),
                ChangeColumns::Compared => want.change,
            };
            prop_assert!((got.seconds - want.seconds).abs() < 1e-6);
            want.seconds = got.seconds;
            prop_assert_eq!(got, &want);
        }
    }
}

/// The tally adds the statuses, the costs of the answered days and the widest gap, compared
/// as integers (decimal strings of different lengths).
#[test]
fn the_tally_counts_statuses_costs_and_the_widest_gap() {
    let mut a = blank(1, DayStatus::Optimal);
    a.objective = Some(Decimal::from(10));
    a.bound = Some("10".into());
    a.gap = Some("0".into());
    let mut b = blank(2, DayStatus::OptimalWithinNorm);
    b.objective = Some(Decimal::from(25));
    b.bound = Some("16".into());
    b.gap = Some("9".into());
    let mut c = blank(3, DayStatus::OptimalWithinNorm);
    c.objective = Some(Decimal::from(120));
    c.bound = Some("100".into());
    c.gap = Some("20".into());
    let d = blank(4, DayStatus::Unknown);
    let t = Tally::of(&[a.clone(), b.clone(), c.clone(), d.clone()]);
    assert_eq!((t.days, t.optimal, t.optimal_by_bound), (4, 1, 1));
    assert_eq!((t.optimal_within_norm, t.unknown), (2, 1));
    assert_eq!(t.total_objective, Decimal::from(155));
    assert_eq!(t.largest_gap.as_deref(), Some("20"));
    assert_eq!(t.exit_code(), 1);
    let mut halves = Tally::of(&[a, b]);
    halves.absorb(Tally::of(&[c, d]));
    assert_eq!(halves, t);
}

/// A damaged results file is refused with the file, the line and the column.
#[test]
fn damaged_results_name_the_file_line_and_column() {
    let e = read_jsonl(&b"{\"day\":\"d1\"}\n"[..], "out.jsonl").unwrap_err();
    assert!(
        e.to_string()
            .starts_with("out.jsonl: line 1: not a day record"),
        "{e}"
    );
    let text = "day,line,status,objective,bound,gap,steps,seconds,detail,x\n\
                d1,1,optimal,5,,,2,0.1,,5\nd2,2,perhaps,,,,,0.1,,\n";
    let e = read_csv(text.as_bytes(), "out.csv").unwrap_err();
    assert!(
        e.to_string()
            .contains("out.csv: line 3, column status: unknown status \"perhaps\""),
        "{e}"
    );
    let e = read_csv(&b"when,line\n"[..], "out.csv").unwrap_err();
    assert!(
        e.to_string()
            .contains("out.csv: line 1: the header must start with day,line"),
        "{e}"
    );
}

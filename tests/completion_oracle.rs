//! Both completion methods against an independent brute-force oracle on random tiny matrices,
//! with random sign patterns and truncations.

mod completion_support;
mod proptest_cases;

use proptest_cases::Class;

use completion_support::*;
use kernstep::completion::{
    complete_kernel, Completion, Control, Cut, Method, Request, Sign, Truncation,
};
use kernstep::lattice::{det, echelon};
use kernstep::IntMatrix;
use proptest::prelude::*;

/// Largest absolute `r x r` minor of the independent rows (by enumeration).
fn largest_minor(a: &IntMatrix) -> i64 {
    let e = echelon(a);
    let rows = a.select_rows(&e.pivot_rows);
    let r = rows.rows();
    itertools_subsets(a.cols(), r)
        .into_iter()
        .map(|cols| {
            let d = det(&rows.select_cols(&cols));
            i64::try_from(d.magnitude().clone()).unwrap()
        })
        .max()
        .unwrap_or(1)
}

fn itertools_subsets(n: usize, k: usize) -> Vec<Vec<usize>> {
    use itertools::Itertools;
    (0..n).combinations(k).collect()
}

fn matrix_strategy() -> impl Strategy<Value = IntMatrix> {
    prop_oneof![
        proptest::collection::vec(-2i64..=2, 5).prop_map(|r| IntMatrix::from_rows(&[r]).unwrap()),
        (3usize..=4).prop_flat_map(|n| {
            proptest::collection::vec(proptest::collection::vec(-2i64..=2, n), 2)
                .prop_map(|rows| IntMatrix::from_rows(&rows).unwrap())
        }),
    ]
    .prop_filter("nonzero, with a kernel", |a| {
        let r = kernstep::lattice::rank(a);
        r >= 1 && r < a.cols()
    })
}

fn sign_strategy(n: usize) -> impl Strategy<Value = Vec<Sign>> {
    proptest::collection::vec(
        prop_oneof![
            2 => Just(Sign::Free),
            1 => Just(Sign::NonNegative),
            1 => Just(Sign::NonPositive)
        ],
        n,
    )
}

/// Box that holds every Graver element: `||g||_inf < (n - r) Δ`, since a Graver element is a
/// conformal sum of fewer than `n - r` circuits with coefficients below 1, and circuits have
/// entries at most Δ (Cramer's rule; Sturmfels 1996, ch. 4).
fn oracle_bound(a: &IntMatrix) -> i64 {
    let r = kernstep::lattice::rank(a) as i64;
    (a.cols() as i64 - r) * largest_minor(a)
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::Completion))]

    #[test]
    fn both_methods_equal_brute_force(
        (a, signs) in matrix_strategy().prop_flat_map(|a| {
            let n = a.cols();
            (Just(a), sign_strategy(n))
        })
    ) {
        let expected = brute_force_minimal(&a, &signs, oracle_bound(&a));
        for method in [Method::ProjectAndLift, Method::Pottier] {
            let request = Request {
                signs: signs.clone(),
                truncation: Truncation::default(),
                method,
                check_cuts: false,
            };
            let set = run(&a, &request);
            prop_assert_eq!(sorted(&set), expected.clone(), "{:?} on {:?}", method, a);
        }
    }

    #[test]
    fn truncation_equals_the_full_set_filtered(
        (a, signs, limit, cap) in matrix_strategy().prop_flat_map(|a| {
            let n = a.cols();
            (Just(a), sign_strategy(n), 1u64..12, proptest::collection::vec(0u64..5, n))
        })
    ) {
        let full = brute_force_minimal(&a, &signs, oracle_bound(&a));
        let norm = |g: &Vec<i64>| g.iter().map(|x| x.unsigned_abs()).sum::<u64>();
        let in_box = |g: &Vec<i64>| g.iter().zip(&cap).all(|(x, &c)| x.unsigned_abs() <= c);
        let by_norm: Vec<_> = full.iter().filter(|g| norm(g) <= limit).cloned().collect();
        let by_box: Vec<_> = full.iter().filter(|g| in_box(g)).cloned().collect();
        let cases = [
            (Truncation { norm_limit: Some(limit), bounds: None }, by_norm),
            (Truncation { norm_limit: None, bounds: Some(cap.clone()) }, by_box),
        ];
        for (truncation, expected) in cases {
            let mut request = Request {
                signs: signs.clone(),
                truncation: truncation.clone(),
                method: Method::ProjectAndLift,
                check_cuts: false,
            };
            prop_assert_eq!(sorted(&run(&a, &request)), expected.clone(), "{:?}", truncation);
            // With the check, the same set, and "cut nothing" only when nothing was cut.
            request.check_cuts = true;
            let Completion::Finished(set, cut) =
                complete_kernel(&a, &request, &Control::new(), None).unwrap()
            else {
                panic!("no limit was set");
            };
            prop_assert_eq!(sorted(&set), expected.clone(), "{:?}", truncation);
            if cut == Cut::Nothing {
                prop_assert_eq!(expected, full.clone(), "{:?} claimed to cut nothing", truncation);
            }
        }
    }
}

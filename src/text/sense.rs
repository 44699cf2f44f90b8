//! The words of a report in the sense of a file that maximises. kernstep minimises the
//! model's cost, and its reports say so ("no plan is cheaper"); for a model file that asks to
//! maximise (an MPS `OBJSENSE MAX`), whose objective the reports give in its own sense, the
//! same facts are worded for a maximum ("no plan has a higher objective").

use crate::model::Units;

/// Phrases about the minimised cost and their wording for a file that maximises.
const MAXIMISING: [(&str, &str); 5] = [
    (
        "no plan in the box is cheaper",
        "no plan in the box has a higher objective",
    ),
    ("no plan is cheaper", "no plan has a higher objective"),
    ("meets the cost", "meets the objective"),
    (
        "the cost falls without limit",
        "the objective rises without limit",
    ),
    ("lowers the cost", "raises the objective"),
];

/// `text` worded in the sense of the model's file: unchanged unless the file maximises.
pub fn in_file_sense(text: String, units: &Units) -> String {
    if !units.maximize {
        return text;
    }
    MAXIMISING.iter().fold(text, |text, (cost, objective)| {
        text.replace(cost, objective)
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_maximising_file_reads_of_its_objective() {
        let max = Units {
            maximize: true,
            ..Units::default()
        };
        let text = "2780, meets the cost: no plan is cheaper".to_string();
        assert_eq!(
            in_file_sense(text.clone(), &max),
            "2780, meets the objective: no plan has a higher objective"
        );
        assert_eq!(in_file_sense(text.clone(), &Units::default()), text);
        let ray = "unbounded: the cost falls without limit".to_string();
        assert_eq!(
            in_file_sense(ray, &max),
            "unbounded: the objective rises without limit"
        );
    }
}

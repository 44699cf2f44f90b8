//! Moves and plans in sparse form: the nonzero entries with their variable names.

use serde::{Deserialize, Serialize};

/// One nonzero entry of a vector, by variable.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct NamedEntry {
    /// Index of the variable (matrix column).
    pub index: usize,
    /// The variable's name.
    pub name: String,
    /// The entry.
    pub value: i64,
}

/// The nonzero entries of `vector`, in variable order, named by `names`.
///
/// # Panics
/// If `names` is shorter than `vector`.
pub fn named_entries(vector: &[i64], names: &[String]) -> Vec<NamedEntry> {
    vector
        .iter()
        .enumerate()
        .filter(|(_, &v)| v != 0)
        .map(|(index, &value)| NamedEntry {
            index,
            name: names[index].clone(),
            value,
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_only_nonzero_entries_in_order() {
        let names: Vec<String> = ["north", "east", "south"].map(String::from).to_vec();
        let entries = named_entries(&[2, 0, -1], &names);
        assert_eq!(entries.len(), 2);
        assert_eq!((entries[0].index, entries[0].value), (0, 2));
        assert_eq!((entries[1].name.as_str(), entries[1].value), ("south", -1));
    }
}

//! On-disk store of test sets.
#![deny(missing_docs)]

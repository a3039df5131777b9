//! Reports of results: JSON documents (the contract's keys) and readable
//! tables, in the input's units.

pub mod csv;
pub mod json;
pub mod table;

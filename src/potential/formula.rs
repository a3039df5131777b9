//! placeholder, replaced on integration
#![allow(missing_docs, dead_code)]
use std::collections::BTreeMap;
#[derive(Debug, Clone)]
pub struct Formula;
#[derive(Debug, Clone, thiserror::Error)]
#[error("formulas are not available yet")]
pub struct FormulaError;
impl FormulaError {
    pub fn offset(&self) -> usize {
        0
    }
}
impl Formula {
    pub fn parse(_s: &str, _c: &BTreeMap<String, f64>) -> Result<Formula, FormulaError> {
        Err(FormulaError)
    }
    pub fn eval(&self, _x: f64) -> f64 {
        0.0
    }
}

//! The cases of a study: `--vary` specifications, their grid, and shards.
//!
//! A `--vary KEY=START:STOP[:STEP]` gives the values `START + i STEP` for
//! `i = 0, 1, ...` while they do not pass `STOP` (STEP defaults to 1; a
//! negative STEP runs downwards); `--vary KEY=V1,V2,...` gives the listed
//! values. When START, STOP and STEP (or every listed value) are written as
//! whole numbers the values are integers (`chain.bonds`), otherwise floats.
//! Floats are computed as `START + i STEP`, not by repeated addition, so a
//! value does not depend on how many came before it.
//!
//! Several `--vary` flags make the Cartesian product, the first flag varying
//! slowest. Cases are numbered from 1 in that order; `--shard I/N` keeps the
//! cases `I, I + N, I + 2N, ...`.

use serde_json::{json, Value};

use crate::input::Override;

/// Most cases one study may have; more is almost surely a typing slip.
pub const MAX_CASES: usize = 100_000;

/// One value of a varied key, as written into the override.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CaseValue {
    /// A whole number (`chain.bonds=7`).
    Int(i64),
    /// A real number (`chain.alternation=0.45`).
    Float(f64),
}

impl CaseValue {
    /// The value as a float.
    pub fn as_f64(self) -> f64 {
        match self {
            CaseValue::Int(i) => i as f64,
            CaseValue::Float(x) => x,
        }
    }

    /// The value as the text of a TOML value (floats in their shortest
    /// round-trip form, always with a `.` or an exponent).
    pub fn toml_text(self) -> String {
        match self {
            CaseValue::Int(i) => i.to_string(),
            CaseValue::Float(x) => format!("{x:?}"),
        }
    }

    /// The value as JSON (an integer or a float).
    pub fn to_json(self) -> Value {
        match self {
            CaseValue::Int(i) => json!(i),
            CaseValue::Float(x) => json!(x),
        }
    }

    /// Reads a JSON number back (for merge and resume).
    pub fn from_json(v: &Value) -> Option<Self> {
        if let Some(i) = v.as_i64() {
            Some(CaseValue::Int(i))
        } else {
            v.as_f64().map(CaseValue::Float)
        }
    }
}

/// Why a `--vary` or `--shard` flag cannot be used (a usage error).
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum CaseError {
    /// The flag is not `KEY=...`.
    #[error("--vary {0}: expected KEY=START:STOP[:STEP] or KEY=V1,V2,...")]
    NotKeyValue(String),
    /// A number in the flag cannot be read.
    #[error("--vary {flag}: `{text}` is not a number")]
    BadNumber {
        /// The whole flag.
        flag: String,
        /// The part that is not a number.
        text: String,
    },
    /// The step is zero or not finite.
    #[error("--vary {0}: the step must be a finite number other than 0")]
    BadStep(String),
    /// The range holds no value.
    #[error("--vary {0}: the range is empty (STOP lies before START in the direction of STEP)")]
    Empty(String),
    /// Too many cases.
    #[error("{flag}: {count} cases is more than the {max} one study may run; use a coarser step or fewer values")]
    TooMany {
        /// The flag(s) at fault.
        flag: String,
        /// Number of cases asked for (saturated).
        count: usize,
        /// [`MAX_CASES`].
        max: usize,
    },
    /// The same key is varied twice.
    #[error("--vary {0}: the key is varied twice")]
    Repeated(String),
    /// `--shard` is not `I/N` with `1 <= I <= N`.
    #[error("--shard {0}: expected I/N with 1 <= I <= N (e.g. --shard 3/8)")]
    BadShard(String),
}

/// One `--vary` flag, parsed.
#[derive(Debug, Clone, PartialEq)]
pub struct Vary {
    /// The dotted key.
    pub key: String,
    /// The flag's text after `--vary `, for messages and for the document.
    pub spec: String,
    /// The values, in order.
    pub values: Vec<CaseValue>,
}

fn number(flag: &str, text: &str) -> Result<CaseValue, CaseError> {
    let t = text.trim();
    let bad = || CaseError::BadNumber {
        flag: flag.to_string(),
        text: t.to_string(),
    };
    if let Ok(i) = t.parse::<i64>() {
        return Ok(CaseValue::Int(i));
    }
    match t.parse::<f64>() {
        Ok(x) if x.is_finite() => Ok(CaseValue::Float(x)),
        _ => Err(bad()),
    }
}

impl Vary {
    /// Parses `KEY=START:STOP[:STEP]` or `KEY=V1,V2,...`.
    pub fn parse(flag: &str) -> Result<Self, CaseError> {
        let ov = Override::parse(flag).map_err(|_| CaseError::NotKeyValue(flag.to_string()))?;
        let text = ov.value.as_str();
        let values = if text.contains(':') {
            let parts: Vec<&str> = text.split(':').collect();
            if parts.len() > 3 {
                return Err(CaseError::NotKeyValue(flag.to_string()));
            }
            let start = number(flag, parts[0])?;
            let stop = number(flag, parts[1])?;
            let step = match parts.get(2) {
                Some(s) => number(flag, s)?,
                None => CaseValue::Int(1),
            };
            range(flag, start, stop, step)?
        } else {
            let values = text
                .split(',')
                .map(|t| number(flag, t))
                .collect::<Result<Vec<_>, _>>()?;
            if values.iter().all(|v| matches!(v, CaseValue::Int(_))) {
                values
            } else {
                values
                    .into_iter()
                    .map(|v| CaseValue::Float(v.as_f64()))
                    .collect()
            }
        };
        if values.len() > MAX_CASES {
            return Err(CaseError::TooMany {
                flag: format!("--vary {flag}"),
                count: values.len(),
                max: MAX_CASES,
            });
        }
        Ok(Self {
            key: ov.key,
            spec: flag.to_string(),
            values,
        })
    }
}

fn range(
    flag: &str,
    start: CaseValue,
    stop: CaseValue,
    step: CaseValue,
) -> Result<Vec<CaseValue>, CaseError> {
    if let (CaseValue::Int(a), CaseValue::Int(b), CaseValue::Int(s)) = (start, stop, step) {
        if s == 0 {
            return Err(CaseError::BadStep(flag.to_string()));
        }
        if (b - a).signum() * s.signum() < 0 {
            return Err(CaseError::Empty(flag.to_string()));
        }
        let count = ((b - a) / s) as u128 + 1;
        if count > MAX_CASES as u128 {
            return Err(CaseError::TooMany {
                flag: format!("--vary {flag}"),
                count: usize::try_from(count).unwrap_or(usize::MAX),
                max: MAX_CASES,
            });
        }
        return Ok((0..count as i64)
            .map(|i| CaseValue::Int(a + i * s))
            .collect());
    }
    let (a, b, s) = (start.as_f64(), stop.as_f64(), step.as_f64());
    if s == 0.0 || !s.is_finite() {
        return Err(CaseError::BadStep(flag.to_string()));
    }
    let span = (b - a) / s;
    if span < 0.0 {
        return Err(CaseError::Empty(flag.to_string()));
    }
    // Tolerate rounding in (b - a) / s so that 0:1:0.1 includes 1.
    let count = (span + 1e-9 * span.max(1.0)).floor() + 1.0;
    if count > MAX_CASES as f64 {
        return Err(CaseError::TooMany {
            flag: format!("--vary {flag}"),
            count: if count >= usize::MAX as f64 {
                usize::MAX
            } else {
                count as usize
            },
            max: MAX_CASES,
        });
    }
    Ok((0..count as usize)
        .map(|i| CaseValue::Float(a + i as f64 * s))
        .collect())
}

/// Which share of the cases one run takes: `index` in `1..=count`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// 1-based shard number.
    pub index: usize,
    /// Number of shards.
    pub count: usize,
}

impl Shard {
    /// Parses `I/N`.
    pub fn parse(text: &str) -> Result<Self, CaseError> {
        let bad = || CaseError::BadShard(text.to_string());
        let (i, n) = text.split_once('/').ok_or_else(bad)?;
        let index: usize = i.trim().parse().map_err(|_| bad())?;
        let count: usize = n.trim().parse().map_err(|_| bad())?;
        if index == 0 || count == 0 || index > count {
            return Err(bad());
        }
        Ok(Self { index, count })
    }

    /// Whether case number `case` (1-based) belongs to this shard.
    pub fn takes(&self, case: usize) -> bool {
        case >= self.index && (case - self.index).is_multiple_of(self.count)
    }
}

/// One case: its number (1-based) and the value of each varied key.
#[derive(Debug, Clone, PartialEq)]
pub struct Case {
    /// 1-based number in the whole study (not in the shard).
    pub number: usize,
    /// One value per varied key, in the order of the flags.
    pub values: Vec<CaseValue>,
}

impl Case {
    /// The overrides that make this case, to apply after the `--set` ones.
    pub fn overrides(&self, keys: &[String]) -> Vec<Override> {
        keys.iter()
            .zip(&self.values)
            .map(|(k, v)| Override {
                key: k.clone(),
                value: v.toml_text(),
            })
            .collect()
    }

    /// `key=value` pairs, for messages.
    pub fn label(&self, keys: &[String]) -> String {
        keys.iter()
            .zip(&self.values)
            .map(|(k, v)| format!("{k}={}", v.toml_text()))
            .collect::<Vec<_>>()
            .join(" ")
    }
}

/// The whole grid of cases of a study.
#[derive(Debug, Clone, PartialEq)]
pub struct CaseGrid {
    /// The varied keys, in the order of the flags.
    pub varies: Vec<Vary>,
}

impl CaseGrid {
    /// Builds the grid, refusing repeated keys and grids of more than
    /// [`MAX_CASES`] cases.
    pub fn new(varies: Vec<Vary>) -> Result<Self, CaseError> {
        for (i, v) in varies.iter().enumerate() {
            if varies[..i].iter().any(|w| w.key == v.key) {
                return Err(CaseError::Repeated(v.spec.clone()));
            }
        }
        let total = varies
            .iter()
            .try_fold(1usize, |acc, v| acc.checked_mul(v.values.len()));
        match total {
            Some(t) if t <= MAX_CASES => Ok(Self { varies }),
            t => Err(CaseError::TooMany {
                flag: varies
                    .iter()
                    .map(|v| format!("--vary {}", v.spec))
                    .collect::<Vec<_>>()
                    .join(" "),
                count: t.unwrap_or(usize::MAX),
                max: MAX_CASES,
            }),
        }
    }

    /// The varied keys.
    pub fn keys(&self) -> Vec<String> {
        self.varies.iter().map(|v| v.key.clone()).collect()
    }

    /// Number of cases in the whole study.
    pub fn len(&self) -> usize {
        self.varies.iter().map(|v| v.values.len()).product()
    }

    /// Whether the study has no case (only with no `--vary` at all).
    pub fn is_empty(&self) -> bool {
        self.varies.is_empty()
    }

    /// Case number `number` (1-based), the last flag varying fastest.
    ///
    /// # Panics
    /// When `number` is 0 or beyond [`Self::len`] (an internal invariant).
    #[track_caller]
    pub fn case(&self, number: usize) -> Case {
        assert!(
            number >= 1 && number <= self.len(),
            "case {number} out of range"
        );
        let mut rest = number - 1;
        let mut values = vec![CaseValue::Int(0); self.varies.len()];
        for (slot, v) in values.iter_mut().zip(&self.varies).rev() {
            let n = v.values.len();
            *slot = v.values[rest % n];
            rest /= n;
        }
        Case { number, values }
    }

    /// The cases a shard takes (all of them without a shard), in order.
    pub fn cases(&self, shard: Option<Shard>) -> Vec<Case> {
        (1..=self.len())
            .filter(|&c| shard.is_none_or(|s| s.takes(c)))
            .map(|c| self.case(c))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integer_range_with_and_without_step() {
        let v = Vary::parse("chain.bonds=2:8").unwrap();
        assert_eq!(v.key, "chain.bonds");
        assert_eq!(v.values.len(), 7);
        assert_eq!(v.values[6], CaseValue::Int(8));
        let v = Vary::parse("chain.bonds=10:2:-4").unwrap();
        assert_eq!(
            v.values,
            vec![CaseValue::Int(10), CaseValue::Int(6), CaseValue::Int(2)]
        );
    }

    #[test]
    fn float_range_includes_the_end_despite_rounding() {
        let v = Vary::parse("chain.alternation=0:1:0.1").unwrap();
        assert_eq!(v.values.len(), 11);
        assert_eq!(v.values[3], CaseValue::Float(3.0 * 0.1));
        assert_eq!(v.values[3].toml_text(), "0.30000000000000004");
    }

    #[test]
    fn lists_mix_to_floats() {
        let v = Vary::parse("x.y=1,2.5,3").unwrap();
        assert_eq!(v.values[0], CaseValue::Float(1.0));
        assert_eq!(v.values[0].toml_text(), "1.0");
    }

    #[test]
    fn bad_flags_are_refused() {
        assert!(matches!(
            Vary::parse("chain.bonds=8:2"),
            Err(CaseError::Empty(_))
        ));
        assert!(matches!(
            Vary::parse("chain.bonds=1:2:0"),
            Err(CaseError::BadStep(_))
        ));
        assert!(matches!(
            Vary::parse("chain.bonds=1:100000000"),
            Err(CaseError::TooMany { .. })
        ));
        assert!(matches!(
            Vary::parse("chain.bonds=a:3"),
            Err(CaseError::BadNumber { .. })
        ));
        assert!(Vary::parse("chain.bonds").is_err());
        let a = Vary::parse("a.b=1:1000").unwrap();
        let b = Vary::parse("c.d=1:1000").unwrap();
        assert!(matches!(
            CaseGrid::new(vec![a.clone(), b]),
            Err(CaseError::TooMany { .. })
        ));
        assert!(matches!(
            CaseGrid::new(vec![a.clone(), a]),
            Err(CaseError::Repeated(_))
        ));
    }

    #[test]
    fn grid_order_and_shards_cover_every_case_once() {
        let g = CaseGrid::new(vec![
            Vary::parse("a.b=1:3").unwrap(),
            Vary::parse("c.d=0.5,1.5").unwrap(),
        ])
        .unwrap();
        assert_eq!(g.len(), 6);
        assert_eq!(
            g.case(2).values,
            vec![CaseValue::Int(1), CaseValue::Float(1.5)]
        );
        assert_eq!(
            g.case(3).values,
            vec![CaseValue::Int(2), CaseValue::Float(0.5)]
        );
        let mut seen: Vec<usize> = (1..=4)
            .flat_map(|i| {
                g.cases(Some(Shard { index: i, count: 4 }))
                    .into_iter()
                    .map(|c| c.number)
            })
            .collect();
        seen.sort();
        assert_eq!(seen, (1..=6).collect::<Vec<_>>());
        assert!(Shard::parse("0/3").is_err());
        assert!(Shard::parse("4/3").is_err());
        assert_eq!(Shard::parse("2/3").unwrap(), Shard { index: 2, count: 3 });
    }

    proptest::proptest! {
        #[test]
        fn shards_partition_the_cases(a in 1usize..6, b in 1usize..6, n in 1usize..9) {
            let g = CaseGrid::new(vec![
                Vary::parse(&format!("a.b=1:{a}")).unwrap(),
                Vary::parse(&format!("c.d=1:{b}")).unwrap(),
            ])
            .unwrap();
            let mut seen: Vec<usize> = (1..=n)
                .flat_map(|i| g.cases(Some(Shard { index: i, count: n })).into_iter().map(|c| c.number))
                .collect();
            seen.sort_unstable();
            proptest::prop_assert_eq!(seen, (1..=a * b).collect::<Vec<_>>());
        }
    }
}

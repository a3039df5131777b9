//! placeholder, replaced on integration
#![allow(missing_docs)]
use nalgebra::DMatrix;

#[derive(Debug, Clone)]
pub struct SymBanded {
    pub n: usize,
    pub bands: Vec<Vec<f64>>,
    pub wrap: bool,
}
impl SymBanded {
    pub fn half_bandwidth(&self) -> usize {
        self.bands.len() - 1
    }
    pub fn to_dense(&self) -> DMatrix<f64> {
        let mut m = DMatrix::zeros(self.n, self.n);
        for (d, b) in self.bands.iter().enumerate() {
            for (i, &v) in b.iter().enumerate() {
                let j = if self.wrap { (i + d) % self.n } else { i + d };
                if d == 0 {
                    m[(i, i)] += v;
                } else {
                    m[(i, j)] += v;
                    m[(j, i)] += v;
                }
            }
        }
        m
    }
}
pub struct Problem<'a> {
    pub a: &'a SymBanded,
    pub b: Option<&'a SymBanded>,
}
pub enum Selection {
    Index { first: usize, count: usize },
    Below { energy: f64 },
}
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Method {
    #[default]
    Auto,
    Dense,
    Tridiagonal,
    ShiftInvert,
}
#[derive(Debug, Clone, Default)]
pub struct EigenParams {
    pub method: Method,
}
pub struct Eigenpairs {
    pub first: usize,
    pub values: Vec<f64>,
    pub vectors: Vec<Vec<f64>>,
}
pub struct EigenInfo {
    pub method: Method,
    pub iterations: usize,
    pub factorizations: usize,
    pub inertia_below: usize,
    pub residual_ratio: f64,
    pub orthogonality_ratio: f64,
}
#[derive(Debug, thiserror::Error)]
pub enum EigenError {
    #[error("levels {first}..{} do not exist: the grid has {n} unknowns", first + count)]
    SelectionOutOfRange {
        first: usize,
        count: usize,
        n: usize,
    },
}
pub fn solve(
    p: &Problem,
    sel: &Selection,
    _params: &EigenParams,
) -> Result<(Eigenpairs, EigenInfo), EigenError> {
    let a = p.a.to_dense();
    let n = p.a.n;
    let eig = nalgebra::SymmetricEigen::new(a);
    let mut idx: Vec<usize> = (0..n).collect();
    idx.sort_by(|&i, &j| eig.eigenvalues[i].total_cmp(&eig.eigenvalues[j]));
    let (first, count) = match sel {
        Selection::Index { first, count } => (*first, *count),
        Selection::Below { energy } => (
            0,
            idx.iter()
                .filter(|&&i| eig.eigenvalues[i] < *energy)
                .count(),
        ),
    };
    if first + count > n {
        return Err(EigenError::SelectionOutOfRange { first, count, n });
    }
    let sel: Vec<usize> = idx[first..first + count].to_vec();
    let values = sel.iter().map(|&i| eig.eigenvalues[i]).collect();
    let vectors = sel
        .iter()
        .map(|&i| eig.eigenvectors.column(i).iter().copied().collect())
        .collect();
    Ok((
        Eigenpairs {
            first,
            values,
            vectors,
        },
        EigenInfo {
            method: Method::Dense,
            iterations: 0,
            factorizations: 0,
            inertia_below: first + count,
            residual_ratio: 0.0,
            orthogonality_ratio: 0.0,
        },
    ))
}

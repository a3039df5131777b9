//! The built-in operations and the postfix program that runs them.
//!
//! A compiled formula is a flat list of [`Op`]s in postfix (reverse Polish)
//! order, run on a value stack (Aho, Lam, Sethi and Ullman, *Compilers:
//! Principles, Techniques, and Tools*, 2nd ed., sec. 2.8). Every operation
//! follows IEEE 754: `1/0` gives infinity, `sqrt(-1)` and `ln(-1)` give NaN,
//! and `min` / `max` give NaN when either argument is NaN.

/// Values kept on the stack without heap allocation during evaluation.
pub(super) const INLINE_STACK: usize = 32;

/// One-argument built-in functions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Func1 {
    Sin,
    Cos,
    Tan,
    Exp,
    Ln,
    Sqrt,
    Abs,
    Cosh,
    Sinh,
    Tanh,
}

impl Func1 {
    /// Every one-argument function with its name in expressions.
    pub(super) const ALL: [(&'static str, Func1); 10] = [
        ("sin", Func1::Sin),
        ("cos", Func1::Cos),
        ("tan", Func1::Tan),
        ("exp", Func1::Exp),
        ("ln", Func1::Ln),
        ("sqrt", Func1::Sqrt),
        ("abs", Func1::Abs),
        ("cosh", Func1::Cosh),
        ("sinh", Func1::Sinh),
        ("tanh", Func1::Tanh),
    ];

    pub(super) fn apply(self, v: f64) -> f64 {
        match self {
            Func1::Sin => v.sin(),
            Func1::Cos => v.cos(),
            Func1::Tan => v.tan(),
            Func1::Exp => v.exp(),
            Func1::Ln => v.ln(),
            Func1::Sqrt => v.sqrt(),
            Func1::Abs => v.abs(),
            Func1::Cosh => v.cosh(),
            Func1::Sinh => v.sinh(),
            Func1::Tanh => v.tanh(),
        }
    }
}

/// Two-argument built-in functions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Func2 {
    Min,
    Max,
}

impl Func2 {
    /// Every two-argument function with its name in expressions.
    pub(super) const ALL: [(&'static str, Func2); 2] = [("min", Func2::Min), ("max", Func2::Max)];

    /// NaN-propagating minimum / maximum.
    pub(super) fn apply(self, a: f64, b: f64) -> f64 {
        if a.is_nan() || b.is_nan() {
            return f64::NAN;
        }
        match self {
            Func2::Min => a.min(b),
            Func2::Max => a.max(b),
        }
    }
}

/// Binary arithmetic operators.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum BinOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
}

impl BinOp {
    pub(super) fn apply(self, a: f64, b: f64) -> f64 {
        match self {
            BinOp::Add => a + b,
            BinOp::Sub => a - b,
            BinOp::Mul => a * b,
            BinOp::Div => a / b,
            BinOp::Pow => a.powf(b),
        }
    }
}

/// One instruction of the postfix program.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Op {
    Const(f64),
    X,
    Neg,
    Bin(BinOp),
    Call1(Func1),
    Call2(Func2),
}

/// A postfix program with the greatest stack depth it reaches.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Program {
    pub(super) ops: Vec<Op>,
    pub(super) stack_depth: usize,
}

impl Program {
    /// Wraps `ops`, which must be well-formed postfix code (every operator
    /// finds its operands on the stack, one value is left at the end).
    pub(super) fn new(ops: Vec<Op>) -> Program {
        let mut sp = 0usize;
        let mut stack_depth = 0usize;
        for op in &ops {
            match op {
                Op::Const(_) | Op::X => sp += 1,
                Op::Bin(_) | Op::Call2(_) => sp -= 1,
                Op::Neg | Op::Call1(_) => {}
            }
            stack_depth = stack_depth.max(sp);
        }
        Program { ops, stack_depth }
    }

    /// The program's value at `x`; no allocation when the stack fits in
    /// [`INLINE_STACK`] values.
    pub(super) fn eval(&self, x: f64) -> f64 {
        if let [Op::Const(c)] = self.ops.as_slice() {
            return *c;
        }
        if self.stack_depth <= INLINE_STACK {
            let mut stack = [0.0f64; INLINE_STACK];
            run(&self.ops, x, &mut stack)
        } else {
            let mut stack = vec![0.0f64; self.stack_depth];
            run(&self.ops, x, &mut stack)
        }
    }
}

/// Runs a postfix program; `stack` must hold at least the program's
/// greatest stack depth.
fn run(ops: &[Op], x: f64, stack: &mut [f64]) -> f64 {
    let mut sp = 0usize;
    for op in ops {
        match *op {
            Op::Const(c) => {
                stack[sp] = c;
                sp += 1;
            }
            Op::X => {
                stack[sp] = x;
                sp += 1;
            }
            Op::Neg => stack[sp - 1] = -stack[sp - 1],
            Op::Bin(b) => {
                sp -= 1;
                stack[sp - 1] = b.apply(stack[sp - 1], stack[sp]);
            }
            Op::Call1(f) => stack[sp - 1] = f.apply(stack[sp - 1]),
            Op::Call2(f) => {
                sp -= 1;
                stack[sp - 1] = f.apply(stack[sp - 1], stack[sp]);
            }
        }
    }
    stack[0]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stack_depth_of_postfix_code() {
        // x 2 * 3 +  -> (x * 2) + 3 needs two slots; worked by hand.
        let p = Program::new(vec![
            Op::X,
            Op::Const(2.0),
            Op::Bin(BinOp::Mul),
            Op::Const(3.0),
            Op::Bin(BinOp::Add),
        ]);
        assert_eq!(p.stack_depth, 2);
        assert_eq!(p.eval(4.0), 11.0);
    }

    #[test]
    fn heap_stack_gives_the_same_value() {
        // x + (x + (x + ...)) with 40 x needs 40 slots, beyond the inline
        // stack; the sum is 40 x.
        let mut ops = vec![Op::X; 40];
        ops.extend(std::iter::repeat_n(Op::Bin(BinOp::Add), 39));
        let p = Program::new(ops);
        assert_eq!(p.stack_depth, 40);
        assert!(p.stack_depth > INLINE_STACK);
        assert_eq!(p.eval(0.5), 20.0);
    }

    #[test]
    fn min_and_max_propagate_nan() {
        // Documented choice: NaN is never hidden by min / max.
        assert!(Func2::Min.apply(f64::NAN, 1.0).is_nan());
        assert!(Func2::Max.apply(1.0, f64::NAN).is_nan());
        assert_eq!(Func2::Min.apply(-1.0, 1.0), -1.0);
    }
}

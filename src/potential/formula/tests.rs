//! End-to-end tests of the formula language: text in, values and errors
//! out. Tests of one stage sit beside its code.

use super::eval::{BinOp, Op, INLINE_STACK};
use super::parse::{EXPECT_OPEN, EXPECT_OPERAND};
use super::*;
use approx::assert_relative_eq;
use proptest::prelude::*;

fn no_constants() -> BTreeMap<String, f64> {
    BTreeMap::new()
}

fn eval_at(source: &str, x: f64) -> f64 {
    match Formula::parse(source, &no_constants()) {
        Ok(f) => f.eval(x),
        Err(e) => panic!("`{source}` failed to parse: {e}"),
    }
}

fn err(source: &str) -> FormulaError {
    err_with(source, &no_constants())
}

fn err_with(source: &str, constants: &BTreeMap<String, f64>) -> FormulaError {
    match Formula::parse(source, constants) {
        Ok(_) => panic!("`{source}` parsed but should fail"),
        Err(e) => e,
    }
}

#[test]
fn precedence_table() {
    // Ordinary mathematical conventions (worked by hand).
    let cases: [(&str, f64, f64); 16] = [
        ("-x^2", 3.0, -9.0),
        ("2^3^2", 0.0, 512.0),
        ("1-2-3", 0.0, -4.0),
        ("8/4/2", 0.0, 1.0),
        ("-2^2", 0.0, -4.0),
        ("(-2)^2", 0.0, 4.0),
        ("2*-3", 0.0, -6.0),
        ("2^-1", 0.0, 0.5),
        ("1+2*3", 0.0, 7.0),
        ("(1+2)*3", 0.0, 9.0),
        ("2*3^2", 0.0, 18.0),
        ("-x*2", 4.0, -8.0),
        ("2^-1*3", 0.0, 1.5),
        ("--x", 5.0, 5.0),
        ("+x - -x", 5.0, 10.0),
        ("x - 1 + 1", 2.0, 2.0),
    ];
    for (src, x, want) in cases {
        assert_eq!(eval_at(src, x), want, "{src} at x = {x}");
    }
}

#[test]
fn number_forms() {
    // Literal values (no source needed).
    assert_eq!(eval_at("1", 0.0), 1.0);
    assert_eq!(eval_at("2.5", 0.0), 2.5);
    assert_eq!(eval_at("1e-3", 0.0), 1e-3);
    assert_eq!(eval_at("1E+3", 0.0), 1e3);
    assert_eq!(eval_at(".5", 0.0), 0.5);
    assert_eq!(eval_at("3.", 0.0), 3.0);
    assert_eq!(eval_at("2.5e2", 0.0), 250.0);
}

#[test]
fn every_function_matches_std() {
    type Unary = fn(f64) -> f64;
    let cases: [(&str, Unary); 10] = [
        ("sin", f64::sin),
        ("cos", f64::cos),
        ("tan", f64::tan),
        ("exp", f64::exp),
        ("ln", f64::ln),
        ("sqrt", f64::sqrt),
        ("abs", f64::abs),
        ("cosh", f64::cosh),
        ("sinh", f64::sinh),
        ("tanh", f64::tanh),
    ];
    for (name, f) in cases {
        let formula = Formula::parse(&format!("{name}(x)"), &no_constants()).unwrap();
        for x in [0.3, 1.7, 2.9, -0.8] {
            let want = f(x);
            let got = formula.eval(x);
            assert!(
                got == want || (got.is_nan() && want.is_nan()),
                "{name}({x}) = {got}, std gives {want}"
            );
        }
    }
    assert_eq!(eval_at("min(x, 2)", 3.0), 2.0);
    assert_eq!(eval_at("max(x, 2)", 3.0), 3.0);
    assert_eq!(eval_at("min(-x, x)", 3.0), -3.0);
    assert_eq!(eval_at("max(2, x)", 1.0), 2.0);
    // NaN propagates through min/max (documented choice).
    assert!(eval_at("min(sqrt(x), 1)", -1.0).is_nan());
    assert!(eval_at("max(1, ln(x))", -1.0).is_nan());
}

#[test]
fn ieee_semantics() {
    assert_eq!(eval_at("1/x", 0.0), f64::INFINITY);
    assert!(eval_at("ln(x)", -1.0).is_nan());
    assert!(eval_at("sqrt(x)", -1.0).is_nan());
}

#[test]
fn constants_and_pi() {
    let mut c = BTreeMap::new();
    c.insert("a".to_string(), 1.0);
    c.insert("b".to_string(), 2.0);
    c.insert("c".to_string(), 0.3);
    c.insert("depth_2".to_string(), 4.0);
    let f = Formula::parse("a * sin(x / b)^2 - c", &c).unwrap();
    for x in [0.0f64, 0.7, 3.1] {
        // closed form of the same expression
        let want = (x / 2.0).sin().powf(2.0) - 0.3;
        assert_relative_eq!(f.eval(x), want, max_relative = 1e-15);
    }
    assert!(f.uses_x());
    let g = Formula::parse("depth_2 * cos(pi)", &c).unwrap();
    assert_eq!(g.eval(123.0), -4.0);
    assert!(!g.uses_x());
    // Folded to a single constant.
    assert_eq!(g.program.ops.len(), 1);
    assert_eq!(eval_at("pi", 0.0), std::f64::consts::PI);
}

#[test]
fn folding_leaves_only_x_dependent_code() {
    let f = Formula::parse("x * (2 * 3 + sin(0))", &no_constants()).unwrap();
    assert_eq!(
        f.program.ops,
        vec![Op::X, Op::Const(6.0), Op::Bin(BinOp::Mul)]
    );
    assert_eq!(f.program.stack_depth, 2);
}

#[test]
fn deep_stack_uses_heap_path() {
    // Right-nested sums need one stack slot per level.
    let n = 40;
    let src = format!("{}x{}", "(x+".repeat(n), ")".repeat(n));
    let f = Formula::parse(&src, &no_constants()).unwrap();
    assert!(f.program.stack_depth > INLINE_STACK);
    assert_eq!(f.eval(1.5), 1.5 * (n as f64 + 1.0));
}

#[test]
fn error_offsets_for_each_kind() {
    use FormulaErrorKind as K;
    let cases: Vec<(&str, usize, K)> = vec![
        ("", 0, K::Empty),
        ("   ", 0, K::Empty),
        ("x $ 2", 2, K::UnexpectedChar { found: '$' }),
        ("x + 1e+", 4, K::BadNumber { text: "1e+".into() }),
        (
            "1.2.3",
            0,
            K::BadNumber {
                text: "1.2.3".into(),
            },
        ),
        (
            "2 * 1e999",
            4,
            K::BadNumber {
                text: "1e999".into(),
            },
        ),
        (
            "x + * 2",
            4,
            K::UnexpectedToken {
                found: "*".into(),
                expected: EXPECT_OPERAND,
            },
        ),
        (
            "sin x",
            4,
            K::UnexpectedToken {
                found: "x".into(),
                expected: EXPECT_OPEN,
            },
        ),
        (
            "(x, 1)",
            2,
            K::UnexpectedToken {
                found: ",".into(),
                expected: "`)`",
            },
        ),
        (
            "x *",
            3,
            K::UnexpectedEnd {
                expected: EXPECT_OPERAND,
            },
        ),
        (
            "2 + cos",
            7,
            K::UnexpectedEnd {
                expected: EXPECT_OPEN,
            },
        ),
        ("1 + (2 * (x)", 4, K::UnbalancedParen),
        ("max(x, 2", 3, K::UnbalancedParen),
        (
            "1 + sn(x)",
            4,
            K::UnknownName {
                name: "sn".into(),
                suggestion: Some("sin".into()),
            },
        ),
        (
            "PI * x",
            0,
            K::UnknownName {
                name: "PI".into(),
                suggestion: Some("pi".into()),
            },
        ),
        (
            "x + wobble",
            4,
            K::UnknownName {
                name: "wobble".into(),
                suggestion: None,
            },
        ),
        (
            "2 * sin(x, 1)",
            4,
            K::WrongArity {
                function: "sin".into(),
                expected: 1,
                found: 2,
            },
        ),
        (
            "min(x)",
            0,
            K::WrongArity {
                function: "min".into(),
                expected: 2,
                found: 1,
            },
        ),
        (
            "cos()",
            0,
            K::WrongArity {
                function: "cos".into(),
                expected: 1,
                found: 0,
            },
        ),
        ("2x", 1, K::ImplicitMultiplication { found: "x".into() }),
        ("(x)(x)", 3, K::ImplicitMultiplication { found: "(".into() }),
        (
            "2 sin(x)",
            2,
            K::ImplicitMultiplication {
                found: "sin".into(),
            },
        ),
        ("x + 1)", 5, K::TrailingInput { found: ")".into() }),
        ("x, 2", 1, K::TrailingInput { found: ",".into() }),
    ];
    for (src, offset, kind) in cases {
        let e = err(src);
        assert_eq!((e.offset(), e.kind()), (offset, &kind), "source `{src}`");
    }
}

#[test]
fn offsets_count_characters_not_bytes() {
    // "α" is two bytes in UTF-8 but one column.
    let e = err("x + αβ");
    assert_eq!(
        e.kind(),
        &FormulaErrorKind::UnknownName {
            name: "αβ".into(),
            suggestion: None
        }
    );
    assert_eq!(e.offset(), 4);
    let e = err("αβ + 1 + #");
    assert_eq!(e.offset(), 9);
}

#[test]
fn constant_errors() {
    for reserved in ["x", "pi", "sin", "max"] {
        let mut c = BTreeMap::new();
        c.insert(reserved.to_string(), 1.0);
        let e = err_with("1", &c);
        assert_eq!(e.offset(), 0);
        assert_eq!(
            e.kind(),
            &FormulaErrorKind::ConstantShadows {
                name: reserved.into()
            }
        );
    }
    for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
        let mut c = BTreeMap::new();
        c.insert("depth".to_string(), bad);
        let e = err_with("depth * x", &c);
        assert_eq!(e.offset(), 0);
        assert_eq!(
            e.kind(),
            &FormulaErrorKind::NonFiniteConstant {
                name: "depth".into()
            }
        );
    }
    // Suggestions also come from the caller's constants (swap of two
    // neighbours counts as one edit).
    let mut c = BTreeMap::new();
    c.insert("width".to_string(), 1.0);
    let e = err_with("x / widht", &c);
    assert_eq!(
        e.kind(),
        &FormulaErrorKind::UnknownName {
            name: "widht".into(),
            suggestion: Some("width".into())
        }
    );
    assert_eq!(e.offset(), 4);
}

#[test]
fn too_deep_is_an_error_not_a_crash() {
    let src = format!("{}x{}", "(".repeat(10_000), ")".repeat(10_000));
    assert!(matches!(err(&src).kind(), FormulaErrorKind::TooDeep { .. }));
    let src = format!("{}x", "-".repeat(10_000));
    assert!(matches!(err(&src).kind(), FormulaErrorKind::TooDeep { .. }));
    // Calls and exponent towers nest as well.
    let src = format!("{}x{}", "sin(".repeat(10_000), ")".repeat(10_000));
    assert!(matches!(err(&src).kind(), FormulaErrorKind::TooDeep { .. }));
    let src = ["x"; 10_000].join("^");
    assert!(matches!(err(&src).kind(), FormulaErrorKind::TooDeep { .. }));
    // Just inside the limit is fine.
    let src = format!("{}x{}", "(".repeat(MAX_DEPTH), ")".repeat(MAX_DEPTH));
    assert_eq!(eval_at(&src, 1.5), 1.5);
}

/// Regression: a flat sum of 300 terms was refused as "nested more than 256
/// levels deep"; the limit counted the length of the sum, not its nesting.
#[test]
fn flat_sum_of_300_terms_is_not_too_deep() {
    let src = ["x"; 300].join("+");
    assert_eq!(eval_at(&src, 1.0), 300.0);
    // Thousands of terms parse, fold and run without deep recursion, also
    // at the deepest nesting allowed.
    let src = ["x"; 5000].join(" + ");
    assert_eq!(eval_at(&src, 0.5), 2500.0);
    let src = ["x"; 3000].join(" * ");
    assert_eq!(eval_at(&src, -1.0), 1.0);
    let sum = ["1"; 4000].join("-");
    let src = format!(
        "{}x + {sum}{}",
        "(".repeat(MAX_DEPTH),
        ")".repeat(MAX_DEPTH)
    );
    // x + 1 - 1 - ... - 1 with 3999 subtractions.
    assert_eq!(eval_at(&src, 0.0), 1.0 - 3999.0);
}

#[test]
fn messages_read_well() {
    assert_eq!(
        err("1 + sn(x)").to_string(),
        "unknown name `sn` in expression (did you mean `sin`?)"
    );
    assert_eq!(
        err("2x").to_string(),
        "missing operator before `x` (implicit multiplication is not allowed; write `*`)"
    );
    assert_eq!(
        err("min(x)").to_string(),
        "function `min` takes 2 arguments but was given 1"
    );
    assert_eq!(
        err("sin(x, x)").to_string(),
        "function `sin` takes 1 argument but was given 2"
    );
    assert_eq!(err("(x").to_string(), "this `(` is never closed");
    assert_eq!(
        err("x +").to_string(),
        "the expression ends early: expected a number, a name or `(`"
    );
}

fn kinks_of(source: &str, from: f64, to: f64) -> Vec<f64> {
    match Formula::parse(source, &no_constants()) {
        Ok(f) => f.kinks(from, to),
        Err(e) => panic!("`{source}` failed to parse: {e}"),
    }
}

/// `got` matches `want` one to one within 1e-12.
fn assert_kinks(source: &str, got: &[f64], want: &[f64]) {
    assert_eq!(got.len(), want.len(), "`{source}`: {got:?}, want {want:?}");
    for (g, w) in got.iter().zip(want) {
        assert!((g - w).abs() <= 1e-12, "`{source}`: {got:?}, want {want:?}");
    }
}

#[test]
fn corners_sit_at_the_roots_of_the_arguments() {
    // Each reference is the root of the argument in closed form.
    let s2 = std::f64::consts::SQRT_2;
    let pi = std::f64::consts::PI;
    let cases: Vec<(&str, f64, f64, Vec<f64>)> = vec![
        ("2*abs(x - 0.005)", -20.0, 20.0, vec![0.005]),
        ("abs(x^2 - 2)", -3.0, 3.0, vec![-s2, s2]),
        ("min(x, 2*x)", -1.7, 2.3, vec![0.0]),
        ("max(x, 1 - x)", -4.0, 4.0, vec![0.5]),
        ("abs(x - 1) + min(x, 2*x)", -5.0, 5.0, vec![0.0, 1.0]),
        ("abs(abs(x) - 1)", -3.0, 2.0, vec![-1.0, 0.0, 1.0]),
        ("max(min(x, 3), -x/2)", -10.0, 10.0, vec![0.0, 3.0]),
        // Zeros of sin at k pi (DLMF 4.14).
        ("abs(sin(x))", 0.5, 10.0, vec![pi, 2.0 * pi, 3.0 * pi]),
        // A corner at a large offset keeps its relative accuracy.
        ("abs(x - 1234.5678)", 1000.0, 2000.0, vec![1234.5678]),
    ];
    for (src, from, to, want) in cases {
        assert_kinks(src, &kinks_of(src, from, to), &want);
    }
    // Constants take part like numbers.
    let c = BTreeMap::from([("c".to_string(), 0.25), ("d".to_string(), 3.0)]);
    let f = Formula::parse("d * abs(x - c)", &c).unwrap();
    assert_kinks("d * abs(x - c)", &f.kinks(-1.0, 1.0), &[0.25]);
    // Only corners strictly inside the interval.
    assert_kinks("abs(x - 1)", &kinks_of("abs(x - 1)", 1.0, 2.0), &[]);
    assert_kinks("abs(x - 1)", &kinks_of("abs(x - 1)", 2.0, 3.0), &[]);
}

#[test]
fn smooth_formulas_have_no_corners() {
    let c = BTreeMap::from([
        ("a".to_string(), 0.8),
        ("b".to_string(), 2.5),
        ("s".to_string(), 0.05),
    ]);
    let f = Formula::parse("a * sin(pi * x / b)^2 + s * (x - 7.5)", &c).unwrap();
    assert!(f.kinks(0.0, 15.0).is_empty());
    for src in ["exp(-x^2) + cosh(x)", "x^2", "tanh(x - 1)", "abs(2) * x"] {
        assert!(kinks_of(src, -5.0, 5.0).is_empty(), "`{src}`");
    }
}

#[test]
fn touches_and_poles_are_not_corners() {
    // The argument reaches zero without changing sign.
    for src in ["abs((x - 1)^2)", "max((x - 1)^2, 0)", "min(x^2, 0) + x"] {
        assert!(kinks_of(src, -4.0, 4.0).is_empty(), "`{src}`");
    }
    // The argument changes sign through infinity.
    assert!(kinks_of("abs(1 / (x - 0.3))", -2.0, 2.0).is_empty());
    assert!(kinks_of("abs(1 / x)", -2.0, 2.0).is_empty());
}

/// A random expression tree for the round-trip property.
#[derive(Debug, Clone)]
enum T {
    Num(f64),
    X,
    Neg(Box<T>),
    Bin(char, Box<T>, Box<T>),
    F1(&'static str, Box<T>),
    F2(&'static str, Box<T>, Box<T>),
}

/// Prints with full parentheses.
fn print(t: &T) -> String {
    match t {
        T::Num(v) => format!("{v}"),
        T::X => "x".into(),
        T::Neg(a) => format!("(-{})", print(a)),
        T::Bin(op, a, b) => format!("({} {op} {})", print(a), print(b)),
        T::F1(name, a) => format!("{name}({})", print(a)),
        T::F2(name, a, b) => format!("{name}({}, {})", print(a), print(b)),
    }
}

/// Direct evaluation of the tree with std functions.
fn direct(t: &T, x: f64) -> f64 {
    match t {
        T::Num(v) => *v,
        T::X => x,
        T::Neg(a) => -direct(a, x),
        T::Bin(op, a, b) => {
            let (p, q) = (direct(a, x), direct(b, x));
            match op {
                '+' => p + q,
                '-' => p - q,
                '*' => p * q,
                '/' => p / q,
                _ => p.powf(q),
            }
        }
        T::F1(name, a) => {
            let v = direct(a, x);
            match *name {
                "sin" => v.sin(),
                "cos" => v.cos(),
                "tan" => v.tan(),
                "exp" => v.exp(),
                "ln" => v.ln(),
                "sqrt" => v.sqrt(),
                "abs" => v.abs(),
                "cosh" => v.cosh(),
                "sinh" => v.sinh(),
                _ => v.tanh(),
            }
        }
        T::F2(name, a, b) => {
            let (p, q) = (direct(a, x), direct(b, x));
            if p.is_nan() || q.is_nan() {
                f64::NAN
            } else if *name == "min" {
                p.min(q)
            } else {
                p.max(q)
            }
        }
    }
}

fn tree() -> impl Strategy<Value = T> {
    let leaf = prop_oneof![(0.0f64..10.0).prop_map(T::Num), Just(T::X)];
    leaf.prop_recursive(6, 48, 2, |inner| {
        let ops = vec!['+', '-', '*', '/', '^'];
        let funcs = vec![
            "sin", "cos", "tan", "exp", "ln", "sqrt", "abs", "cosh", "sinh", "tanh",
        ];
        prop_oneof![
            inner.clone().prop_map(|a| T::Neg(Box::new(a))),
            (prop::sample::select(ops), inner.clone(), inner.clone())
                .prop_map(|(op, a, b)| T::Bin(op, Box::new(a), Box::new(b))),
            (prop::sample::select(funcs), inner.clone()).prop_map(|(f, a)| T::F1(f, Box::new(a))),
            (
                prop::sample::select(vec!["min", "max"]),
                inner.clone(),
                inner
            )
                .prop_map(|(f, a, b)| T::F2(f, Box::new(a), Box::new(b))),
        ]
    })
}

proptest! {
    #[test]
    fn random_ascii_never_panics(src in "[ -~]{0,40}") {
        match Formula::parse(&src, &no_constants()) {
            Ok(f) => {
                let _ = f.eval(0.5);
            }
            Err(e) => prop_assert!(e.offset() <= src.chars().count()),
        }
    }

    #[test]
    fn random_token_soup_never_panics(
        parts in prop::collection::vec(
            prop::sample::select(vec![
                "x", "2", ".5", "1e3", "pi", "a", "sin", "min", "(", ")", ",", "+", "-",
                "*", "/", "^", " ", "e", "1.", "sn",
            ]),
            0..30,
        )
    ) {
        let src: String = parts.concat();
        let mut c = BTreeMap::new();
        c.insert("a".to_string(), 2.0);
        match Formula::parse(&src, &c) {
            Ok(f) => {
                let _ = f.eval(-1.25);
            }
            Err(e) => prop_assert!(e.offset() <= src.chars().count()),
        }
    }

    #[test]
    fn printed_tree_round_trips(t in tree(), x in -5.0f64..5.0) {
        let src = print(&t);
        let parsed = Formula::parse(&src, &no_constants());
        prop_assert!(parsed.is_ok(), "`{}` failed: {:?}", src, parsed);
        let got = parsed.map(|f| f.eval(x)).unwrap_or(f64::NAN);
        let want = direct(&t, x);
        // Folding and evaluation do the same operations in the same
        // order, so the results are bit-identical.
        prop_assert!(
            got == want || (got.is_nan() && want.is_nan()),
            "`{}` at x = {}: got {}, want {}", src, x, got, want
        );
    }
}

//! The catalogue of bad inputs: each case is refused with exit status 2, a
//! message that names the file, line, column and key at fault, and no file
//! written or changed.
//!
//! Every case runs the built binary in a fresh folder holding only the case's
//! input (and CSV table, if any); afterwards the folder must hold exactly the
//! same files with the same bytes.

mod common;

use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

use common::bin;

/// A bad input and what the error must say.
struct Case {
    /// Name of the case (also the scratch folder's).
    name: &'static str,
    /// The input file's text, written as `in.toml`.
    toml: &'static [u8],
    /// A table file beside the input: (name, bytes).
    csv: Option<(&'static str, &'static [u8])>,
    /// `--set` flags.
    sets: &'static [&'static str],
    /// Where the error must point: `FILE:LINE:COL` with FILE relative to the
    /// case's folder, or `--set KEY=VALUE` for an override.
    at: &'static str,
    /// The key the message must name (in backquotes); empty for TOML syntax
    /// errors, which belong to no key.
    key: &'static str,
    /// Words the message must contain; empty for no check.
    says: &'static str,
    /// The subcommand and its flags after the input; `{dir}` stands for the
    /// case's folder. Empty: `solve --json`.
    command: &'static [&'static str],
}

const fn case(name: &'static str, toml: &'static str, at: &'static str, key: &'static str) -> Case {
    Case {
        name,
        toml: toml.as_bytes(),
        csv: None,
        sets: &[],
        at,
        key,
        says: "",
        command: &[],
    }
}

const fn saying(mut c: Case, says: &'static str) -> Case {
    c.says = says;
    c
}

const fn with_command(mut c: Case, command: &'static [&'static str]) -> Case {
    c.command = command;
    c
}

const fn with_csv(mut c: Case, file: &'static str, bytes: &'static [u8]) -> Case {
    c.csv = Some((file, bytes));
    c
}

const fn with_sets(mut c: Case, sets: &'static [&'static str]) -> Case {
    c.sets = sets;
    c
}

/// A valid domain (lines 1-3) and a small grid (lines 4-5).
macro_rules! domain {
    ($($rest:expr),*) => {
        concat!("[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 40\n", $($rest),*)
    };
}

/// A domain (lines 1-5) and a table term reading `data.csv` (lines 6-9).
macro_rules! table {
    ($interp:expr) => {
        concat!(
            domain!(),
            "[[term]]\nshape = \"table\"\nfile = \"data.csv\"\ninterpolation = \"",
            $interp,
            "\"\n"
        )
    };
}

const CASES: &[Case] = &[
    // --- TOML syntax ---
    case("syntax_open_bracket", "[domain\nfrom = 0.0\n", "in.toml:1:8", ""),
    case("syntax_missing_value", "[domain]\nfrom =\nto = 1.0\n", "in.toml:2:7", ""),
    case("syntax_duplicate_key", "[domain]\nfrom = 0.0\nfrom = 1.0\n", "in.toml:3:1", ""),
    case("syntax_bad_string", "title = \"open\n[domain]\n", "in.toml:1:14", ""),
    // --- unknown keys ---
    case("unknown_top_level", concat!(domain!(), "colour = 3\n"), "in.toml:6:1", "colour"),
    case("unknown_in_domain", "[domain]\nfrom = 0.0\nto = 10.0\nwidth = 3\n", "in.toml:4:1", "domain.width"),
    case("unknown_in_term", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 1.0\nheight = 1.0\nsize = 2\n"), "in.toml:11:1", "term.size"),
    case("key_shape_does_not_take", concat!(domain!(), "[[term]]\nshape = \"gauss\"\ncenter = 1.0\nheight = 1.0\nwidth = 1.0\nslope = 2.0\n"), "in.toml:11:9", "term[1].slope"),
    // --- wrong types ---
    case("wrong_type_string_for_number", "[domain]\nfrom = 0.0\nto = \"ten\"\n", "in.toml:3:6", "domain.to"),
    case("wrong_type_float_for_count", concat!(domain!(), "[levels]\ncount = 3.5\n"), "in.toml:7:9", "levels.count"),
    case("wrong_type_bool_for_bonds", "[chain]\nbonds = true\n", "in.toml:2:9", "chain.bonds"),
    case("wrong_type_table_for_value", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = { n = 3 }\n", "in.toml:5:10", "grid.points"),
    case("wrong_type_number_for_shape", concat!(domain!(), "[[term]]\nshape = 4\n"), "in.toml:7:9", "term.shape"),
    // --- missing required keys ---
    case("missing_domain_and_chain", "[grid]\npoints = 40\n", "in.toml:1:1", "domain"),
    case("missing_domain_from", "[domain]\nto = 10.0\n", "in.toml:1:1", "domain.from"),
    case("missing_term_shape", concat!(domain!(), "[[term]]\nheight = 1.0\n"), "in.toml:6:1", "term.shape"),
    case("missing_step_height", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 1.0\n"), "in.toml:7:9", "term[1].height"),
    case("missing_table_file_key", concat!(domain!(), "[[term]]\nshape = \"table\"\n"), "in.toml:7:9", "term[1].file"),
    case("missing_chain_bonds", "[chain]\nbond_length = 1.4\n", "in.toml:1:1", "chain.bonds"),
    // --- non-positive lengths, masses, counts ---
    case("negative_spacing", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\nspacing = -0.1\n", "in.toml:5:11", "grid.spacing"),
    case("zero_points", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 0\n", "in.toml:5:10", "grid.points"),
    case("zero_mass", concat!(domain!(), "[particle]\nmass = 0.0\n"), "in.toml:7:8", "particle.mass"),
    case("negative_mass", concat!(domain!(), "[particle]\nmass = -1.0\n"), "in.toml:7:8", "particle.mass"),
    case("zero_bonds", "[chain]\nbonds = 0\n", "in.toml:2:9", "chain.bonds"),
    case("negative_bond_length", "[chain]\nbonds = 4\nbond_length = -1.4\n", "in.toml:3:15", "chain.bond_length"),
    case("negative_end_extension", "[chain]\nbonds = 4\nend_extension = -0.1\n", "in.toml:3:17", "chain.end_extension"),
    case("zero_level_count", concat!(domain!(), "[levels]\ncount = 0\n"), "in.toml:7:9", "levels.count"),
    case("negative_electrons", concat!(domain!(), "[levels]\nelectrons = -2\n"), "in.toml:7:13", "levels.electrons"),
    case("zero_first_level", concat!(domain!(), "[levels]\nfirst = 0\n"), "in.toml:7:9", "levels.first"),
    case("zero_gauss_width", concat!(domain!(), "[[term]]\nshape = \"gauss\"\ncenter = 1.0\nheight = 1.0\nwidth = 0.0\n"), "in.toml:10:9", "term[1].width"),
    case("zero_ripple_period", concat!(domain!(), "[[term]]\nshape = \"ripple\"\namplitude = 1.0\nperiod = 0\n"), "in.toml:9:10", "term[1].period"),
    case("zero_morse_range", concat!(domain!(), "[[term]]\nshape = \"morse\"\ncenter = 1.0\ndepth = 1.0\nrange = 0.0\n"), "in.toml:10:9", "term[1].range"),
    case("zero_site_width", "[chain]\nbonds = 4\n[[chain.site]]\natom = 2\nheight = -1.0\nwidth = 0.0\n", "in.toml:6:9", "chain.site[1].width"),
    // --- from >= to ---
    case("domain_to_equals_from", "[domain]\nfrom = 5.0\nto = 5.0\n", "in.toml:3:6", "domain.to"),
    case("domain_length_overflows", "[domain]\nfrom = -1e308\nto = 1e308\n", "in.toml:3:6", "domain.to"),
    case("domain_to_below_from", "[domain]\nfrom = 5.0\nto = -5.0\n", "in.toml:3:6", "domain.to"),
    case("step_to_below_from", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 3.0\nto = 2.0\nheight = 1.0\n"), "in.toml:9:6", "term[1].to"),
    case("ripple_window_reversed", concat!(domain!(), "[[term]]\nshape = \"ripple\"\namplitude = 1.0\nperiod = 2.0\nfrom = 3.0\nto = 3.0\n"), "in.toml:11:6", "term[1].to"),
    // --- NaN and infinity in values ---
    case("nan_domain_end", "[domain]\nfrom = 0.0\nto = nan\n", "in.toml:3:6", "domain.to"),
    case("inf_step_height", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 1.0\nheight = inf\n"), "in.toml:10:10", "term[1].height"),
    case("negative_inf_gauss_center", concat!(domain!(), "[[term]]\nshape = \"gauss\"\ncenter = -inf\nheight = 1.0\nwidth = 1.0\n"), "in.toml:8:10", "term[1].center"),
    case("nan_ripple_phase", concat!(domain!(), "[[term]]\nshape = \"ripple\"\namplitude = 1.0\nperiod = 2.0\nphase = nan\n"), "in.toml:10:9", "term[1].phase"),
    case("nan_formula_constant", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"a * x\"\n[term.constants]\na = nan\n"), "in.toml:10:5", "term[1].constants.a"),
    case("nan_chain_alternation", "[chain]\nbonds = 4\nalternation = nan\n", "in.toml:3:15", "chain.alternation"),
    case("inf_spectrum_width", concat!(domain!(), "[spectrum]\nwidth = inf\n"), "in.toml:7:9", "spectrum.width"),
    case("nan_levels_below", concat!(domain!(), "[levels]\nbelow = nan\n"), "in.toml:7:9", "levels.below"),
    case("nan_table_outside", concat!(domain!(), "[[term]]\nshape = \"table\"\nfile = \"data.csv\"\noutside = nan\n"), "in.toml:9:11", "term[1].outside"),
    // --- formulas ---
    case("formula_unknown_name", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"2 * sn(x)\"\n"), "in.toml:8:19", "term[1].expression"),
    case("formula_unbalanced_paren", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"(x + 1\"\n"), "in.toml:8:15", "term[1].expression"),
    case("formula_extra_close_paren", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"x + 1)\"\n"), "in.toml:8:20", "term[1].expression"),
    case("formula_empty", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"  \"\n"), "in.toml:8:15", "term[1].expression"),
    // 40 points on [0, 10]: h = 10/41 and no point hits 5; 9 points: h = 1, x = 5 is one.
    case("formula_division_by_zero_at_a_point", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 9\n[[term]]\nshape = \"formula\"\nexpression = \"1 / (x - 5)\"\n", "in.toml:7:9", "term[1]"),
    case("formula_nan_on_part_of_the_grid", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"sqrt(x - 5)\"\n"), "in.toml:7:9", "term[1]"),
    case("formula_overflows", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"exp(100 * x)\"\n"), "in.toml:7:9", "term[1]"),
    case("formula_constant_reserved_name", concat!(domain!(), "[[term]]\nshape = \"formula\"\nexpression = \"x\"\n[term.constants]\nsin = 2.0\n"), "in.toml:10:7", "term[1].constants.sin"),
    case("terms_sum_to_infinity", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 10.0\nheight = 1e308\n[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 10.0\nheight = 1e308\n"), "in.toml:12:9", "term[2]"),
    // --- tables ---
    with_csv(case("table_unsorted_x", table!("linear"), "data.csv:4:1", "term[1].file"), "data.csv", b"x,V\n0,1\n2,1\n1,1\n"),
    with_csv(case("table_duplicate_x", table!("linear"), "data.csv:3:1", "term[1].file"), "data.csv", b"x,V\n0,1\n0,2\n1,1\n"),
    with_csv(case("table_too_few_rows_linear", table!("linear"), "in.toml:8:8", "term[1].file"), "data.csv", b"x,V\n0,1\n"),
    with_csv(case("table_too_few_rows_cubic", table!("cubic"), "in.toml:8:8", "term[1].file"), "data.csv", b"x,V\n0,1\n1,2\n"),
    with_csv(case("table_missing_column", table!("linear"), "data.csv:1:1", "term[1].file"), "data.csv", b"x,U\n0,1\n1,1\n"),
    with_csv(case("table_nan_cell", table!("linear"), "data.csv:3:3", "term[1].file"), "data.csv", b"x,V\n0,1\n1,nan\n2,1\n"),
    with_csv(case("table_inf_cell", table!("linear"), "data.csv:2:1", "term[1].file"), "data.csv", b"x,V\ninf,1\n1,1\n2,1\n"),
    with_csv(case("table_bad_number", table!("linear"), "data.csv:3:5", "term[1].file"), "data.csv", b"x,V\n0,1\n1,  one\n2,1\n"),
    with_csv(case("table_wrong_field_count", table!("linear"), "data.csv:3:1", "term[1].file"), "data.csv", b"x,V\n0,1\n1,1,1\n2,1\n"),
    with_csv(case("table_not_utf8", table!("linear"), "data.csv:3:1", "term[1].file"), "data.csv", b"x,V\n0,1\n1,\xff\n2,1\n"),
    with_csv(case("table_empty", table!("linear"), "in.toml:8:8", "term[1].file"), "data.csv", b"# nothing\n"),
    case("table_file_not_there", table!("linear"), "in.toml:8:8", "term[1].file"),
    // --- input file not UTF-8 ---
    Case {
        name: "input_not_utf8",
        toml: b"[domain]\nfrom = 0.0\nto = 1\xff0.0\n",
        csv: None,
        sets: &[],
        at: "in.toml:3:7",
        key: "",
        says: "",
        command: &[],
    },
    // --- levels and electrons against the grid ---
    case("count_larger_than_grid", concat!(domain!(), "[levels]\ncount = 41\n"), "in.toml:7:9", "levels.count"),
    case("first_plus_count_beyond_grid", concat!(domain!(), "[levels]\nfirst = 39\ncount = 3\n"), "in.toml:8:9", "levels.count"),
    case("electrons_beyond_computed_levels", concat!(domain!(), "[levels]\ncount = 3\nelectrons = 20\n"), "in.toml:8:13", "levels.electrons"),
    // Electrons written in the input that the computed levels cannot hold
    // (a chain's one-per-atom default only skips the filling, with a warning).
    case("chain_electrons_beyond_computed_levels", "[chain]\nbonds = 9\n[grid]\npoints = 40\n[levels]\ncount = 4\nelectrons = 10\n", "in.toml:7:13", "levels.electrons"),
    // Regression: levels.count beside levels.below was silently ignored.
    case("below_with_count", concat!(domain!(), "[levels]\nbelow = 1.0\ncount = 3\n"), "in.toml:8:9", "levels.count"),
    case("grid_too_small_for_stencil", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 5\norder = 8\n", "in.toml:5:10", "grid.points"),
    // --- other refused values ---
    case("order_not_allowed", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\norder = 5\n", "in.toml:5:9", "grid.order"),
    case("two_resolutions", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 40\nspacing = 0.1\n", "in.toml:6:11", "grid.spacing"),
    case("spacing_too_coarse", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\nspacing = 6.0\n", "in.toml:5:11", "grid.spacing"),
    case("unknown_unit", concat!(domain!(), "[units]\nlength = \"furlong\"\n"), "in.toml:7:10", "units.length"),
    case("unknown_boundary", "[domain]\nfrom = 0.0\nto = 10.0\nboundary = \"soft\"\n", "in.toml:4:12", "domain.boundary"),
    case("unknown_shape", concat!(domain!(), "[[term]]\nshape = \"wobble\"\n"), "in.toml:7:9", "term[1].shape"),
    case("chain_and_domain", "[chain]\nbonds = 4\n[domain]\nfrom = 0.0\nto = 1.0\n", "in.toml:3:1", "domain"),
    case("site_atom_beyond_chain", "[chain]\nbonds = 4\n[[chain.site]]\natom = 6\nheight = -1.0\n", "in.toml:4:8", "chain.site[1].atom"),
    case("huge_count_overflows_i64", concat!(domain!(), "[levels]\ncount = 99999999999999999999\n"), "in.toml:7:9", ""),
    // --- overrides ---
    with_sets(case("set_unknown_key", domain!(), "--set grid.pointz=3", "grid.pointz"), &["grid.pointz=3"]),
    with_sets(case("set_wrong_type", domain!(), "--set grid.points=many", "grid.points"), &["grid.points=many"]),
    with_sets(case("set_bad_value", domain!(), "--set grid.points=-4", "grid.points"), &["grid.points=-4"]),
    with_sets(case("set_index_out_of_range", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 1.0\nheight = 1.0\n"), "--set term.2.height=3", "term.2.height"), &["term.2.height=3"]),
    with_sets(case("set_list_without_index", concat!(domain!(), "[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 1.0\nheight = 1.0\n"), "--set term.height=3", "term.height"), &["term.height=3"]),
    with_sets(case("set_nan", domain!(), "--set domain.to=nan", "domain.to"), &["domain.to=nan"]),
    with_sets(case("set_value_into_a_value", domain!(), "--set domain.to.x=1", "domain.to.x"), &["domain.to.x=1"]),
    // Regression: a fault inside an inline table given by --set was located
    // at line 1 of the file.
    with_sets(case("set_inline_table_fault", domain!(), "--set grid={points=-3}", "grid.points"), &["grid={points=-3}"]),
    with_sets(saying(case("set_inline_table_unknown_key", domain!(), "--set grid={pointz=3}", "grid"), "unknown field `pointz`"), &["grid={pointz=3}"]),
    with_sets(saying(case("set_list_for_a_table", domain!(), "--set domain=[0.0, 1.0]", "domain"), "expected a table"), &["domain=[0.0, 1.0]"]),
    // --- messages in the input file's words ---
    // Regression: a dotted key nested past the reader's limit gave
    // "recursion limit" with no line.
    saying(case("deep_dotted_table_header", concat!(domain!(), "[a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a]\nx = 1\n"), "in.toml:6:2", ""), "nested too deeply"),
    saying(case("deep_dotted_key", concat!(domain!(), "a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a.a = 1\n"), "in.toml:6:1", ""), "nested too deeply"),
    // Regression: "expected i64" and "expected f64".
    saying(case("float_for_a_whole_number", concat!(domain!(), "[levels]\nfirst = 2.5\n"), "in.toml:7:9", "levels.first"), "expected a whole number"),
    saying(case("string_for_a_number", "[domain]\nfrom = \"zero\"\nto = 10.0\n", "in.toml:2:8", "domain.from"), "expected a number"),
    saying(case("whole_number_beyond_i64", "[chain]\nbonds = 99999999999999999999\n", "in.toml:2:9", "chain.bonds"), "too large"),
    saying(case("number_for_a_table", "domain = 3\n", "in.toml:1:10", "domain"), "expected a table"),
    // Regression: serde's list form of a struct was taken for the table.
    saying(case("list_for_the_domain_table", "domain = [0.0, 12.0, \"walls\"]\n", "in.toml:1:10", "domain"), "expected a table"),
    saying(case("list_for_the_grid_table", "grid = [40]\n[domain]\nfrom = 0.0\nto = 10.0\n", "in.toml:1:8", "grid"), "expected a table"),
    saying(case("list_for_a_term", concat!("term = [[\"step\", 0.0, 1.0, 1.0]]\n", domain!()), "in.toml:1:9", "term"), "expected a table"),
    saying(case("list_for_a_chain_site", "[chain]\nbonds = 4\nsite = [[2, -1.0]]\n", "in.toml:3:9", "chain.site"), "expected a table"),
    // Regression: a table file that cannot be read was reported at line 0.
    with_command(case("data_file_not_there", "[chain]\nbonds = 4\n[grid]\npoints = 40\n", "missing.csv", ""), &["fit", "--data", "{dir}/missing.csv", "--free", "chain.bond_length"]),
    // Regression: control characters from the input reached the terminal.
    Case {
        name: "raw_escape_in_a_title",
        toml: b"title = \"red\x1b[31m\"\n[domain]\nfrom = 0.0\nto = 10.0\n",
        csv: None,
        sets: &[],
        at: "in.toml:1:13",
        key: "title",
        says: "\\u{1b}",
        command: &[],
    },
    saying(case("escaped_control_in_a_shape", concat!(domain!(), "[[term]]\nshape = \"\\u001b[2J\\u0007\"\n"), "in.toml:7:9", "term[1].shape"), "\\u{1b}[2J\\u{7}"),
    // Regression: a box too short for the default spacing blamed
    // grid.points, a key not in the file.
    saying(case("bond_length_too_short_for_the_default_grid", "[chain]\nbonds = 4\nbond_length = 1e-300\n", "in.toml:3:15", "chain.bond_length"), "6e-300"),
    case("domain_too_short_for_the_default_grid", "[domain]\nfrom = 0.0\nto = 0.03\n", "in.toml:3:6", "domain.to"),
    case("spacing_too_coarse_for_the_stencil", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\nspacing = 3.0\n", "in.toml:5:11", "grid.spacing"),
];

/// Every file in `dir` (one level; the cases make no sub-folders) with its
/// bytes.
fn snapshot(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    std::fs::read_dir(dir)
        .unwrap()
        .map(|e| {
            let e = e.unwrap();
            let bytes = std::fs::read(e.path()).unwrap_or_default();
            (e.file_name().to_string_lossy().into_owned(), bytes)
        })
        .collect()
}

/// Runs one case; returns a description of what went wrong, if anything.
fn run(case: &Case, root: &Path) -> Option<String> {
    let dir = root.join(case.name);
    std::fs::create_dir_all(&dir).unwrap();
    let input = dir.join("in.toml");
    std::fs::write(&input, case.toml).unwrap();
    if let Some((name, bytes)) = case.csv {
        std::fs::write(dir.join(name), bytes).unwrap();
    }
    let before = snapshot(&dir);
    let mut cmd = Command::new(bin());
    cmd.current_dir(&dir);
    match case.command.split_first() {
        None => {
            cmd.arg("solve").arg(&input).arg("--json");
        }
        Some((sub, flags)) => {
            cmd.arg(sub).arg(&input);
            for f in flags {
                cmd.arg(f.replace("{dir}", &dir.display().to_string()));
            }
        }
    }
    for s in case.sets {
        cmd.args(["--set", s]);
    }
    let out = cmd.output().unwrap();
    let err = String::from_utf8_lossy(&out.stderr).into_owned();
    let mut faults = Vec::new();
    if out.status.code() != Some(2) {
        faults.push(format!("exit status {:?}, want 2", out.status.code()));
    }
    let prefix = if case.at.starts_with("--set") {
        format!("error: {}: ", case.at)
    } else {
        format!("error: {}/{}: ", dir.display(), case.at)
    };
    if !err.starts_with(&prefix) {
        faults.push(format!("message does not start with `{prefix}`"));
    }
    if !case.key.is_empty() && !err.contains(&format!("`{}`", case.key)) {
        faults.push(format!("message does not name `{}`", case.key));
    }
    if !case.says.is_empty() && !err.contains(case.says) {
        faults.push(format!("message does not say `{}`", case.says));
    }
    // Rust's names for types are not the input's words.
    let words = err.replace(&dir.display().to_string(), "DIR");
    for word in [
        "i64",
        "f64",
        "i128",
        "struct Raw",
        "sequence",
        "recursion limit",
    ] {
        if words.contains(word) {
            faults.push(format!("message says `{word}`"));
        }
    }
    if err
        .chars()
        .any(|c| c.is_control() && c != '\n' && c != '\t')
    {
        faults.push("message holds control characters".into());
    }
    if err.contains("panicked") {
        faults.push("panicked".into());
    }
    if !out.stdout.is_empty() {
        faults.push("printed on stdout".into());
    }
    if snapshot(&dir) != before {
        faults.push("the folder changed".into());
    }
    let _ = std::fs::remove_dir_all(&dir);
    (!faults.is_empty()).then(|| format!("{}: {}\n{err}", case.name, faults.join("; ")))
}

#[test]
fn every_bad_input_is_refused_with_its_location_and_key() {
    assert!(CASES.len() >= 40, "the catalogue has {} cases", CASES.len());
    let mut names: Vec<_> = CASES.iter().map(|c| c.name).collect();
    names.sort_unstable();
    names.dedup();
    assert_eq!(names.len(), CASES.len(), "case names repeat");
    let root = std::env::temp_dir().join(format!("chainwell-bad-{}", std::process::id()));
    let failures: Vec<String> = CASES.iter().filter_map(|c| run(c, &root)).collect();
    let _ = std::fs::remove_dir_all(&root);
    assert!(
        failures.is_empty(),
        "{} of {} cases failed:\n\n{}",
        failures.len(),
        CASES.len(),
        failures.join("\n")
    );
}

/// A grid too large for memory is refused at once (exit 1, a computation
/// that cannot be done here) rather than exhausting the machine.
#[test]
fn oversized_grids_are_refused_before_allocating() {
    let root = std::env::temp_dir().join(format!("chainwell-huge-{}", std::process::id()));
    std::fs::create_dir_all(&root).unwrap();
    let input = root.join("in.toml");
    std::fs::write(&input, "[domain]\nfrom = 0.0\nto = 10.0\n").unwrap();
    for set in [
        "grid.points=2000000000",
        "grid.spacing=1e-12",
        "grid.points=9223372036854775807",
    ] {
        let out = Command::new(bin())
            .current_dir(&root)
            .args(["solve", "--json", "--set", set])
            .arg(&input)
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{set}: {err}");
        assert!(
            err.starts_with("error: ") && err.contains(" GB"),
            "{set}: {err}"
        );
        assert!(err.contains("grid.points"), "{set}: {err}");
        assert!(out.stdout.is_empty(), "{set}");
    }
    assert_eq!(std::fs::read_dir(&root).unwrap().count(), 1);
    std::fs::remove_dir_all(&root).unwrap();
}

/// A domain so short that `1/h^2` overflows is refused as a computation that
/// cannot be done (exit 1), not answered with NaN.
#[test]
fn a_domain_too_short_to_compute_on_is_refused() {
    let root = std::env::temp_dir().join(format!("chainwell-short-{}", std::process::id()));
    std::fs::create_dir_all(&root).unwrap();
    let input = root.join("in.toml");
    std::fs::write(
        &input,
        "[domain]\nfrom = 0.0\nto = 1e-300\n[grid]\npoints = 40\n",
    )
    .unwrap();
    let out = Command::new(bin())
        .current_dir(&root)
        .args(["solve", "--json"])
        .arg(&input)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(
        err.contains("rounding") && err.contains("coarser grid"),
        "{err}"
    );
    assert!(out.stdout.is_empty());
    std::fs::remove_dir_all(&root).unwrap();
}

/// Control characters in a title (written with TOML escapes, so the input
/// is valid) are shown escaped in the readable table, not sent to the
/// terminal, where ESC sequences would recolour or clear the screen.
#[test]
fn a_title_with_control_characters_is_escaped_on_the_terminal() {
    let root = std::env::temp_dir().join(format!("chainwell-title-{}", std::process::id()));
    std::fs::create_dir_all(&root).unwrap();
    let input = root.join("in.toml");
    std::fs::write(
        &input,
        "title = \"red\\u001b[31m, bell\\u0007, clear\\u001b[2J\"\n[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 40\n[levels]\ncount = 2\n",
    )
    .unwrap();
    let out = Command::new(bin())
        .current_dir(&root)
        .args(["solve", "--no-estimate"])
        .arg(&input)
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(
        !stdout
            .chars()
            .any(|c| c.is_control() && c != '\n' && c != '\t'),
        "{stdout:?}"
    );
    assert!(
        stdout.starts_with("red\\u{1b}[31m, bell\\u{7}, clear\\u{1b}[2J\n"),
        "{stdout}"
    );
    std::fs::remove_dir_all(&root).unwrap();
}

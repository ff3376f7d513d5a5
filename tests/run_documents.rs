//! `recoup run FILE`: derivation documents checked item by item, failures
//! with file, line, counterexample and diagnosis, parse errors with their
//! place, declarations in force, and the LaTeX appendix.
//!
//! Published facts used: the orthogonality of 6j symbols (Edmonds,
//! Angular Momentum in Quantum Mechanics, eq. 6.2.9, from memory) in the
//! sample; a phase added to it makes the false claim below.

mod common;

fn run(args: &[&str], stdin: Option<&str>) -> (i32, String, String) {
    common::run_binary(args, stdin)
}

#[test]
fn the_sample_appendix_holds_line_by_line() {
    let (code, out, err) = run(&["run", "samples/toy-appendix.rcp"], None);
    assert_eq!(code, 0, "{err}");
    insta::assert_snapshot!("toy_appendix", out);
}

#[test]
fn a_false_claim_names_its_line_and_is_diagnosed() {
    let doc = "integer k;\n\
               claim wrong: sum(x: (2*x+1) (2*f+1) {a, b, x; c, d, f} {a, b, x; c, d, g}) = (-1)^(2*f) delta(f, g) tri(a, d, f) tri(b, c, f)\n\
               claim fine: (a, b, c; 0, 0, 0) = (c, a, b; 0, 0, 0)\n";
    let (code, out, _) = run(&["run", "-"], Some(doc));
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("<stdin>:2: claim wrong: different"), "{out}");
    assert!(
        out.contains("repaired right side: delta(f, g) tri(a, d, f) tri(b, c, f)"),
        "{out}"
    );
    assert!(out.contains("<stdin>:3: claim fine: equal"), "{out}");
    assert!(
        out.contains("1 of 2 claims and simplifications do not hold"),
        "{out}"
    );
    // no appendix for a derivation that does not hold
    let (code, out, _) = run(&["run", "-", "--latex"], Some(doc));
    assert_eq!(code, 1);
    assert!(!out.contains("\\documentclass"), "{out}");
}

#[test]
fn a_simplification_must_reach_its_expected_form() {
    let doc = "simplify half: sum(x: (2*x+1) {a, b, x; a, b, c}) = 2 (-1)^(2*a+2*b) tri(a, b, c)\n";
    let (code, out, _) = run(&["run", "-"], Some(doc));
    assert_eq!(code, 1, "{out}");
    assert!(
        out.contains("<stdin>:1: the result against the expected form: different"),
        "{out}"
    );
}

#[test]
fn declarations_are_in_force_for_later_items() {
    let (code, out, _) = run(&["run", "-"], Some("claim (-1)^(2*k) = 1\n"));
    assert_eq!(code, 1, "k may be half-odd: {out}");
    let (code, out, _) = run(&["run", "-"], Some("integer k;\nclaim (-1)^(2*k) = 1\n"));
    assert_eq!(code, 0, "{out}");
}

#[test]
fn bad_documents_exit_2_with_file_and_line() {
    for (doc, wanted) in [
        (
            "claim x: (a, b; c) = 1\n",
            "<stdin>:1: parse error at column",
        ),
        ("\n# c\nprove a = b\n", "<stdin>:3: a line starts with"),
        ("claim a = b = c\n", "<stdin>:1: claim takes"),
        ("let 2 = a\n", "<stdin>:1: let names one name"),
        ("integer 3;\n", "<stdin>:1:"),
    ] {
        let (code, out, err) = run(&["run", "-"], Some(doc));
        assert_eq!(code, 2, "{doc}: {out} {err}");
        assert!(out.is_empty(), "{doc}");
        assert!(err.contains(wanted), "{doc}: {err}");
    }
    let (code, _, err) = run(&["run", "/nonexistent/appendix.rcp"], None);
    assert_eq!(code, 2);
    assert!(err.contains("cannot read"), "{err}");
}

#[test]
fn the_appendix_is_a_whole_latex_document() {
    let (code, out, err) = run(&["run", "samples/toy-appendix.rcp", "--latex"], None);
    assert_eq!(code, 0, "{err}");
    assert!(out.starts_with("\\documentclass{article}"), "{out}");
    assert!(out.trim_end().ends_with("\\end{document}"), "{out}");
    assert_eq!(out.matches("\\begin{multline*}").count(), 4);
    assert_eq!(out.matches("\\end{multline*}").count(), 4);
    assert!(out.contains("\\paragraph{six-j-orthogonality}"), "{out}");
}

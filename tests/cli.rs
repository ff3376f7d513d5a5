//! The command line as a user meets it: exit codes, standard output and
//! standard error, on the malformed-input corpus and on good inputs.

use std::io::Write;
use std::process::{Command, Stdio};

fn run(args: &[&str], stdin: Option<&str>) -> (i32, String, String) {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_recoup"));
    cmd.args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped());
    let mut child = cmd.spawn().expect("run recoup");
    if let Some(s) = stdin {
        child.stdin.take().unwrap().write_all(s.as_bytes()).unwrap();
    } else {
        drop(child.stdin.take());
    }
    let out = child.wait_with_output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    )
}

#[test]
fn every_malformed_input_exits_2_with_a_message_and_no_output() {
    let text = include_str!("data/malformed.txt");
    let mut n = 0;
    for line in text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let (expr, at) = line.split_once(" @@").unwrap();
        let at = at.trim();
        let mut args = vec!["eval", expr];
        if !at.is_empty() {
            args.push("--at");
            args.push(at);
        }
        let (code, out, err) = run(&args, None);
        assert_eq!(code, 2, "{line}: exit {code}, stderr {err}");
        assert!(out.is_empty(), "{line}: printed {out}");
        assert!(err.starts_with("recoup: "), "{line}: stderr {err}");
        assert!(!err.contains("panicked"), "{line}: {err}");
        assert!(!err.contains("Rule::"), "{line}: {err}");
        n += 1;
    }
    assert!(n >= 20);
}

#[test]
fn parse_errors_point_at_line_and_column_with_a_caret() {
    let (code, out, err) = run(&["eval", "(j1, j2, j3; m1, m2, m3"], None);
    assert_eq!(code, 2);
    assert!(out.is_empty());
    insta::assert_snapshot!(err, @r"
    recoup: parse error at line 1, column 24: expected a closing parenthesis, a comma, a semicolon or an operator; found the end of the input
      (j1, j2, j3; m1, m2, m3
                             ^
    ");
}

#[test]
fn eval_prints_exact_and_float() {
    // Condon–Shortley table values (Condon and Shortley 1935, from memory)
    let (code, out, _) = run(&["eval", "<1, 1; 1/2, -1/2 | 3/2, 1/2>"], None);
    assert_eq!(code, 0);
    assert_eq!(out, "sqrt(1/3)\t0.5773502691896257\n");
    let (code, out, _) = run(&["eval", "<1, 0; 1, 0 | 0, 0>", "--json"], None);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["exact"], "-sqrt(1/3)");
    assert!((v["float"].as_f64().unwrap() + (1.0f64 / 3.0).sqrt()).abs() < 1e-15);
    let (code, out, _) = run(
        &["eval", "-", "--at", "j=3/2,m=1/2"],
        Some("(j, j, 0; m, -m, 0)\n"),
    );
    assert_eq!(code, 0);
    assert_eq!(out, "-1/2\t-0.5\n");
}

#[test]
fn batch_answers_every_line_and_reports_bad_ones_by_number() {
    let input = "{1, 1, 1; 1, 1, 1}\n(1, 1; 0)\n<1/2, 1/2; 1/2, -1/2 | 0, 0>\n";
    let (code, out, err) = run(&["eval", "--batch"], Some(input));
    assert_eq!(code, 2);
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines.len(), 3);
    assert_eq!(lines[0], "1/6\t0.16666666666666666");
    assert!(lines[1].starts_with("error\tline 2:"));
    assert_eq!(lines[2], "sqrt(1/2)\t0.7071067811865476");
    assert!(err.contains("line 2"));
    let (code, out, _) = run(&["eval", "--batch", "--json"], Some("{1, 1, 1; 1, 1, 1}\n"));
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(out.trim()).unwrap();
    assert_eq!(v["exact"], "1/6");
}

#[test]
fn table_text_json_and_csv() {
    let (code, out, _) = run(&["table", "3", "3"], None);
    assert_eq!(code, 0);
    insta::assert_snapshot!("table_3_3", out);
    let (code, out, _) = run(&["table", "1", "1/2"], None);
    assert_eq!(code, 0);
    insta::assert_snapshot!("table_1_half", out);
    let (_, out, _) = run(&["table", "1/2", "1/2", "--json"], None);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["j1"], "1/2");
    let e = &v["entries"];
    // <1/2 1/2; 1/2 -1/2 | 1 0> = sqrt(1/2) (Condon and Shortley 1935, from memory)
    let hit = e
        .as_array()
        .unwrap()
        .iter()
        .find(|x| x["m1"] == "1/2" && x["m2"] == "-1/2" && x["J"] == "1" && x["M"] == "0")
        .unwrap();
    assert_eq!(hit["exact"], "sqrt(1/2)");
    let (_, out, _) = run(&["table", "1", "1", "--csv"], None);
    let mut lines = out.lines();
    assert_eq!(lines.next().unwrap(), "j1,j2,m1,m2,J,M,exact,float");
    assert!(out.contains("\n1,1,1,-1,2,0,sqrt(1/6),"));
    assert!(out.contains("\n1,1,0,0,0,0,-sqrt(1/3),"));
    let (code, _, err) = run(&["table", "1", "1/3"], None);
    assert_eq!(code, 2);
    assert!(err.contains("multiple of 1/2"));
}

#[test]
fn latex_of_the_standard_shapes() {
    let (_, out, _) = run(
        &[
            "latex",
            "sum(m1, m2: (-1)^(j1-j2+M) hat(j12) <j1, m1; j2, m2 | j12, M> (j1, j2, j12; m1, m2, -M) {j1, j2, j12; j3, J, j23} {a, b, c; d, e, f; g, h, i'}) / (2*J+1)",
        ],
        None,
    );
    insta::assert_snapshot!("latex_shapes", out);
}

#[test]
fn check_exit_codes_and_json() {
    // 6j-sum-plain (Edmonds 6.2.9 with the 6j-zero value 6.3.2; from
    // memory), with the triangle factor its left side implies: exit 0
    let (code, out, _) = run(
        &[
            "check",
            "sum(x: (2*x+1) {a, b, x; a, b, c})",
            "(-1)^(2*a+2*b) tri(a, b, c)",
        ],
        None,
    );
    assert_eq!(code, 0, "{out}");
    assert!(out.starts_with("equal at"), "{out}");
    // without its phase and its triangle factor: exit 1, counterexample
    // and both repairs
    let (code, out, _) = run(
        &["check", "sum(x: (2*x+1) {a, b, x; a, b, c})", "1", "--json"],
        None,
    );
    assert_eq!(code, 1);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["equal"], false);
    assert!(v["counterexample"]["at"]["a"].is_string());
    assert_eq!(
        v["diagnosis"],
        "equal wherever (a, b, c) satisfy the triangle rule; the right side lacks tri(a, b, c); then the left side is (-1)^(2*a+2*b) times the right side"
    );
    // without only its triangle factor: the missing tri is named
    let (code, out, _) = run(
        &[
            "check",
            "sum(x: (2*x+1) {a, b, x; a, b, c})",
            "(-1)^(2*a+2*b)",
        ],
        None,
    );
    assert_eq!(code, 1, "{out}");
    assert!(out.contains("the right side lacks tri(a, b, c)"), "{out}");
    // nothing nonzero: not established, exit 1
    let (code, out, _) = run(&["check", "(a, a, 1; 0, 0, 0)", "0"], None);
    assert_eq!(code, 1);
    assert!(out.starts_with("not established"), "{out}");
    // bad input: exit 2
    let (code, out, err) = run(&["check", "{a, b; c}", "1"], None);
    assert_eq!(code, 2);
    assert!(out.is_empty() && err.contains("line 1"));
    let (code, _, err) = run(&["check", "a", "a", "--max-j", "1/3"], None);
    assert_eq!(code, 2);
    assert!(err.contains("--max-j"));
}

#[test]
fn simplify_text_steps_and_json() {
    let (code, out, _) = run(&["simplify", "(0, j, j; 0, m, -m)"], None);
    assert_eq!(code, 0);
    assert_eq!(out, "(-1)^(j-m) / hat(j)\n");
    let (code, out, _) = run(&["simplify", "{a, b, c; d, e, 0}", "--json"], None);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(
        v["result"],
        "(-1)^(a+b+c) delta(a, e) delta(b, d) tri(a, b, c) / (hat(a) hat(b))"
    );
    let steps = v["steps"].as_array().unwrap();
    assert_eq!(steps[0]["rule"], "6j-zero");
    assert_eq!(steps[0]["source"], "Edmonds 1957, eq. 6.3.2 (from memory)");
    assert_eq!(steps[0]["reference"]["citations"][0]["work"], "edmonds1957");
    assert!(steps[0]["checked"].as_u64().unwrap() > 0);
    assert!(v["verified"]["nonzero"].as_u64().unwrap() > 0);
    let (_, out, _) = run(
        &[
            "simplify",
            "{a, b, c; d, e, 0} + (j, j, 0; m, -m, 0)",
            "--steps",
        ],
        None,
    );
    insta::assert_snapshot!("simplify_steps", out);
    let (_, out, _) = run(
        &["simplify", "{a, b, c; d, e, 0}", "--steps", "--latex"],
        None,
    );
    assert!(out.starts_with("\\begin{align*}"));
    assert!(
        out.contains("\\footnotesize (Edmonds 1957, eq. 6.3.2 (from memory))}"),
        "{out}"
    );
}

#[test]
fn graph_dot_and_json() {
    // recouple-3 as four CGs (Edmonds 1957, eq. 6.1.5, from memory), drawn as its 3j graph
    let input = "sum(m1, m2, m3, m12, m23: <j1, m1; j2, m2 | j12, m12> <j12, m12; j3, m3 | J, M> <j2, m2; j3, m3 | j23, m23> <j1, m1; j23, m23 | J, M>)";
    let (code, out, _) = run(&["graph", input], None);
    assert_eq!(code, 0);
    insta::assert_snapshot!("graph_recouple_3", out);
    let (code, out, _) = run(&["graph", input, "--json"], None);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let t = &v["terms"][0];
    assert_eq!(t["vertices"].as_array().unwrap().len(), 4);
    assert_eq!(t["lines"].as_array().unwrap().len(), 5);
    assert_eq!(t["legs"].as_array().unwrap().len(), 2);
}

#[test]
fn graph_pictures_through_graphviz() {
    // two terms: one picture, each term a labelled cluster
    let input =
        "sum(m1, m2: (a, b, c; m1, m2, m3) (a, b, c; -m1, -m2, -m3)) + (d, e, f; m4, m5, m6)";
    let (code, out, _) = run(&["graph", input], None);
    assert_eq!(code, 0);
    assert_eq!(out.matches("graph recoup {").count(), 1, "{out}");
    assert!(
        out.contains("subgraph cluster_0") && out.contains("subgraph cluster_1"),
        "{out}"
    );
    assert!(
        out.contains("label=\"term 2: (d, e, f; m4, m5, m6)\""),
        "{out}"
    );
    assert!(out.contains("taillabel=\"1\", headlabel=\"1\""), "{out}");
    // rendered by Graphviz's dot where it is installed (CI installs
    // Debian's graphviz), else a message that names the package
    let has_dot = std::process::Command::new("dot")
        .arg("-V")
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    // no summed projection: said, not drawn as lone vertices
    let (code, out, err) = run(
        &["graph", "(a, b, c; m1, m2, m3) (d, e, f; m4, m5, m6)"],
        None,
    );
    assert_eq!(code, 2);
    assert!(
        out.is_empty() && err.contains("no projection is summed"),
        "{err}"
    );
    let (code, out, err) = run(&["graph", input, "--svg"], None);
    if has_dot {
        assert_eq!(code, 0, "{err}");
        assert!(out.contains("<svg") && out.contains("term 1"), "{out}");
    } else {
        assert_eq!(code, 2);
        assert!(err.contains("graphviz"), "{err}");
    }
}

#[test]
fn simplify_reduces_a_projection_sum_with_a_trace() {
    // three-3j-contraction (Edmonds 6.2.8) written with CGs
    let (code, out, _) = run(
        &[
            "simplify",
            "--steps",
            "sum(m1, m2: <j1, m1; j2, m2 | J, M> <j1, m1; j2, m2 | J', M'>)",
        ],
        None,
    );
    assert_eq!(code, 0);
    assert!(out.contains("cg-to-3j") && out.contains("bubble"), "{out}");
    assert!(
        out.trim_end()
            .ends_with("delta(J, J') delta(M, M') tri(j1, j2, J)"),
        "{out}"
    );
}

#[test]
fn recouple_results_and_errors() {
    // recouple-3 (Edmonds 6.1.5)
    let (code, out, _) = run(
        &[
            "recouple",
            "((j1, j2) j12, j3) J",
            "(j1, (j2, j3) j23) J",
            "--json",
        ],
        None,
    );
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["sums"], 0);
    assert_eq!(v["symbols"]["6j"], 1);
    // recouple-4 with --only-6j: the 9j becomes a sum over x of three 6j
    let (code, out, _) = run(
        &[
            "recouple",
            "((j1, j2) j12, (j3, j4) j34) J",
            "((j1, j3) j13, (j2, j4) j24) J",
            "--only-6j",
            "--json",
        ],
        None,
    );
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["sums"], 1);
    assert_eq!(v["symbols"]["9j"], 0);
    assert_eq!(v["symbols"]["6j"], 3);
    // an exact value with --at: stretched couplings give 1
    let (code, out, _) = run(
        &[
            "recouple",
            "((j1, j2) j12, j3) J",
            "(j1, (j2, j3) j23) J",
            "--at",
            "j1=1/2,j2=1/2,j3=1,j12=1,j23=3/2,J=2",
        ],
        None,
    );
    assert_eq!(code, 0);
    assert!(out.ends_with("1\t1\n"), "{out}");
    // the matrix for numeric leaves
    let (code, out, _) = run(
        &[
            "recouple",
            "--matrix",
            "((1/2, 1/2) s, 1/2) J",
            "(1/2, (1/2, 1/2) t) J",
        ],
        None,
    );
    assert_eq!(code, 0);
    insta::assert_snapshot!("recouple_matrix_three_spins", out);
    // errors: exit 2 with a message
    for (f, t, what) in [
        (
            "((j1, j2) j12, j3) J",
            "(j1, (j2, j4) j23) J",
            "same angular momenta",
        ),
        (
            "((j1, j1) j12, j3) J",
            "(j1, (j1, j3) j23) J",
            "coupled twice",
        ),
        (
            "((j1, j2) j12, j3) J",
            "(j1, (j2, j3) j23) K",
            "total angular momenta differ",
        ),
        (
            "((j1, j2) j12, j3) J",
            "(j1, (j2, j3) j12) J",
            "two different couplings",
        ),
        (
            "((j1, j2, j4) j12, j3) J",
            "(j1, (j2, j3) j23) J",
            "exactly two",
        ),
        (
            "((j1, j2), j3) J",
            "(j1, (j2, j3) j23) J",
            "name of its resultant",
        ),
        ("((j1, j2) j12, j3", "(j1, (j2, j3) j23) J", "line 1"),
    ] {
        let (code, out, err) = run(&["recouple", f, t], None);
        assert_eq!(code, 2, "{f} | {t}");
        assert!(out.is_empty());
        assert!(err.contains(what), "{f} | {t}: {err}");
    }
}

#[test]
fn declarations_on_the_command_line_and_in_the_text() {
    // the scalar-product sum of the reduction issue: k is a tensor rank,
    // an integer in the physics
    let sum = "sum(q: (-1)^q (a, k, b; 0, q, -q) (a, k, b; 0, -q, q))";
    // undeclared, a point with half-odd k is named with the phase as
    // written and the declaration that rules it out
    let (code, out, err) = run(&["eval", sum, "--at", "a=1,b=1/2,k=3/2"], None);
    assert_eq!(code, 2);
    assert!(out.is_empty());
    insta::assert_snapshot!(err, @"recoup: at a = 1, b = 1/2, k = 3/2, q = -1/2, the phase (-1)^q (line 1, column 8) has the exponent -1/2, which is not an integer. If b and k only take integer values, declare so: --integer b,k (or begin the expression with `integer b, k;`)");
    // declared on the command line or in the text: the same result
    let (code, by_option, err) = run(&["simplify", "--integer", "k,q", sum], None);
    assert_eq!(code, 0, "{err}");
    let text = format!("integer k, q; {sum}");
    let (code, by_text, _) = run(&["simplify", &text], None);
    assert_eq!(code, 0);
    assert_eq!(by_option, by_text);
    let (_, json, _) = run(&["simplify", "--json", "--integer", "k", sum], None);
    assert!(json.contains(r#""declared":"integer k;""#), "{json}");
    // a value against the declaration is bad input
    let (code, _, err) = run(
        &["eval", "--integer", "k", sum, "--at", "a=1,b=1/2,k=3/2"],
        None,
    );
    assert_eq!(code, 2);
    assert!(err.contains("k = 3/2 is not integer"), "{err}");
    // the domain of check follows the declaration: (-1)^(2k) = 1 for
    // integer k, -1 for half-odd k (common practice, no source)
    let lhs = "(-1)^(2*k) {a, b, k; c, d, e}";
    let rhs = "{a, b, k; c, d, e}";
    assert_eq!(run(&["check", lhs, rhs], None).0, 1);
    assert_eq!(run(&["check", "--integer", "k", lhs, rhs], None).0, 0);
    assert_eq!(run(&["check", "--half-odd", "k", lhs, rhs], None).0, 1);
    assert_eq!(
        run(&["check", "--half-odd", "k", lhs, &format!("-{rhs}")], None).0,
        0
    );
    // clashing declarations and bad names
    let (code, _, err) = run(&["eval", "--integer", "k", "--half-odd", "k", "1"], None);
    assert_eq!(code, 2);
    assert!(err.contains("declared both integer and half-odd"), "{err}");
    assert_eq!(run(&["eval", "--integer", "2k", "1"], None).0, 2);
    // in a batch a line's declarations hold for that line only
    let (code, out, err) = run(
        &["eval", "--batch", "--at", "k=1"],
        Some("integer k; k+1\nhalf-odd k; k\nk\n"),
    );
    assert_eq!(code, 2);
    assert_eq!(
        out,
        "2\t2\nerror\tline 2: k = 1 is not half-odd, and k is declared half-odd\n1\t1\n"
    );
    assert!(err.contains("line 2: k = 1 is not half-odd"), "{err}");
}

#[test]
fn matrix_elements_on_the_command_line() {
    // Edmonds 1957, eq. 7.1.7 (from memory): the steps, as text and LaTeX
    let input = "<(j1, j2) J || T[k] @ j1 || (j1', j2') J'>";
    let (code, out, _) = run(&["simplify", input, "--steps"], None);
    assert_eq!(code, 0, "{out}");
    insta::assert_snapshot!("matrix_element_steps", out);
    let (code, out, _) = run(&["latex", input], None);
    assert_eq!(code, 0);
    insta::assert_snapshot!("matrix_element_latex", out);
    // check with a matrix element on the left (the published formula, with
    // its delta)
    let (code, out, _) = run(
        &[
            "check",
            input,
            "(-1)^(j1+j2+J'+k) hat(J) hat(J') {j1, J, j2; J', j1', k} delta(j2, j2') <j1 || T[k] || j1'>",
        ],
        None,
    );
    assert_eq!(code, 0, "{out}");
    // eval with a value for the opaque operator
    let (code, out, _) = run(
        &["eval", "<j || T[k] || j'>", "--at", "j=1,k=1,j'=2,T=3/2"],
        None,
    );
    assert_eq!((code, out.trim()), (0, "3/2\t1.5"));
    // a half-odd orbital angular momentum under C[k] is bad input
    let (code, _, err) = run(&["eval", "<l || C[1] || l'>", "--at", "l=1/2,l'=1/2"], None);
    assert_eq!(code, 2, "{err}");
    // too many operators is a limit
    let mut op = "T[1] @ a".to_string();
    for _ in 0..20 {
        op = format!("[{op} x U[1] @ a][1]");
    }
    let (code, _, err) = run(&["simplify", &format!("<a || {op} || a>")], None);
    assert_eq!(code, 3, "{err}");
}

#[test]
fn family_lists_every_member() {
    // the family's exact column comes from the single-value formula, its
    // float from the recursion: they agree member by member
    let (code, out, _) = run(
        &["family", "(x, 1, 2; 0, 1, -1)", "--over", "x", "--exact"],
        None,
    );
    assert_eq!(code, 0);
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines.len(), 3, "{out}");
    assert!(lines[0].starts_with("1\t-sqrt(1/10)\t"), "{out}");
    for l in &lines {
        let parts: Vec<&str> = l.split('\t').collect();
        let (_, code2, _) = run(&["eval", parts[1]], None);
        let exact: f64 = code2.split('\t').nth(1).unwrap().trim().parse().unwrap();
        let float: f64 = parts[2].parse().unwrap();
        assert!((exact - float).abs() < 1e-14, "{l}");
    }
    // a 6j over a lower argument, and a 3j over a projection (each member
    // on its own)
    let (code, out, _) = run(&["family", "{2, 2, 1; a, 3/2, 3/2}", "--over", "a"], None);
    assert_eq!(code, 0);
    assert_eq!(out.lines().count(), 3, "{out}");
    let (_, single, _) = run(&["eval", "{2, 2, 1; 3/2, 3/2, 3/2}"], None);
    let want: f64 = single.split('\t').nth(1).unwrap().trim().parse().unwrap();
    let got: f64 = out
        .lines()
        .nth(1)
        .unwrap()
        .split('\t')
        .nth(1)
        .unwrap()
        .parse()
        .unwrap();
    assert!((want - got).abs() < 1e-14, "{out}");
    // a family with no admissible member prints nothing
    let (code, out, _) = run(&["family", "{2, 2, 3/2; a, 3/2, 2}", "--over", "a"], None);
    assert_eq!((code, out.as_str()), (0, ""));
    let (code, out, _) = run(&["family", "(2, 1, 2; 1, m, -1-m)", "--over", "m"], None);
    assert_eq!(code, 0);
    assert_eq!(out.lines().next().unwrap().split('\t').next(), Some("-1"));
    // a CG over a projection pair: <1, m; 1/2, 1/2-m | 3/2, 1/2> for
    // m = 0, 1 is sqrt(2/3), sqrt(1/3) (Condon and Shortley 1935, the
    // j2 = 1/2 table; from memory)
    let (code, out, _) = run(
        &[
            "family",
            "<1, m; 1/2, 1/2 - m | 3/2, 1/2>",
            "--over",
            "m",
            "--exact",
        ],
        None,
    );
    assert_eq!(code, 0);
    let rows: Vec<Vec<&str>> = out.lines().map(|l| l.split('\t').collect()).collect();
    assert_eq!(rows.len(), 2, "{out}");
    assert_eq!((rows[0][0], rows[0][1]), ("0", "sqrt(2/3)"));
    assert_eq!((rows[1][0], rows[1][1]), ("1", "sqrt(1/3)"));
    // two free names, or a sum: bad input
    let (code, _, _) = run(&["family", "(x, y, 2; 0, 0, 0)", "--over", "x"], None);
    assert_eq!(code, 2);
    let (code, _, _) = run(&["family", "(x, 1, 1; 0, 0, 0) + 1", "--over", "x"], None);
    assert_eq!(code, 2);
}

#[test]
fn half_integer_exponents() {
    // x^(p/2) = sqrt(x)^p: (2j+1)^(-1/2) (j+1)^(3/2) at j = 1 is
    // 3^(-1/2) 2^(3/2) = sqrt(8/3) (arithmetic, no source needed)
    let (code, out, _) = run(&["eval", "(2*j+1)^(-1/2) (j+1)^(3/2)", "--at", "j=1"], None);
    assert_eq!((code, out.split('\t').next()), (0, Some("sqrt(8/3)")));
    let (code, out, _) = run(&["latex", "(2*j+1)^(-1/2)"], None);
    assert_eq!((code, out.trim()), (0, "\\frac{1}{\\hat{j}}"));
    // --as-written keeps the text's own arrangement
    let (code, out, _) = run(&["latex", "--as-written", "(2*j+1)^(-1/2)"], None);
    assert_eq!((code, out.trim()), (0, "\\left(2 j + 1\\right)^{-1/2}"));
    let (code, out, _) = run(&["latex", "--as-written", "sqrt(3)/4 sum(m2, m1: x)"], None);
    assert_eq!(
        (code, out.trim()),
        (0, "\\frac{\\sqrt{3}}{4} \\sum_{m_2, m_1} x")
    );
    // other fractions are refused at the exponent
    let (code, _, err) = run(&["eval", "x^(1/3)", "--at", "x=1"], None);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("half an integer"), "{err}");
}

#[test]
fn json_errors_documents_and_latex_matrices() {
    // with --json a failure is a JSON document on stdout, exit 2
    let (code, out, err) = run(&["simplify", "(a, b", "--json"], None);
    assert_eq!(code, 2);
    let v: serde_json::Value = serde_json::from_str(out.trim()).unwrap();
    assert_eq!(v["error"]["kind"], "input");
    assert!(v["error"]["message"].as_str().unwrap().contains("line 1"));
    assert!(err.contains("line 1"));
    // batch JSON lines carry their line numbers
    let (code, out, _) = run(
        &["eval", "--batch", "--json"],
        Some("(1, 1, 0; 0, 0, 0)\n\n(a, b\n"),
    );
    assert_eq!(code, 2);
    let lines: Vec<serde_json::Value> = out
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines[0]["line"], 1);
    assert_eq!(lines[0]["exact"], "-sqrt(1/3)");
    assert_eq!(lines[1]["line"], 3);
    assert!(lines[1]["error"].is_string());
    // latex --json and --document
    let (_, out, _) = run(&["latex", "hat(j12)", "--json"], None);
    let v: serde_json::Value = serde_json::from_str(out.trim()).unwrap();
    assert_eq!(v["input"], "hat(j12)");
    assert_eq!(v["latex"], "\\hat{j}_{12}");
    let (code, out, _) = run(&["latex", "hat(j12)", "--document"], None);
    assert_eq!(code, 0);
    assert!(
        out.starts_with("\\documentclass{article}") && out.trim_end().ends_with("\\end{document}")
    );
    assert!(out.contains("\\begin{multline*}\n\\hat{j}_{12}\n\\end{multline*}"));
    // the recoupling matrix of three spins 1/2 (J = 1/2 block: rows a = 0, 1;
    // columns b = 0, 1) as a LaTeX array; its entries are exact
    let (code, out, _) = run(
        &[
            "recouple",
            "((1/2, 1/2) a, 1/2) J",
            "(1/2, (1/2, 1/2) b) J",
            "--matrix",
            "--latex",
        ],
        None,
    );
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("J = \\tfrac{1}{2}:\\quad"), "{out}");
    assert!(out.contains("\\begin{array}{c|cc}"), "{out}");
    assert!(out.contains("a = 0 &"), "{out}");
    // a derivation chain as a complete document, each step with its source
    let (code, out, _) = run(
        &[
            "recouple",
            "((a, b) x, c) J",
            "(a, (b, c) y) J",
            "--latex",
            "--steps",
            "--document",
        ],
        None,
    );
    assert_eq!(code, 0);
    assert!(out.contains("\\begin{align*}") && out.contains("\\footnotesize (Edmonds 1957"));
    // a recoupling coefficient in the arrangement of the literature:
    // <((j1 j2) J12, j3) J | (j1, (j2 j3) J23) J> = (-1)^(j1+j2+j3+J)
    // hat(J12) hat(J23) {j1 j2 J12; j3 J J23} (Edmonds 1957, eq. 6.1.5,
    // from memory), here with j1 = l, j2 = s, J12 = j, j3 = I, J = F
    let (code, out, _) = run(&["recouple", "((l, s) j, I) F", "(l, (s, I) G) F"], None);
    assert_eq!(code, 0);
    assert_eq!(
        out.trim(),
        "(-1)^(l+s+I+F) hat(G) hat(j) {l, s, j; I, F, G}"
    );
}

#[test]
fn results_keep_the_users_orientation_of_symbols_with_free_projections() {
    // The reduced matrix element of an operator on the first of two coupled
    // angular momenta, written out as the projection sum of the Wigner–
    // Eckart theorem in the Clebsch–Gordan convention: the textbook result
    // (Edmonds 1957, eq. 7.1.7, from memory) carries the Clebsch–Gordan
    // coefficient <j' m'; k q | j m> of the Wigner–Eckart theorem with
    // hat(j') hat(j1) and a 6j; the canonical form turns it round to
    // <j m; j' -m' | k q> / hat(k) with two more hats.
    let we = |j1: &str, j1p: &str, j2: &str| {
        format!(
            "sum({j1}_m, m2, {j1p}_m: <{j1}, {j1}_m; {j2}, m2 | j, m> <{j1p}, {j1p}_m; {j2}, m2 | jp, mp> <{j1p}, {j1p}_m; k, q | {j1}, {j1}_m>)"
        )
    };
    for (a, ap, b) in [("j1", "j1p", "j2"), ("la", "lb", "s"), ("x", "y", "z")] {
        let text = we(a, ap, b);
        let (code, out, err) = run(&["simplify", &text], None);
        assert_eq!(code, 0, "{text}: {err}");
        assert!(out.contains("<jp, mp; k, q | j, m>"), "{text}: {out}");
        assert!(
            !out.contains("/ hat") && !out.contains("-mp"),
            "{text}: {out}"
        );
        let (code, out, _) = run(&["simplify", "--canonical", &text], None);
        assert_eq!(code, 0);
        assert!(!out.contains("<jp, mp; k, q | j, m>"), "{text}: {out}");
    }
    // a written coupling coefficient with free projections keeps its
    // spelling when the normal form swaps its coupled pair (the swap costs
    // (-1)^(j1+j2-J), Edmonds 1957, eq. 3.5.14, from memory)
    let text = "<j2, m2; j1, m1 | J, M> sum(x: (2*x+1) {a, b, x; a, b, c})";
    let (code, out, _) = run(&["simplify", text], None);
    assert_eq!(code, 0);
    assert_eq!(
        out.trim(),
        "(-1)^(2*c) tri(a, b, c) <j2, m2; j1, m1 | J, M>"
    );
    // compound projections keep the user's columns without a written -m
    let text =
        "sum(ma, mb, mc: <a, ma; b, mb | c, mc> <d, md; b, mb | f, mf> <d, md; e, me | a, ma>)";
    let (code, out, _) = run(&["simplify", text], None);
    assert_eq!(code, 0);
    assert!(out.contains("<d, md; b, -md+mf | f, mf>"), "{out}");
    // the echo of --steps is the text as typed (sums in the user's order)
    let text = "sum(m2, m1: <j1, m1; j2, m2 | J, M> <j1, m1; j2, m2 | J', M'>)";
    let (code, out, _) = run(&["simplify", "--steps", text], None);
    assert_eq!(code, 0);
    assert_eq!(out.lines().next(), Some(format!("input: {text}").as_str()));
}

#[test]
fn an_orthogonality_sum_at_a_compound_projection_needs_a_guard() {
    // sum over mb, mc of (a b c; M mb mc)^2 = tri(a, b, c)/(2a+1) for an
    // admissible M (Edmonds 1957, eq. 3.7.8, from memory). With M = md+me
    // it holds where another factor holds the column (a, ±(md+me)); alone
    // it would lose the zeros at |md+me| > a, so it stays a sum.
    let (code, out, _) = run(
        &["simplify", "sum(mb, mc: (a, b, c; md+me, mb, mc) (a, b, c; md+me, mb, mc) (a, d, e; -md-me, md, me))"],
        None,
    );
    assert_eq!(code, 0);
    assert_eq!(
        out.trim(),
        "tri(a, b, c) (a, d, e; -md-me, md, me) / (2*a+1)"
    );
    let (code, out, _) = run(
        &[
            "simplify",
            "sum(mb, mc: (a, b, c; md+me, mb, mc) (a, b, c; md+me, mb, mc))",
        ],
        None,
    );
    assert_eq!(code, 0);
    assert!(out.contains("sum(mb, mc:"), "{out}");
}

#[test]
fn a_triangle_factor_dropped_on_the_inputs_domain_is_verified_there() {
    // <j, m | J[1, 1] | j, m-1> with J[1, 1] = -J+/sqrt(2) and
    // J+|j, m-1> = sqrt((j+m)(j-m+1)) |j, m> (Condon-Shortley phases;
    // common practice, no source). tri(1, j, j) fails only at j = 0, where
    // the input's projections leave no point; the step dropping it was
    // checked at points outside that domain and refused (exit 4) before.
    let (code, out, err) = run(&["simplify", "<j, m | J[1, 1] @ j | j, m - 1>"], None);
    assert_eq!(code, 0, "{err}");
    assert_eq!(out.trim(), "-sqrt(1/2) sqrt(j-m+1) sqrt(j+m)");
}

#[test]
fn a_delta_cancels_the_names_on_both_sides() {
    // sum over m1, m2 of two CGs of the same pair is delta(j12, k12)
    // delta(m12, n12) (Edmonds 1957, eq. 3.5.4, from memory); the sum
    // over m12 then leaves the projections of the outer pair equal, which
    // reads delta(M, N), not delta(M+n12-N, n12)
    let (code, out, _) = run(
        &["simplify", "sum(m1, m2, m12, m3: <j1, m1; j2, m2 | j12, m12> <j12, m12; j3, m3 | J, M> <j1, m1; j2, m2 | k12, n12> <k12, n12; j3, m3 | K, N>)"],
        None,
    );
    assert_eq!(code, 0);
    assert!(out.contains("delta(M, N)"), "{out}");
    for (input, shown) in [
        ("delta(2, a)", "delta(a, 2)"),
        ("delta(m1+m2, 0)", "delta(m1, -m2)"),
        ("delta(x - y + 1, 0)", "delta(x+1, y)"),
    ] {
        let (code, out, _) = run(&["simplify", input], None);
        assert_eq!((code, out.trim()), (0, shown));
    }
}

#[test]
fn a_nine_j_result_is_spelled_without_the_phase_an_odd_permutation_costs() {
    // <(j1 j2) J || [T(k1) x U(k2)](k) || (j1' j2') J'> = hat(J) hat(J')
    // hat(k) {j1 j1' k1; j2 j2' k2; J J' k} <j1||T||j1'> <j2||U||j2'>
    // (Edmonds 1957, eq. 7.1.5, from memory): no phase; the 9j is printed
    // as the transpose of the textbook's (rows in the order the input
    // names them), not with an odd row order and (-1)^(sum of the nine)
    let (code, out, _) = run(
        &[
            "simplify",
            "<(j1, j2) J || [T[k1] @ j1 x U[k2] @ j2][k] || (j1', j2') J'>",
        ],
        None,
    );
    assert_eq!(code, 0);
    assert_eq!(
        out.trim(),
        "hat(J) hat(J') hat(k) {j1, j2, J; j1', j2', J'; k1, k2, k} <j1 || T[k1] || j1'> <j2 || U[k2] || j2'>"
    );
}

#[test]
fn stretched_six_j_with_an_entry_three_halves_or_two_close_in_any_spelling() {
    // {a, b, c; k, c-k, b-k} and {a, b, c; k, c-k, b+k} for k = 3/2, 2
    // (Edmonds 1957 Table 5, from memory; each catalog entry checked at
    // every admissible point up to 6), written in other symmetric
    // spellings and with other names: no 6j may be left
    for input in [
        "{q-2, p-2, r; p, q, 2}",
        "{r, p+3/2, q-3/2; 3/2, q, p}",
        "{x-3/2, y, z; y-3/2, x, 3/2}",
        "{u, 2, w; w+2, v, u-2}",
    ] {
        let (code, out, err) = run(&["simplify", input], None);
        assert_eq!(code, 0, "{input}: {err}");
        if input.starts_with("{u, 2") {
            // not stretched (the triad (u, 2, w) is free): it stays a 6j
            assert!(out.contains('{'), "{input}: {out}");
        } else {
            assert!(
                !out.contains('{') && out.contains("sqrt("),
                "{input}: {out}"
            );
        }
    }
}

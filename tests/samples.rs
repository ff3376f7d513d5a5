//! The sample files the README points to run as their first lines say.

mod common;

fn run(args: &[&str], stdin: Option<&str>) -> (i32, String) {
    let (code, out, _) = common::run_binary(args, stdin);
    (code, out)
}

fn line(text: &str, n: usize) -> String {
    text.lines().nth(n - 1).unwrap().to_string()
}

#[test]
fn the_readme_example_reduces_to_one_6j() {
    let text = include_str!("../samples/toy-overlap.txt");
    let (code, out) = run(&["simplify", "--steps", "-"], Some(text));
    assert_eq!(code, 0);
    // recouple-3 (Edmonds 1957, eq. 6.1.5, from memory), in its textbook arrangement
    assert!(
        out.trim_end()
            .ends_with("(-1)^(j1+j2+j3+J) hat(j12) hat(j23) {j1, j2, j12; j3, J, j23}"),
        "{out}"
    );
}

#[test]
fn the_other_samples() {
    let values = include_str!("../samples/toy-nucleus-values.txt");
    let (code, out) = run(&["eval", "--batch"], Some(values));
    assert_eq!(code, 0);
    assert_eq!(
        out.lines().count(),
        values.lines().filter(|l| !l.starts_with('#')).count()
    );
    let claims = include_str!("../samples/toy-claims.txt");
    let (code, _) = run(&["check", &line(claims, 3), &line(claims, 4)], None);
    assert_eq!(code, 0);
    let (code, out) = run(&["check", &line(claims, 3), "1"], None);
    assert_eq!(code, 1);
    assert!(
        out.contains("the right side lacks tri(a, b, c)") && out.contains("(-1)^(2*a+2*b)"),
        "{out}"
    );
    let schemes = include_str!("../samples/toy-schemes.txt");
    let (code, out) = run(&["recouple", &line(schemes, 2), &line(schemes, 3)], None);
    assert_eq!(code, 0);
    // the LS-jj coefficient in the arrangement of the literature
    // (Edmonds 1957, eq. 6.4.2, from memory)
    assert!(
        out.contains("hat(j1) hat(j2) hat(L) hat(S) {l1, l2, L; s1, s2, S; j1, j2, J}"),
        "{out}"
    );
    // and in recoup's canonical form on request
    let (code, out) = run(
        &[
            "recouple",
            &line(schemes, 2),
            &line(schemes, 3),
            "--canonical",
        ],
        None,
    );
    assert_eq!(code, 0);
    assert!(
        out.contains("hat(j1) hat(j2) hat(L) hat(S) {j1, j2, J; l1, l2, L; s1, s2, S}"),
        "{out}"
    );
}

#[test]
fn the_matrix_element_sample_reduces_and_evaluates() {
    let text = include_str!("../samples/toy-quadrupolaron.txt");
    let (code, out) = run(&["simplify", &line(text, 3)], None);
    assert_eq!(code, 0);
    let result = out.lines().last().unwrap().to_string();
    // two 6j (one per coupling the operator crosses) and no matrix element
    // of a composite operator left
    assert_eq!(result.matches('{').count(), 2, "{result}");
    assert!(result.contains("(la, la', 2; 0, 0, 0)"), "{result}");
    // the reduced formula and the matrix element agree at the sample's point
    let at = line(text, 5);
    let (c1, v1) = run(&["eval", &line(text, 3), "--at", &at], None);
    let (c2, v2) = run(&["eval", &result, "--at", &at], None);
    assert_eq!((c1, c2), (0, 0));
    assert_eq!(v1, v2);
    assert!(!v1.starts_with('0'), "{v1}");
    // the hyperfine scalar product is the polynomial
    let (code, out) = run(&["simplify", &line(text, 4)], None);
    assert_eq!(code, 0);
    let result = out.lines().last().unwrap();
    assert!(
        result.contains("F (F+1) / 2") && !result.contains('{'),
        "{result}"
    );
}

fn main() {
    let e = recoup::syntax::parse(&std::env::args().nth(1).unwrap()).unwrap();
    let t = recoup::algebra::normal::substitute_free_deltas(&e.terms[0]);
    println!("{}", recoup::expr::Expr::from_term(t));
}

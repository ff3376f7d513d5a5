use recoup::algebra::normal::canonical_expr;
use recoup::rules::apply::Prepared;
use recoup::syntax::parse;
fn main() {
    let e = parse(&std::env::args().nth(1).unwrap()).unwrap();
    let nf = canonical_expr(&e, false);
    println!("nf: {nf}");
    for r in recoup::rules::catalog() {
        let p = Prepared::new(r).unwrap();
        for t in &nf.terms {
            if let Some(x) = p.rewrite(t, false) {
                println!("{}: {} => {}", r.name, recoup::syntax::print_term(t), x);
                let mut next = recoup::expr::Expr::zero();
                for u in &nf.terms {
                    if u == t {
                        for y in &x.terms {
                            next.push(y.clone());
                        }
                    } else {
                        next.push(u.clone());
                    }
                }
                let next = canonical_expr(&next, false);
                println!("  next {next}");
                let s = recoup::simplify::Options::default().step_spot;
                let pts = recoup::verify::spot::points(&[&nf, &next], &s);
                for pt in &pts {
                    let ev = recoup::numeric::eval::Evaluator::<recoup::numeric::Surd>::new();
                    if let Err(err) = ev.eval(&next, pt) {
                        println!("  {pt:?}: {err}");
                        break;
                    }
                }
            }
        }
    }
}

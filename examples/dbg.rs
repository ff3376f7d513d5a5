use recoup::rules::matcher::Pattern;
use recoup::rules::rule;
use recoup::syntax::parse;
use recoup::verify::spot::{compare, SpotSettings};
fn main() {
    let args: Vec<String> = std::env::args().collect();
    let p = Pattern::new(rule(&args[1])).unwrap();
    let e = parse(&args[2]).unwrap();
    let t = &e.terms[0];
    let t0 = std::time::Instant::now();
    match p.apply_first(t, &Default::default(), false) {
        Some((m, out)) => {
            println!("match in {:?}: {:?}\n=> {out}", t0.elapsed(), m.factors);
            let s = SpotSettings {
                max_j: recoup::expr::Q::from_integer(2),
                samples: 20,
                exhaustive: false,
                seed: 4,
            };
            let r = compare(&e, &out, &s).unwrap();
            println!("agrees: {} ({} / {})", r.agrees(), r.nonzero, r.checked);
            if let Some(mm) = r.mismatches.first() {
                println!("{mm:?}");
            }
        }
        None => println!("no match ({:?})", t0.elapsed()),
    }
}

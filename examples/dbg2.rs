fn main() {
    let e = recoup::syntax::parse(&std::env::args().nth(1).unwrap()).unwrap();
    for _ in 0..10 {
        let out = recoup::simplify::simplify(&e, &recoup::simplify::Options::default()).unwrap();
        std::hint::black_box(out);
    }
}

fn main() {
    for s in std::env::args().skip(1) {
        match recoup::syntax::parse(&s) {
            Ok(e) => {
                let p = e.to_string();
                let back = recoup::syntax::parse(&p).unwrap();
                println!("{p}   [{}]", if back == e { "roundtrip ok" } else { "ROUNDTRIP FAIL" });
            }
            Err(e) => println!("{e}"),
        }
    }
}

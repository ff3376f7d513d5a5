//! GSL 2.7's coupling coefficients, linked only into the benchmarks
//! (feature `gsl-bench`, Debian's libgsl-dev).
#![allow(dead_code)] // each benchmark uses some of them

#[link(name = "gsl")]
#[link(name = "gslcblas")]
extern "C" {
    pub fn gsl_sf_coupling_3j(a: i32, b: i32, c: i32, ma: i32, mb: i32, mc: i32) -> f64;
    pub fn gsl_sf_coupling_6j(a: i32, b: i32, c: i32, d: i32, e: i32, f: i32) -> f64;
    pub fn gsl_sf_coupling_9j(
        a: i32,
        b: i32,
        c: i32,
        d: i32,
        e: i32,
        f: i32,
        g: i32,
        h: i32,
        i: i32,
    ) -> f64;
    pub fn gsl_set_error_handler_off() -> *const u8;
}

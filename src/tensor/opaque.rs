//! Values of the opaque single-subsystem reduced matrix elements
//! `<j || T[k] || j'>` at a point: a rational that depends only on the
//! operator's name, its rank and the labels of both sides (so the direct
//! evaluation and a reduced formula see the same value), zero off the
//! triangle rule; or the value the user gives for that operator's name.

use crate::expr::term::big_q;
use crate::expr::Q;
use crate::numeric::Surd;
use num_bigint::BigInt;
use num_rational::BigRational;
use std::cell::RefCell;
use std::collections::BTreeMap;

thread_local! {
    static GIVEN: RefCell<BTreeMap<String, Q>> = const { RefCell::new(BTreeMap::new()) };
}

/// Runs `f` with user-given values for opaque operators by name (every
/// reduced matrix element of that operator inside its triangle rule takes
/// the value).
pub fn with_given<R>(values: &BTreeMap<String, Q>, f: impl FnOnce() -> R) -> R {
    let before = GIVEN.with(|g| std::mem::replace(&mut *g.borrow_mut(), values.clone()));
    struct Restore(Option<BTreeMap<String, Q>>);
    impl Drop for Restore {
        fn drop(&mut self) {
            let v = self.0.take().unwrap_or_default();
            GIVEN.with(|g| *g.borrow_mut() = v);
        }
    }
    let _restore = Restore(Some(before));
    f()
}

/// FNV-1a over the bytes of the key.
fn hash(parts: &[&[u8]]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for p in parts {
        for b in *p {
            h ^= u64::from(*b);
            h = h.wrapping_mul(0x0100_0000_01b3);
        }
        h ^= 0xff;
        h = h.wrapping_mul(0x0100_0000_01b3);
    }
    h
}

/// The value of `<bra || name[k] || ket>` (labels doubled, pre-order; the
/// caller has checked the triangle rule of the first labels with `k`).
pub fn value(name: &str, k2: i64, bra: &[i64], ket: &[i64]) -> Surd {
    if let Some(q) = GIVEN.with(|g| g.borrow().get(name).copied()) {
        return Surd::from_rational(big_q(q));
    }
    let bytes = |v: &[i64]| v.iter().flat_map(|x| x.to_le_bytes()).collect::<Vec<u8>>();
    let h = hash(&[name.as_bytes(), &k2.to_le_bytes(), &bytes(bra), &bytes(ket)]);
    // a nonzero numerator in -23..=23 over a denominator in 1..=7
    let n = (h % 23) as i64 + 1;
    let n = if (h >> 20) & 1 == 1 { -n } else { n };
    let d = ((h >> 32) % 7) as i64 + 1;
    Surd::from_rational(BigRational::new(BigInt::from(n), BigInt::from(d)))
}

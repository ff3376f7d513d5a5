//! Fixed-capacity multiword integers on the stack (`Wide`, `SignedWide`)
//! for the exact fast paths: Horner sums that overflow `i128` and the
//! products of a 9j, with the capacity in limbs as a type parameter.
//! Every operation that could exceed the capacity
//! returns `None`, and the caller falls back to the heap big-integer path,
//! so capacity is a speed limit, never a correctness one.

use num_bigint::BigUint;
use std::cmp::Ordering;

/// An unsigned integer below `2^(64 N)`, in `N` little-endian limbs of 64
/// bits; `len` counts the significant limbs (0 for zero). The capacity is a
/// type parameter so that small values are cheap to move.
#[derive(Clone, Copy)]
pub struct Wide<const N: usize> {
    limbs: [u64; N],
    len: usize,
}

impl<const N: usize> std::fmt::Debug for Wide<N> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}", self.to_biguint())
    }
}

impl<const N: usize> Wide<N> {
    /// Zero.
    pub fn zero() -> Self {
        Wide {
            limbs: [0; N],
            len: 0,
        }
    }

    /// One.
    pub fn one() -> Self {
        Wide::from_u64(1)
    }

    /// A 64-bit value.
    pub fn from_u64(x: u64) -> Self {
        let mut w = Wide::zero();
        w.limbs[0] = x;
        w.len = usize::from(x != 0);
        w
    }

    /// A 128-bit value.
    pub fn from_u128(x: u128) -> Self {
        let mut w = Wide::zero();
        w.limbs[0] = x as u64;
        w.limbs[1] = (x >> 64) as u64;
        w.len = if w.limbs[1] != 0 {
            2
        } else {
            usize::from(w.limbs[0] != 0)
        };
        w
    }

    /// True for zero.
    pub fn is_zero(&self) -> bool {
        self.len == 0
    }

    /// The significant limbs.
    pub fn limbs(&self) -> &[u64] {
        &self.limbs[..self.len]
    }

    fn trim(&mut self) {
        while self.len > 0 && self.limbs[self.len - 1] == 0 {
            self.len -= 1;
        }
    }

    /// `self *= m` (`None` when the product exceeds the capacity).
    pub fn mul_small(&mut self, m: u64) -> Option<()> {
        if m == 0 {
            *self = Wide::zero();
            return Some(());
        }
        let mut carry: u64 = 0;
        for limb in &mut self.limbs[..self.len] {
            let x = (*limb as u128) * (m as u128) + carry as u128;
            *limb = x as u64;
            carry = (x >> 64) as u64;
        }
        if carry != 0 {
            if self.len == N {
                return None;
            }
            self.limbs[self.len] = carry;
            self.len += 1;
        }
        Some(())
    }

    /// `self * other` into a capacity of `R` limbs (`None` beyond it).
    pub fn mul<const M: usize, const R: usize>(&self, other: &Wide<M>) -> Option<Wide<R>> {
        if self.is_zero() || other.is_zero() {
            return Some(Wide::zero());
        }
        if self.len + other.len > R {
            return None;
        }
        let mut out = Wide::<R>::zero();
        for (i, &x) in self.limbs().iter().enumerate() {
            let mut carry: u64 = 0;
            for (j, &y) in other.limbs().iter().enumerate() {
                let t = (x as u128) * (y as u128) + out.limbs[i + j] as u128 + carry as u128;
                out.limbs[i + j] = t as u64;
                carry = (t >> 64) as u64;
            }
            out.limbs[i + other.len] = carry;
        }
        out.len = self.len + other.len;
        out.trim();
        Some(out)
    }

    /// The same value in a capacity of `M` limbs (`None` if it does not fit).
    pub fn resize<const M: usize>(&self) -> Option<Wide<M>> {
        if self.len > M {
            return None;
        }
        let mut out = Wide::<M>::zero();
        out.limbs[..self.len].copy_from_slice(self.limbs());
        out.len = self.len;
        Some(out)
    }

    /// `self += other` (`None` beyond the capacity).
    pub fn add_assign(&mut self, other: &Wide<N>) -> Option<()> {
        let len = self.len.max(other.len);
        let mut carry = false;
        for i in 0..len {
            let (s, c1) = self.limbs[i].overflowing_add(other.limbs[i]);
            let (s, c2) = s.overflowing_add(u64::from(carry));
            self.limbs[i] = s;
            carry = c1 || c2;
        }
        self.len = len;
        if carry {
            if len == N {
                return None;
            }
            self.limbs[len] = 1;
            self.len = len + 1;
        }
        Some(())
    }

    /// `self -= other`; requires `self >= other`.
    pub fn sub_assign(&mut self, other: &Wide<N>) {
        debug_assert!(self.cmp_mag(other) != Ordering::Less);
        let mut borrow = false;
        for i in 0..self.len {
            let (d, b1) = self.limbs[i].overflowing_sub(other.limbs[i]);
            let (d, b2) = d.overflowing_sub(u64::from(borrow));
            self.limbs[i] = d;
            borrow = b1 || b2;
        }
        self.trim();
    }

    /// `self = other - self`; requires `other >= self`.
    pub fn rsub_assign(&mut self, other: &Wide<N>) {
        debug_assert!(other.cmp_mag(self) != Ordering::Less);
        let mut borrow = false;
        for i in 0..other.len {
            let (d, b1) = other.limbs[i].overflowing_sub(self.limbs[i]);
            let (d, b2) = d.overflowing_sub(u64::from(borrow));
            self.limbs[i] = d;
            borrow = b1 || b2;
        }
        self.len = other.len;
        self.trim();
    }

    /// Compares magnitudes.
    pub fn cmp_mag(&self, other: &Wide<N>) -> Ordering {
        if self.len != other.len {
            return self.len.cmp(&other.len);
        }
        for i in (0..self.len).rev() {
            match self.limbs[i].cmp(&other.limbs[i]) {
                Ordering::Equal => continue,
                o => return o,
            }
        }
        Ordering::Equal
    }

    /// `self mod m` for `m >= 1`.
    pub fn rem_small(&self, m: u64) -> u64 {
        let mut r: u64 = 0;
        for &limb in self.limbs().iter().rev() {
            let cur = ((r as u128) << 64) | limb as u128;
            r = (cur % m as u128) as u64;
        }
        r
    }

    /// `self /= m` for `m >= 1`, returning the remainder.
    pub fn div_small(&mut self, m: u64) -> u64 {
        let mut r: u64 = 0;
        for limb in self.limbs[..self.len].iter_mut().rev() {
            let cur = ((r as u128) << 64) | *limb as u128;
            let q = cur / m as u128;
            r = (cur - q * m as u128) as u64;
            *limb = q as u64;
        }
        self.trim();
        r
    }

    /// The number of trailing zero bits (0 for zero).
    pub fn trailing_zeros(&self) -> u32 {
        let mut n = 0;
        for &limb in self.limbs() {
            if limb == 0 {
                n += 64;
            } else {
                return n + limb.trailing_zeros();
            }
        }
        0
    }

    /// `self >>= bits`.
    pub fn shr(&mut self, bits: u32) {
        let words = (bits / 64) as usize;
        let rest = bits % 64;
        if words >= self.len {
            *self = Wide::zero();
            return;
        }
        let len = self.len - words;
        for i in 0..len {
            let lo = self.limbs[i + words] >> rest;
            let hi = if rest > 0 && i + words + 1 < self.len {
                self.limbs[i + words + 1] << (64 - rest)
            } else {
                0
            };
            self.limbs[i] = lo | hi;
        }
        for limb in &mut self.limbs[len..self.len] {
            *limb = 0;
        }
        self.len = len;
        self.trim();
    }

    /// `self *= p^e` (`None` beyond the capacity).
    pub fn mul_pow(&mut self, p: u64, mut e: u32) -> Option<()> {
        while e > 0 {
            // the largest power of p that fits one limb multiplier
            let mut chunk: u64 = 1;
            while e > 0 {
                match chunk.checked_mul(p) {
                    Some(c) => {
                        chunk = c;
                        e -= 1;
                    }
                    None => break,
                }
            }
            self.mul_small(chunk)?;
        }
        Some(())
    }

    /// The value as a `u128`, when it fits.
    pub fn to_u128(self) -> Option<u128> {
        match self.len {
            0 => Some(0),
            1 => Some(self.limbs[0] as u128),
            2 => Some(((self.limbs[1] as u128) << 64) | self.limbs[0] as u128),
            _ => None,
        }
    }

    /// The value as a `BigUint`.
    pub fn to_biguint(self) -> BigUint {
        match self.len {
            0 => BigUint::default(),
            1 => BigUint::from(self.limbs[0]),
            2 => BigUint::from(((self.limbs[1] as u128) << 64) | self.limbs[0] as u128),
            _ => {
                let mut digits = Vec::with_capacity(2 * self.len);
                for &limb in self.limbs() {
                    digits.push(limb as u32);
                    digits.push((limb >> 32) as u32);
                }
                BigUint::new(digits)
            }
        }
    }
}

/// A signed `Wide`: sign and magnitude (zero is never negative).
#[derive(Clone, Copy, Debug)]
pub struct SignedWide<const N: usize> {
    /// true for a negative value
    pub neg: bool,
    /// the magnitude
    pub mag: Wide<N>,
}

impl<const N: usize> SignedWide<N> {
    /// Zero.
    pub fn zero() -> Self {
        SignedWide {
            neg: false,
            mag: Wide::zero(),
        }
    }

    /// From an `i128`.
    pub fn from_i128(x: i128) -> Self {
        SignedWide {
            neg: x < 0,
            mag: Wide::from_u128(x.unsigned_abs()),
        }
    }

    /// True for zero.
    pub fn is_zero(&self) -> bool {
        self.mag.is_zero()
    }

    /// The same value in a capacity of `M` limbs (`None` if it does not fit).
    pub fn resize<const M: usize>(&self) -> Option<SignedWide<M>> {
        Some(SignedWide {
            neg: self.neg,
            mag: self.mag.resize()?,
        })
    }

    /// `self = p - self` for a nonnegative `p` (Horner's step).
    pub fn rsub_from(&mut self, p: &Wide<N>) -> Option<()> {
        if self.neg {
            self.mag.add_assign(p)?;
            self.neg = false;
        } else if self.mag.cmp_mag(p) != Ordering::Greater {
            self.mag.rsub_assign(p);
        } else {
            self.mag.sub_assign(p);
            self.neg = true;
        }
        if self.mag.is_zero() {
            self.neg = false;
        }
        Some(())
    }

    /// `self += other`.
    pub fn add_assign(&mut self, other: &SignedWide<N>) -> Option<()> {
        if self.neg == other.neg {
            self.mag.add_assign(&other.mag)?;
        } else if self.mag.cmp_mag(&other.mag) != Ordering::Less {
            self.mag.sub_assign(&other.mag);
        } else {
            let mut m = other.mag;
            m.sub_assign(&self.mag);
            self.mag = m;
            self.neg = other.neg;
        }
        if self.mag.is_zero() {
            self.neg = false;
        }
        Some(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    const T: usize = 12;

    fn wide_of(limbs: &[u64]) -> Wide<T> {
        let mut w = Wide::<T>::zero();
        w.limbs[..limbs.len()].copy_from_slice(limbs);
        w.len = limbs.len();
        w.trim();
        w
    }

    fn big_of(limbs: &[u64]) -> BigUint {
        let mut b = BigUint::default();
        for &l in limbs.iter().rev() {
            b = (b << 64u32) + BigUint::from(l);
        }
        b
    }

    fn limbs() -> impl Strategy<Value = Vec<u64>> {
        prop::collection::vec(
            prop_oneof![Just(0u64), Just(u64::MAX), any::<u64>(), 0u64..10],
            0..6,
        )
    }

    proptest! {
        // Each operation against num-bigint's on the same numbers.
        #[test]
        fn operations_agree_with_big_integers(a in limbs(), b in limbs(), m in 1u64.., s in 0u32..300) {
            let (wa, wb) = (wide_of(&a), wide_of(&b));
            let (ba, bb) = (big_of(&a), big_of(&b));
            prop_assert_eq!(wa.to_biguint(), ba.clone());
            prop_assert_eq!(wa.mul::<T, T>(&wb).unwrap().to_biguint(), &ba * &bb);
            prop_assert_eq!(wa.resize::<6>().unwrap().to_biguint(), ba.clone());
            let mut x = wa;
            x.mul_small(m).unwrap();
            prop_assert_eq!(x.to_biguint(), &ba * m);
            let mut x = wa;
            x.add_assign(&wb).unwrap();
            prop_assert_eq!(x.to_biguint(), &ba + &bb);
            let (hi, lo, bhi, blo) = if ba >= bb { (wa, wb, &ba, &bb) } else { (wb, wa, &bb, &ba) };
            let mut x = hi;
            x.sub_assign(&lo);
            prop_assert_eq!(x.to_biguint(), bhi - blo);
            let mut x = lo;
            x.rsub_assign(&hi);
            prop_assert_eq!(x.to_biguint(), bhi - blo);
            prop_assert_eq!(wa.cmp_mag(&wb), ba.cmp(&bb));
            prop_assert_eq!(BigUint::from(wa.rem_small(m)), &ba % m);
            let mut x = wa;
            let r = x.div_small(m);
            prop_assert_eq!(x.to_biguint(), &ba / m);
            prop_assert_eq!(BigUint::from(r), &ba % m);
            let mut x = wa;
            x.shr(s);
            prop_assert_eq!(x.to_biguint(), &ba >> s);
            if ba.bits() > 0 {
                prop_assert_eq!(u64::from(wa.trailing_zeros()), ba.trailing_zeros().unwrap());
            }
            let mut x = wa;
            x.mul_pow(3, s % 90).unwrap();
            prop_assert_eq!(x.to_biguint(), &ba * BigUint::from(3u32).pow(s % 90));
        }

        #[test]
        fn signed_steps_agree_with_big_integers(a in limbs(), b in limbs(), neg: bool, neg_b: bool) {
            use num_bigint::BigInt;
            let to_big = |s: &SignedWide<T>| {
                let m = BigInt::from(s.mag.to_biguint());
                if s.neg { -m } else { m }
            };
            let sa = SignedWide { neg: neg && !a.iter().all(|&x| x == 0), mag: wide_of(&a) };
            let sb = SignedWide { neg: neg_b && !b.iter().all(|&x| x == 0), mag: wide_of(&b) };
            let mut x = sa;
            x.rsub_from(&sb.mag).unwrap();
            prop_assert_eq!(to_big(&x), BigInt::from(big_of(&b)) - to_big(&sa));
            let mut x = sa;
            x.add_assign(&sb).unwrap();
            prop_assert_eq!(to_big(&x), to_big(&sa) + to_big(&sb));
            prop_assert!(!(x.neg && x.is_zero()));
        }
    }

    #[test]
    fn capacity_overflow_is_reported() {
        let mut x = wide_of(&[u64::MAX; T]);
        assert!(x.mul_small(2).is_none());
        let half = wide_of(&[u64::MAX; T / 2 + 1]);
        assert!(half.mul::<T, T>(&half).is_none());
        let fits = wide_of(&[u64::MAX; T / 2]);
        assert!(fits.mul::<T, T>(&fits).is_some());
        assert!(fits.mul::<T, { 2 * T }>(&half).is_some());
        let mut y = wide_of(&[u64::MAX; T]);
        assert!(y.add_assign(&Wide::one()).is_none());
        assert!(y.resize::<{ T - 1 }>().is_none());
    }
}

//! The Regge square of a 3j symbol, its canonical form under all 72
//! symmetries, and a dense numbering of canonical forms.
//!
//! The Regge square of `(j1 j2 j3; m1 m2 m3)` is
//!
//! ```text
//! | -j1+j2+j3  j1-j2+j3  j1+j2-j3 |
//! |  j1-m1     j2-m2     j3-m3    |
//! |  j1+m1     j2+m2     j3+m3    |
//! ```
//!
//! nine nonnegative integers whose rows and columns all sum to
//! `J = j1+j2+j3` (Regge, Nuovo Cimento 10, 544 (1958)). Permuting its rows
//! or its columns multiplies the symbol by `(-1)^J` for an odd
//! permutation; transposing leaves it (Regge 1958; Edmonds, Angular
//! Momentum in Quantum Mechanics, section 3.7, from memory). Any square
//! read back gives a 3j: row 0 gives `jk = (J - R0k)/2`, rows 1 and 2 give
//! `mk = (R2k - R1k)/2`.
//!
//! Canonical form (our own): the smallest entry `S` at the top left; row 0
//! `(S, a, b)` with `a <= b`, column 0 `(S, c, d)` with `c <= d`, and
//! `a <= c`; the rest is then fixed by `e` at (1, 1), which runs over
//! `a - S + 1` values from `S + b - c`. Where ties leave several
//! arrangements, the one with the smallest `(a, c, e)` is canonical. The
//! key `(J, S, a, c, e')` with `e' = e - (S + b - c)` then satisfies
//! `0 <= S <= J/3`, `S <= a <= c <= (J - S)/2`, `0 <= e' <= a - S`, and
//! every such tuple is the canonical form of at most one orbit.
//!
//! Numbering (our own): keys in lexicographic order of `(J, S, a, c, e')`
//! over that box, so within `(J, S)` with `n = (J - S)/2 - S` (rounded
//! down) there are `C(n + 3, 3)` keys and the position of `(a, c, e')` is a
//! closed form in `u = a - S`.

/// A Regge square of nonnegative integers with equal line sums.
pub type Square = [[i64; 3]; 3];

/// The canonical key of a 3j orbit.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Key {
    /// the common line sum `j1 + j2 + j3`
    pub sum: i64,
    /// the smallest entry
    pub s: i64,
    /// row 0, column 1
    pub a: i64,
    /// row 1, column 0
    pub c: i64,
    /// row 1, column 1, less its least value `S + b - c`
    pub e: i64,
}

/// Where a 3j sits among the canonical forms.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Canonical {
    /// zero by its selection rules or by a symmetry that reverses its sign
    Zero,
    /// `symbol = sign * canonical(key)`
    At {
        /// the orbit's key
        key: Key,
        /// `+1` or `-1`
        sign: i8,
    },
}

/// The Regge square of a 3j in doubled arguments, or `None` when the
/// symbol is zero by its selection rules (triangle, `m` sum, `|m| <= j`,
/// parities).
pub fn square_of(tj: [i64; 3], tm: [i64; 3]) -> Option<Square> {
    let [a, b, c] = tj;
    let row0 = [-a + b + c, a - b + c, a + b - c];
    if tm.iter().sum::<i64>() != 0 || row0.iter().any(|&x| x < 0 || x % 2 != 0) {
        return None;
    }
    let mut sq = [[0; 3]; 3];
    for k in 0..3 {
        let (minus, plus) = (tj[k] - tm[k], tj[k] + tm[k]);
        if minus < 0 || plus < 0 || minus % 2 != 0 {
            return None;
        }
        sq[0][k] = row0[k] / 2;
        sq[1][k] = minus / 2;
        sq[2][k] = plus / 2;
    }
    Some(sq)
}

/// The 3j a square stands for, read with row 0 as the triangle row:
/// doubled `(j1, j2, j3)` and `(m1, m2, m3)`.
pub fn three_j_of(sq: &Square) -> ([i64; 3], [i64; 3]) {
    let sum: i64 = sq[0].iter().sum();
    let tj = [0, 1, 2].map(|k| sum - sq[0][k]);
    let tm = [0, 1, 2].map(|k| sq[2][k] - sq[1][k]);
    (tj, tm)
}

/// The square of a key.
pub fn square_of_key(k: &Key) -> Square {
    let (sum, s, a, c) = (k.sum, k.s, k.a, k.c);
    let b = sum - s - a;
    let d = sum - s - c;
    let e = s + b - c + k.e;
    let f = sum - c - e;
    let g = sum - a - e;
    let h = c - b + e;
    [[s, a, b], [c, e, f], [d, g, h]]
}

fn odd(p: [usize; 3]) -> bool {
    // a permutation of three is odd iff it is a transposition
    (p[0] == 0) as u8 + (p[1] == 1) as u8 + (p[2] == 2) as u8 == 1
}

/// The orders of two indices: both when they tie, else the one that puts
/// the smaller value first.
fn orders(x: usize, y: usize, vx: i64, vy: i64) -> ([(usize, usize); 2], usize) {
    if vx < vy {
        ([(x, y), (x, y)], 1)
    } else if vy < vx {
        ([(y, x), (y, x)], 1)
    } else {
        ([(x, y), (y, x)], 2)
    }
}

/// The canonical key of a square and the sign that takes the square's
/// symbol to the key's (`Zero` when two arrangements of the orbit's
/// canonical form carry opposite signs, so the symbol vanishes).
pub fn canonical(sq: &Square) -> Canonical {
    fast_canonical(sq).unwrap_or_else(|| canonical_by_search(sq))
}

/// The canonical key when the square has one smallest entry and no ties
/// on the two lines through it (the common case): one arrangement, read
/// off directly.
fn fast_canonical(sq: &Square) -> Option<Canonical> {
    let sum: i64 = sq[0].iter().sum();
    let (mut i0, mut k0, mut s, mut count) = (0, 0, i64::MAX, 0);
    for i in 0..3 {
        for k in 0..3 {
            let x = sq[i][k];
            if x < s {
                (i0, k0, s, count) = (i, k, x, 1);
            } else if x == s {
                count += 1;
            }
        }
    }
    if count != 1 {
        return None;
    }
    let (ka, kb) = others(k0);
    let (ia, ib) = others(i0);
    // the row arm's smaller entry first, then the column arm's
    let (rc1, rc2) = if sq[i0][ka] < sq[i0][kb] {
        (ka, kb)
    } else {
        (kb, ka)
    };
    let (cr1, cr2) = if sq[ia][k0] < sq[ib][k0] {
        (ia, ib)
    } else {
        (ib, ia)
    };
    let (rmin, rmax) = (sq[i0][rc1], sq[i0][rc2]);
    let (cmin, cmax) = (sq[cr1][k0], sq[cr2][k0]);
    if rmin == rmax || cmin == cmax || rmin == cmin {
        return None;
    }
    // the arm with the smaller minimum is row 0 of the canonical form
    let (a, b, c, e) = if rmin < cmin {
        (rmin, rmax, cmin, sq[cr1][rc1])
    } else {
        (cmin, cmax, rmin, sq[cr1][rc1])
    };
    let negative = sum % 2 != 0 && (odd([i0, cr1, cr2]) != odd([k0, rc1, rc2]));
    let key = Key {
        sum,
        s,
        a,
        c,
        e: e - (s + b - c),
    };
    Some(Canonical::At {
        key,
        sign: if negative { -1 } else { 1 },
    })
}

/// The canonical key by trying every arrangement that puts a smallest
/// entry at the top left (ties included).
fn canonical_by_search(sq: &Square) -> Canonical {
    let sum: i64 = sq[0].iter().sum();
    let mut s = i64::MAX;
    for r in sq {
        for &x in r {
            s = s.min(x);
        }
    }
    // the least (a, c) any placement of a smallest entry reaches: the
    // smaller of the two arms' minima, then the other
    let arms = |i0: usize, k0: usize| {
        let (ka, kb) = others(k0);
        let (ia, ib) = others(i0);
        let r = sq[i0][ka].min(sq[i0][kb]);
        let c = sq[ia][k0].min(sq[ib][k0]);
        (r.min(c), r.max(c))
    };
    let mut least = (i64::MAX, i64::MAX);
    for i0 in 0..3 {
        for k0 in 0..3 {
            if sq[i0][k0] == s {
                least = least.min(arms(i0, k0));
            }
        }
    }
    let mut best: Option<(Key, bool)> = None;
    let mut clash = false;
    for i0 in 0..3 {
        for k0 in 0..3 {
            if sq[i0][k0] != s || arms(i0, k0) != least {
                continue;
            }
            for transposed in [false, true] {
                let at = |i: usize, k: usize| if transposed { sq[k][i] } else { sq[i][k] };
                // in the (possibly transposed) square, S sits at (r0, c0)
                let (r0, c0) = if transposed { (k0, i0) } else { (i0, k0) };
                let (ca, cb) = others(c0);
                let (ra, rb) = others(r0);
                let (col_orders, nc) = orders(ca, cb, at(r0, ca), at(r0, cb));
                let (row_orders, nr) = orders(ra, rb, at(ra, c0), at(rb, c0));
                for &(c1, c2) in &col_orders[..nc] {
                    for &(r1, r2) in &row_orders[..nr] {
                        let (a, b, c) = (at(r0, c1), at(r0, c2), at(r1, c0));
                        if a > c {
                            continue;
                        }
                        let e = at(r1, c1) - (s + b - c);
                        let key = Key { sum, s, a, c, e };
                        let negative = sum % 2 != 0 && (odd([r0, r1, r2]) != odd([c0, c1, c2]));
                        match &best {
                            Some((k, neg)) if *k == key => clash |= *neg != negative,
                            Some((k, _)) if *k < key => {}
                            _ => {
                                best = Some((key, negative));
                                clash = false;
                            }
                        }
                    }
                }
            }
        }
    }
    match best {
        Some((key, negative)) if !clash => Canonical::At {
            key,
            sign: if negative { -1 } else { 1 },
        },
        _ => Canonical::Zero,
    }
}

fn others(i: usize) -> (usize, usize) {
    match i {
        0 => (1, 2),
        1 => (0, 2),
        _ => (0, 1),
    }
}

/// Whether a key in the box is the canonical form of its orbit (ties can
/// make a box tuple a second arrangement of another key's orbit), and
/// whether its symbol is not zero by a sign-reversing symmetry.
pub fn is_canonical(k: &Key) -> bool {
    let sq = square_of_key(k);
    let b = k.sum - k.s - k.a;
    let d = k.sum - k.s - k.c;
    let unique_min = sq.iter().flatten().filter(|&&x| x == k.s).count() == 1;
    if unique_min && k.a < b && k.c < d && k.a < k.c {
        return true;
    }
    matches!(canonical(&sq), Canonical::At { key, .. } if key == *k)
}

/// Whether a line of a square reads as a 3j within a bound: every entry
/// at least `floor` (every doubled j at most `J - floor`) and, with
/// `parity` `Some(p)`, every entry `≡ p` mod 2 (every j an integer).
#[inline]
pub fn line_fits(line: [i64; 3], floor: i64, parity: Option<i64>) -> bool {
    line.iter()
        .all(|&x| x >= floor && parity.is_none_or(|p| (x - p).rem_euclid(2) == 0))
}

/// A view of the orbit as a 3j within a bound: the line whose entries are
/// all at least `floor` and of `parity` (`Some(p)`: every entry `≡ p`
/// mod 2), taken as the triangle row, with its columns ordered by
/// decreasing j and the first nonzero m made positive. Returns the
/// doubled arguments and the sign that takes the square's symbol to it.
pub fn view_within(
    sq: &Square,
    floor: i64,
    parity: Option<i64>,
) -> Option<([i64; 3], [i64; 3], i8)> {
    let sum: i64 = sq[0].iter().sum();
    let fits = |line: [i64; 3]| line_fits(line, floor, parity);
    // lines in a fixed order: rows then columns; the first that fits
    for line in 0..6 {
        let transposed = line >= 3;
        let r = line % 3;
        let at = |i: usize, k: usize| if transposed { sq[k][i] } else { sq[i][k] };
        let row = [at(r, 0), at(r, 1), at(r, 2)];
        if !fits(row) {
            continue;
        }
        let (r1, r2) = others(r);
        let mut odd_moves = odd([r, r1, r2]) as u8;
        let mut m: Square = [
            row,
            [at(r1, 0), at(r1, 1), at(r1, 2)],
            [at(r2, 0), at(r2, 1), at(r2, 2)],
        ];
        // columns by decreasing j, i.e. increasing row-0 entry (stable)
        let mut cols = [0usize, 1, 2];
        cols.sort_by_key(|&k| m[0][k]);
        odd_moves += odd(cols) as u8;
        m = [0, 1, 2].map(|i| cols.map(|k| m[i][k]));
        let (tj, mut tm) = three_j_of(&m);
        if let Some(&first) = tm.iter().find(|&&x| x != 0) {
            if first < 0 {
                tm = tm.map(|x| -x);
                odd_moves += 1;
            }
        }
        let sign = if sum % 2 != 0 && odd_moves % 2 == 1 {
            -1
        } else {
            1
        };
        return Some((tj, tm, sign));
    }
    None
}

/// Dense positions of keys with line sum at most `max_sum`.
#[derive(Clone, Debug)]
pub struct Numbering {
    max_sum: i64,
    /// `start[row(J, S)]`: position of the first key with that `(J, S)`;
    /// one extra entry holds the total
    start: Vec<u64>,
    /// index of `(J, 0)` in `start`
    row_of_sum: Vec<usize>,
}

fn keys_in(sum: i64, s: i64) -> u64 {
    let n = ((sum - s) / 2 - s) as u64;
    (n + 1) * (n + 2) * (n + 3) / 6
}

impl Numbering {
    /// The numbering of every key with line sum `0..=max_sum`.
    pub fn new(max_sum: i64) -> Numbering {
        let mut start = Vec::new();
        let mut row_of_sum = Vec::new();
        let mut at = 0u64;
        for sum in 0..=max_sum.max(0) {
            row_of_sum.push(start.len());
            for s in 0..=sum / 3 {
                start.push(at);
                at += keys_in(sum, s);
            }
        }
        start.push(at);
        Numbering {
            max_sum,
            start,
            row_of_sum,
        }
    }

    /// How many positions there are.
    pub fn len(&self) -> u64 {
        *self.start.last().unwrap_or(&0)
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The largest line sum numbered.
    pub fn max_sum(&self) -> i64 {
        self.max_sum
    }

    /// The position of a key, `None` past `max_sum`.
    pub fn position(&self, k: &Key) -> Option<u64> {
        if k.sum > self.max_sum || k.sum < 0 {
            return None;
        }
        let n = ((k.sum - k.s) / 2 - k.s) as u64;
        let u = (k.a - k.s) as u64;
        // Σ_{u' < u} (n + 1 - u')(u' + 1)
        let before_a = (n + 1) * u * (u + 1) / 2 - (u.saturating_sub(1)) * u * (u + 1) / 3;
        let within = before_a + (k.c - k.a) as u64 * (u + 1) + k.e as u64;
        Some(self.start[self.row_of_sum[k.sum as usize] + k.s as usize] + within)
    }

    /// Every `(J, S, a, c)` row of keys with line sum `sum`, in position
    /// order: the row's first position and its key with `e' = 0`; the row
    /// has `a - S + 1` keys.
    pub fn rows(&self, sum: i64) -> impl Iterator<Item = (u64, Key)> + '_ {
        (0..=sum / 3).flat_map(move |s| {
            let h = (sum - s) / 2;
            (s..=h).flat_map(move |a| {
                (a..=h).map(move |c| {
                    let key = Key { sum, s, a, c, e: 0 };
                    (self.position(&key).unwrap_or(0), key)
                })
            })
        })
    }

    /// The positions of line sum `sum`: `start..end`.
    pub fn span(&self, sum: i64) -> (u64, u64) {
        let r = self.row_of_sum[sum as usize];
        let next = if (sum as usize) + 1 < self.row_of_sum.len() {
            self.row_of_sum[sum as usize + 1]
        } else {
            self.start.len() - 1
        };
        (self.start[r], self.start[next])
    }
}

"""Benchmark of the Python binding (issue: a library API boundary, and
recoup in Python). Float 3j, 6j and 9j over a NumPy array of 10^6
admissible argument sets with j <= 20: values per second through Python
(recoup.float_3j, ...), the same rows through the Rust library (cargo bench
--bench binding, which this script runs on the very same rows, serial and
on all cores as the binding does), and a plain Python loop over SymPy's
sympy.physics.wigner on 10^3 of them (converted to float), with how many
of those differ from recoup by more than 1e-12.

Run from the repository root, with the package installed:
    python python/bench/binding.py [ROWS]
A benchmark: it asserts nothing about time.
"""

import os
import pathlib
import subprocess
import sys
import time

import numpy as np
import sympy
from sympy.physics import wigner

import recoup

ROOT = pathlib.Path(__file__).resolve().parents[2]
TWICE_MAX = 40  # doubled: j <= 20
RNG = np.random.default_rng(2026)


def pick(lo, hi):
    """A random doubled value in [lo, hi] of the parity of lo (arrays)."""
    span = (hi - lo) // 2
    return lo + 2 * (RNG.integers(0, 1 << 30, size=lo.shape) % (span + 1))


def triangle(a, b, c):
    return (c >= abs(a - b)) & (c <= a + b) & ((a + b + c) % 2 == 0) & (c <= TWICE_MAX)


def rows_3j(n):
    out = []
    while sum(len(x) for x in out) < n:
        k = 2 * n
        j1 = RNG.integers(0, TWICE_MAX + 1, size=k)
        j2 = RNG.integers(0, TWICE_MAX + 1, size=k)
        j3 = pick(abs(j1 - j2), j1 + j2)
        m1 = pick(-j1, j1)
        m2 = pick(-j2, j2)
        m3 = -m1 - m2
        keep = (j3 <= TWICE_MAX) & (abs(m3) <= j3)
        out.append(np.stack([j1, j2, j3, m1, m2, m3], axis=1)[keep])
    return np.concatenate(out)[:n]


def rows_6j(n):
    out = []
    while sum(len(x) for x in out) < n:
        k = 3 * n
        a, b, d, e = (RNG.integers(0, TWICE_MAX + 1, size=k) for _ in range(4))
        c = pick(abs(a - b), a + b)
        f = pick(abs(a - e), a + e)
        keep = triangle(a, b, c) & triangle(a, e, f) & triangle(d, b, f) & triangle(d, e, c)
        out.append(np.stack([a, b, c, d, e, f], axis=1)[keep])
    return np.concatenate(out)[:n]


def rows_9j(n):
    out = []
    while sum(len(x) for x in out) < n:
        k = 4 * n
        a, b, d, e = (RNG.integers(0, TWICE_MAX + 1, size=k) for _ in range(4))
        c = pick(abs(a - b), a + b)
        f = pick(abs(d - e), d + e)
        g = pick(abs(a - d), a + d)
        h = pick(abs(b - e), b + e)
        i = pick(abs(c - f), c + f)
        keep = (triangle(a, b, c) & triangle(d, e, f) & triangle(g, h, i)
                & triangle(a, d, g) & triangle(b, e, h) & triangle(c, f, i))
        out.append(np.stack([a, b, c, d, e, f, g, h, i], axis=1)[keep])
    return np.concatenate(out)[:n]


KINDS = {
    "3j": (rows_3j, recoup.float_3j,
           lambda r: wigner.wigner_3j(*[sympy.Rational(int(x), 2) for x in r])),
    "6j": (rows_6j, recoup.float_6j,
           lambda r: wigner.wigner_6j(*[sympy.Rational(int(x), 2) for x in r])),
    "9j": (rows_9j, recoup.float_9j,
           lambda r: wigner.wigner_9j(*[sympy.Rational(int(x), 2) for x in r], prec=None)),
}


def median_time(f, runs=3):
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        f()
        times.append(time.perf_counter() - t)
    return sorted(times)[len(times) // 2]


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000
    out_dir = ROOT / "target" / "binding-bench"
    out_dir.mkdir(parents=True, exist_ok=True)
    python = {}
    for kind, (make, fn, _) in KINDS.items():
        rows = np.ascontiguousarray(make(n), dtype=np.int64)
        rows.tofile(out_dir / f"{kind}.i64")
        # one contiguous array per argument, as a numeric code holds them
        columns = np.ascontiguousarray(rows.T)
        t = median_time(lambda: fn(*columns, doubled=True))
        python[kind] = (rows, t)
    env = dict(os.environ, RECOUP_BINDING_ROWS=str(out_dir))
    rust = subprocess.run(
        ["cargo", "bench", "--bench", "binding", "-q"], cwd=ROOT, env=env,
        capture_output=True, text=True, check=True,
    ).stdout
    rust_times = {}
    for line in rust.splitlines():
        parts = line.split()
        if len(parts) == 4 and parts[0] in KINDS:
            rust_times[parts[0]] = (float(parts[2]), float(parts[3]))
    print(f"# {n} admissible rows per kind, j <= 20; medians of 3 runs; "
          f"numpy {np.__version__}, sympy {sympy.__version__}")
    print("kind  python Mvalues/s  rust serial Mvalues/s  rust all cores Mvalues/s  "
          "python speed / rust all cores  sympy values/s (1000 rows)  sympy wrong")
    for kind, (rows, t) in python.items():
        serial, parallel = rust_times[kind]
        sample = rows[:: max(1, len(rows) // 1000)][:1000]
        ours = KINDS[kind][1](*sample.T, doubled=True)
        t0 = time.perf_counter()
        ref = [float(KINDS[kind][2](r)) for r in sample]
        ts = time.perf_counter() - t0
        wrong = int(np.sum(np.abs(np.array(ref) - ours) > 1e-12 * np.maximum(1, np.abs(ours))))
        print(f"{kind:4}  {n / t / 1e6:17.2f}  {n / serial / 1e6:21.2f}  "
              f"{n / parallel / 1e6:24.2f}  {parallel / t:29.2f}  "
              f"{len(sample) / ts:26.0f}  {wrong:11d}")


if __name__ == "__main__":
    main()

#!/usr/bin/env python3
"""Times scipy on the matrices of engine/benches/modes.rs (same formulas, same generator):
scipy.linalg.eigh(K, M) with vectors (undamped modes) and scipy.linalg.eig of the state matrix
[[0, I], [-M^-1 K, -M^-1 C]] with right vectors (damped roots), for n = 10, 100, 500, 1000.

Prints the median of several runs per case. The BLAS thread count is whatever
OPENBLAS_NUM_THREADS says (set it to 1 to compare with the single-threaded Rust build).

Usage: bench_scipy.py [--sizes 10 100 500 1000] [--repeat N]
"""

import argparse
import os
import statistics
import time

import numpy as np
import scipy
import scipy.linalg

MASK = (1 << 64) - 1


class Lcg:
    """64-bit LCG, uniform in [0, 1): the generator of engine/benches/modes.rs."""

    def __init__(self, seed):
        self.state = seed & MASK

    def next(self):
        self.state = (self.state * 6364136223846793005 + 1442695040888963407) & MASK
        return (self.state >> 11) / float(1 << 53)


def stamp(mat, a, b, v):
    mat[a, a] += v
    if b is not None:
        mat[b, b] += v
        mat[a, b] -= v
        mat[b, a] -= v


def chain(n):
    m = np.eye(n) * 2.0
    k = np.zeros((n, n))
    c = np.zeros((n, n))
    stamp(k, 0, None, 5e4)
    for i in range(1, n):
        stamp(k, i, i - 1, 5e4)
    stamp(c, n - 1, None, 80.0)
    return m, c, k


def random_model(n):
    rng = Lcg(n)
    m = np.zeros((n, n))
    k = np.zeros((n, n))
    c = np.zeros((n, n))
    for i in range(n):
        m[i, i] = 1.0 + 9.0 * rng.next()
    links = [(0, None)]
    for i in range(1, n):
        links.append((i, int(rng.next() * i)))
    for _ in range(n // 2):
        a = int(rng.next() * n)
        b = int(rng.next() * n)
        if a != b:
            links.append((a, b))
    for s, (a, b) in enumerate(links):
        stamp(k, a, b, 1e4 + 9e4 * rng.next())
        if s % 3 == 0:
            stamp(c, a, b, 1.0 + 19.0 * rng.next())
    return m, c, k


def state_matrix(m, c, k):
    n = m.shape[0]
    a = np.zeros((2 * n, 2 * n))
    a[:n, n:] = np.eye(n)
    a[n:, :n] = -np.linalg.solve(m, k)
    a[n:, n:] = -np.linalg.solve(m, c)
    return a


def median_time(f, repeat):
    f()
    times = []
    for _ in range(repeat):
        t = time.perf_counter()
        f()
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def fmt(t):
    if t < 1e-3:
        return f"{t * 1e6:.1f} µs"
    if t < 1:
        return f"{t * 1e3:.2f} ms"
    return f"{t:.2f} s"


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--sizes", type=int, nargs="+", default=[10, 100, 500, 1000])
    parser.add_argument("--repeat", type=int, default=10)
    args = parser.parse_args()
    threads = os.environ.get("OPENBLAS_NUM_THREADS", "default")
    print(f"numpy {np.__version__}, scipy {scipy.__version__}, OPENBLAS_NUM_THREADS={threads}")
    for family, build in (("chain", chain), ("random", random_model)):
        for n in args.sizes:
            m, c, k = build(n)
            repeat = args.repeat if n < 1000 else max(3, args.repeat // 3)
            t_eigh = median_time(lambda: scipy.linalg.eigh(k, m), repeat)
            # The state matrix is built inside the timing, as the Rust side does.
            t_eig = median_time(lambda: scipy.linalg.eig(state_matrix(m, c, k)), repeat)
            print(f"{family:6} n={n:5}  eigh(K, M): {fmt(t_eigh):>10}   eig(state): {fmt(t_eig):>10}")


if __name__ == "__main__":
    main()

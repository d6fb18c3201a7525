#!/usr/bin/env python3
"""Reference fixtures for the driven response, computed with numpy and scipy (pinned in
requirements.txt).

With a fixed seed, generates random lumped models of 1-6 degrees of freedom (SI matrices
M, C, K, every mass with a path to ground, every model damped) and a force input on one
coordinate. For each model, NAME.json holds, for the state-space model
A = [[0, I], [-M^-1 K, -M^-1 C]], B = [0; M^-1 e_j], C = [I 0], D = 0:

* "frequency": the frequency response C (i w I - A)^-1 B of every coordinate at 40 log-spaced
  w and at each undamped natural frequency, by scipy.linalg.solve on the state-space
  resolvent. (scipy.signal.freqresp converts a StateSpace to zeros, poles and gain first and
  loses up to all its digits on 6-coordinate models, so it is used only where it is accurate:)
* "signal_freqresp": scipy.signal.freqresp of the same StateSpace, for models of 1 and 2
  coordinates only;
* "step": scipy.signal.step (a unit force switched on at t = 0), "impulse":
  scipy.signal.impulse (a unit impulse, 1 N*s), "initial": scipy.signal.lsim with zero input
  from a random initial state, all at 201 times over three periods of the slowest mode.

Complex numbers are [re, im]; floats are written with repr() so that they round-trip exactly.

Usage:
    response_reference.py --out DIR          write the fixtures into DIR
    response_reference.py --compare A B      compare two fixture folders; exit 1 if they differ

The models come from Python's own `random` (stable across versions), so the matrices are
reproducible exactly, and the sample frequencies and times are rounded to 12 figures so they are
too; computed values are compared by --compare to 1e-10 relative to the largest magnitude of
their series (1e-9 for signal.freqresp), since a BLAS may round differently on another
processor.
"""

import os

# One thread: the same operation order, hence the same rounding, on every run.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
os.environ.setdefault("OMP_NUM_THREADS", "1")

import json  # noqa: E402
import random  # noqa: E402
import sys  # noqa: E402
import warnings  # noqa: E402
from pathlib import Path  # noqa: E402

import fixture_cli  # noqa: E402  (beside this script)

import numpy as np  # noqa: E402
import scipy  # noqa: E402
import scipy.linalg  # noqa: E402
import scipy.signal  # noqa: E402

SEED = 20261115
MODELS = 10
FREQUENCIES = 40
TIMES = 201

# freqresp warns about its own zeros-poles-gain conversion; it is kept only for 1-2
# coordinates, where the Rust cross-check shows it accurate.
warnings.filterwarnings("ignore", category=scipy.signal.BadCoefficients)


def log_uniform(rng, lo, hi):
    return lo * (hi / lo) ** rng.random()


def stamp(matrix, a, b, value):
    """Adds a two-terminal element between a and b (None = ground)."""
    if a is not None and b is not None:
        matrix[a, a] += value
        matrix[b, b] += value
        matrix[a, b] -= value
        matrix[b, a] -= value
    else:
        i = a if a is not None else b
        matrix[i, i] += value


def make_model(rng):
    n = rng.randint(1, 6)
    m = np.diag([log_uniform(rng, 0.5, 50.0) for _ in range(n)])
    c = np.zeros((n, n))
    k = np.zeros((n, n))
    # A random tree rooted at ground plus a few extra links: no rigid-body mode.
    links = [(0, None)] + [(i, rng.randrange(i)) for i in range(1, n)]
    for _ in range(rng.randint(0, n)):
        a = rng.randrange(n)
        b = rng.randrange(n + 1)
        b = None if b == n else b
        if a != b:
            links.append((a, b))
    for a, b in links:
        stamp(k, a, b, log_uniform(rng, 1e3, 1e6))
    # A damper on the first link always (so every mode decays), on the others at random.
    for index, (a, b) in enumerate(links):
        if index == 0 or rng.random() < 0.5:
            stamp(c, a, b, log_uniform(rng, 1.0, 2000.0))
    j = rng.randrange(n)
    x0 = [rng.uniform(-1e-3, 1e-3) for _ in range(n)]
    v0 = [rng.uniform(-0.1, 0.1) for _ in range(n)]
    return n, m, c, k, j, x0, v0


def state_space(m, c, k, j):
    n = m.shape[0]
    a = np.zeros((2 * n, 2 * n))
    a[:n, n:] = np.eye(n)
    a[n:, :n] = -np.linalg.solve(m, k)
    a[n:, n:] = -np.linalg.solve(m, c)
    b = np.zeros((2 * n, 1))
    b[n:, 0] = np.linalg.solve(m, np.eye(n)[:, j])
    cm = np.hstack([np.eye(n), np.zeros((n, n))])
    return a, b, cm


def cplx(z):
    return [float(z.real), float(z.imag)]


def reference(n, m, c, k, j, x0, v0):
    a, b, cm = state_space(m, c, k, j)
    wn = np.sqrt(scipy.linalg.eigh(k, m, eigvals_only=True))
    # The sample points are inputs: rounded to 12 figures, so that another processor's BLAS,
    # which rounds the eigenvalues differently in the last bits, samples the same points
    # (near a resonance a last-bit shift of the frequency moves the response by 1e-9).
    wn = np.array([float(f"{w:.12g}") for w in wn])
    # The same for the log-spaced points: numpy's exp and log differ in the last bit between
    # processors (its SIMD dispatch), so the points are rounded too.
    omegas = np.geomspace(wn.min() / 3.0, wn.max() * 3.0, FREQUENCIES)
    omegas = np.array([float(f"{w:.12g}") for w in omegas])
    omegas = np.sort(np.concatenate([omegas, wn]))
    frequency = []
    for w in omegas:
        h = cm @ scipy.linalg.solve(1j * w * np.eye(2 * n) - a, b.astype(complex))
        frequency.append([cplx(z) for z in h[:, 0]])
    signal = None
    if n <= 2:
        signal = [[None] * n for _ in omegas]
        for out in range(n):
            sys1 = scipy.signal.StateSpace(a, b, cm[out : out + 1, :], np.zeros((1, 1)))
            _, h = scipy.signal.freqresp(sys1, w=omegas)
            for i, z in enumerate(h):
                signal[i][out] = cplx(z)
    sys_all = scipy.signal.StateSpace(a, b, cm, np.zeros((n, 1)))
    times = np.linspace(0.0, float(f"{3.0 * 2.0 * np.pi / wn.min():.12g}"), TIMES)
    _, step = scipy.signal.step(sys_all, T=times)
    _, impulse = scipy.signal.impulse(sys_all, T=times)
    u = np.zeros_like(times)
    _, initial, _ = scipy.signal.lsim(sys_all, u, times, X0=np.array(x0 + v0), interp=False)
    as_rows = lambda y: [[float(v) for v in np.atleast_1d(row)] for row in y]  # noqa: E731
    return {
        "omegas": [float(w) for w in omegas],
        "frequency": frequency,
        "signal_freqresp": signal,
        "times": [float(t) for t in times],
        "step": as_rows(step),
        "impulse": as_rows(impulse),
        "initial": as_rows(initial),
    }


def matrix(x):
    return [[float(v) for v in row] for row in x]


def generate(out):
    out.mkdir(parents=True, exist_ok=True)
    rng = random.Random(SEED)
    for index in range(1, MODELS + 1):
        n, m, c, k, j, x0, v0 = make_model(rng)
        name = f"response_{index:02d}"
        data = {
            "name": name,
            "generator": "tests/reference/response_reference.py",
            "seed": SEED,
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "dofs": n,
            "M": matrix(m),
            "C": matrix(c),
            "K": matrix(k),
            "input": j,
            "x0": x0,
            "v0": v0,
        }
        data.update(reference(n, m, c, k, j, x0, v0))
        (out / f"{name}.json").write_text(json.dumps(data) + "\n")


EXACT = ("M", "C", "K", "dofs", "input", "x0", "v0", "seed", "numpy", "scipy", "omegas", "times")
SERIES = ("frequency", "signal_freqresp", "step", "impulse", "initial")
# Relative to the largest magnitude of the series. The same inputs on another processor's BLAS
# were seen to differ by up to 2.4e-12 (time responses) and 3.6e-11 (signal.freqresp, which
# goes through zeros and poles); the limits leave room for that and stay far below what the
# Rust tests assert against these fixtures (engine/tests/response_reference.rs).
TOLERANCE = {"signal_freqresp": 1e-9}
DEFAULT_TOLERANCE = 1e-10


def compare(a, b):
    """Returns a list of differences between fixture folders a and b."""
    problems = []
    names_a = sorted(p.name for p in a.iterdir() if p.suffix == ".json")
    names_b = sorted(p.name for p in b.iterdir() if p.suffix == ".json")
    if names_a != names_b:
        problems.append(f"different files: {names_a} vs {names_b}")
    for name in sorted(set(names_a) & set(names_b)):
        ta, tb = (a / name).read_text(), (b / name).read_text()
        if ta == tb:
            continue
        ja, jb = json.loads(ta), json.loads(tb)
        for key in EXACT:
            if ja.get(key) != jb.get(key):
                problems.append(f"{name}: {key} differs")
        for key in SERIES:
            if (ja[key] is None) != (jb[key] is None):
                problems.append(f"{name}: {key} present in only one")
                continue
            if ja[key] is None:
                continue
            xa = np.array(ja[key], dtype=float)
            xb = np.array(jb[key], dtype=float)
            if xa.shape != xb.shape:
                problems.append(f"{name}: {key} has a different shape")
                continue
            scale = max(np.max(np.abs(xa)), 1e-300)
            tol = TOLERANCE.get(key, DEFAULT_TOLERANCE)
            if np.max(np.abs(xa - xb)) > tol * scale:
                problems.append(f"{name}: {key} differs beyond {tol:g}")
    return problems


if __name__ == "__main__":
    sys.exit(fixture_cli.main(__doc__, generate, compare))

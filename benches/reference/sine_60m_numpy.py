#!/usr/bin/env python3
"""NumPy/SciPy reference for the 60 M cell-step sine-head benchmark (benches/sine_60m.rs).

The same kind of problem: transient radial Darcy flow on 300 log-graded cells (pack 0.1 to
0.2 m, K 5e-3 m/s; formation to 60 m, K 2e-4 m/s; Ss 1e-5 1/m; screen length 6 m), in-well
head prescribed as 1.5 sin(2 pi 0.5 t) m, fixed head at the outer radius, Crank-Nicolson
with 200 steps per cycle for 1 000 cycles: 2e5 steps x 300 cells = 6e7 cell-steps. The
tridiagonal matrix is factored once with LAPACK (dgttrf) and each step is a right-hand
side (one tridiagonal matrix-vector product in NumPy) and a LAPACK solve (dgttrs): the
fastest plain NumPy/LAPACK loop. The grid is built the way boreflux's benchmark model is
described, not copied from it; the figure compared is cell-steps per second.

    python3 benches/reference/sine_60m_numpy.py [cycles]

Prints the BLAS/LAPACK library in use (threadpoolctl), the wall time and cell-steps/s.
"""
import sys
import time

import numpy as np
from scipy.linalg import lapack

CELLS = 300
STEPS_PER_CYCLE = 200
FREQ = 0.5
AMP = 1.5


def build():
    rs, rp, ro, b = 0.1, 0.2, 60.0, 6.0
    n_pack = 16
    faces = np.concatenate(
        [np.geomspace(rs, rp, n_pack + 1), np.geomspace(rp, ro, CELLS - n_pack + 1)[1:]]
    )
    k = np.where(np.arange(CELLS) < n_pack, 5e-3, 2e-4)
    ss = 1e-5
    rc = np.sqrt(faces[:-1] * faces[1:])
    storage = ss * np.pi * (faces[1:] ** 2 - faces[:-1] ** 2) * b
    # Face conductances 2 pi b / sum of half-cell resistances ln(r/r')/K.
    g = np.empty(CELLS + 1)
    g[0] = 2 * np.pi * b * k[0] / np.log(rc[0] / faces[0])
    g[1:-1] = 2 * np.pi * b / (
        np.log(faces[1:-1] / rc[:-1]) / k[:-1] + np.log(rc[1:] / faces[1:-1]) / k[1:]
    )
    g[-1] = 2 * np.pi * b * k[-1] / np.log(faces[-1] / rc[-1])
    return storage, g


def main():
    cycles = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    try:
        from threadpoolctl import threadpool_info

        for lib in threadpool_info():
            print(
                f"library: {lib.get('internal_api')} {lib.get('version')} "
                f"kernel {lib.get('architecture')} threads {lib.get('num_threads')} "
                f"({lib.get('filepath')})"
            )
    except ImportError:
        print("threadpoolctl not installed: library not reported")
    storage, g = build()
    dt = 1.0 / FREQ / STEPS_PER_CYCLE
    theta = 0.5
    # A h' = -L h + boundary terms; L tridiagonal with g on the faces.
    diag_l = g[:-1] + g[1:]
    off = -g[1:-1]
    lhs_d = storage / dt + theta * diag_l
    lhs_o = theta * off
    dl, d, du, du2, ipiv, info = lapack.dgttrf(lhs_o.copy(), lhs_d.copy(), lhs_o.copy())
    assert info == 0
    rhs_d = storage / dt - (1 - theta) * diag_l
    rhs_o = -(1 - theta) * off
    h = np.zeros(CELLS)
    rhs = np.empty(CELLS)
    steps = cycles * STEPS_PER_CYCLE
    w_old = 0.0
    start = time.perf_counter()
    for n in range(1, steps + 1):
        w_new = AMP * np.sin(2 * np.pi * FREQ * n * dt)
        np.multiply(rhs_d, h, out=rhs)
        rhs[:-1] += rhs_o * h[1:]
        rhs[1:] += rhs_o * h[:-1]
        rhs[0] += g[0] * (theta * w_new + (1 - theta) * w_old)
        h, info = lapack.dgttrs(dl, d, du, du2, ipiv, rhs)
        w_old = w_new
    wall = time.perf_counter() - start
    cell_steps = steps * CELLS
    print(f"cycles {cycles}, steps {steps}, cells {CELLS}, cell-steps {cell_steps:.3e}")
    print(f"wall {wall:.3f} s, {cell_steps / wall:.4e} cell-steps/s, head at cell 1 {h[0]:.6f} m")


if __name__ == "__main__":
    main()

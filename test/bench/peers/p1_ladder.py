#!/usr/bin/env python3
"""The seven-level P1 ladder of test/bench/study.bench.ts (case p1), written by hand with NumPy, SciPy and pyamg:
a peer to time rungs against (test/bench/peers.bench.ts).

Problem (the same as rungs's benchmark study):
  -Δu = f on the unit square (0, 1)², u = g on the whole boundary, with the exact solution u = sin(πx) sin(πy),
  so f = 2π² sin(πx) sin(πy) and g is u's interpolant at the boundary nodes (zero up to round-off).
Discretisation (the same as rungs's `rectangle` domain and `lagrange({ degree: 1 })`):
  n × n squares, each cut by its lower-left → upper-right diagonal into two triangles; vertex (i, j) at (i/n, j/n)
  numbered i + j (n + 1); continuous piecewise-linear (P1) Lagrange elements; stiffness exact (constant gradients),
  load with the 6-point degree-4 rule of Dunavant (1985); Dirichlet values interpolated and eliminated (rows and
  columns), so the system stays symmetric positive definite.
Solver:
  default: preconditioned conjugate gradients with one V-cycle of pyamg's smoothed aggregation per iteration
  (Vaněk, Mandel & Brezina 1996; pyamg's defaults: symmetric strength, standard aggregation, Jacobi-smoothed
  prolongation, symmetric Gauss–Seidel), stopped when ||b − A x||₂ ≤ rtol ||b||₂.
  --direct: SciPy's sparse direct solver (spsolve: SuperLU with a COLAMD column ordering).
Errors: ||u − u_h||_L2 and the H1 seminorm |u − u_h|_H1 with the same 6-point degree-4 rule per triangle (rungs's
  error rule for P1 triangles is of degree 2k + 2 = 4, the same table).

No Python loop runs over cells or nodes: only over levels and the six quadrature points.

Usage: python3 p1_ladder.py [--levels 16,32,...] [--rtol R | --rtol R1,R2,...] [--direct] [--json] [--plan]
  --rtol: one relative residual for every level, or one per level (the benchmark passes the residual rungs stopped
          at on each level, so both codes solve to the same tolerance); default 1e-10.
  --json: print the levels as one JSON object on the last line (for the benchmark) besides the table.
  --plan: print the parsed settings as JSON and exit without importing NumPy, SciPy or pyamg.
"""
import argparse
import json
import math
import sys
import time

DEFAULT_LEVELS = [16, 32, 64, 128, 256, 512, 1024]
DEFAULT_RTOL = 1e-10

# Dunavant (1985), degree 4, 6 points: two orbits (a, a, 1 − 2a) of three points each, weights summing to 1
# (multiply by the triangle's area). The 15 printed decimals; rungs refines the same table to full precision, which
# moves the integrals by about 1e-15 relative.
DUNAVANT_4 = [(0.445948490915965, 0.223381589678011), (0.091576213509771, 0.109951743655322)]


def parse_args(argv):
    p = argparse.ArgumentParser(description=__doc__.split('\n')[0])
    p.add_argument('--levels', default=','.join(str(n) for n in DEFAULT_LEVELS),
                   help='comma-separated squares per side, one per level (default: %(default)s)')
    p.add_argument('--rtol', default=str(DEFAULT_RTOL),
                   help='relative residual to stop CG at: one number, or one per level, comma-separated')
    p.add_argument('--direct', action='store_true', help="solve with scipy.sparse.linalg.spsolve instead of pyamg + CG")
    p.add_argument('--json', action='store_true', help='also print the results as JSON on the last line')
    p.add_argument('--plan', action='store_true', help='print the parsed settings and exit (needs no SciPy)')
    a = p.parse_args(argv)
    try:
        a.levels = [int(s) for s in a.levels.split(',')]
    except ValueError:
        p.error(f'--levels: expected comma-separated whole numbers, got {a.levels!r}')
    if not a.levels or min(a.levels) < 1:
        p.error(f'--levels: every level needs at least one square per side, got {a.levels}')
    try:
        rtol = [float(s) for s in a.rtol.split(',')]
    except ValueError:
        p.error(f'--rtol: expected a number or comma-separated numbers, got {a.rtol!r}')
    if len(rtol) == 1:
        rtol = rtol * len(a.levels)
    if len(rtol) != len(a.levels):
        p.error(f'--rtol: {len(rtol)} values for {len(a.levels)} levels; give one, or one per level')
    if not all(0 < r < 1 for r in rtol):
        p.error(f'--rtol: every value must lie strictly between 0 and 1, got {rtol}')
    a.rtol = rtol
    return a


def quadrature(np):
    """Barycentric points (rows: λ0, λ1, λ2) and weights of the 6-point rule."""
    pts, wts = [], []
    for a, w in DUNAVANT_4:
        b = 1 - 2 * a
        pts += [(a, a, b), (a, b, a), (b, a, a)]
        wts += [w, w, w]
    return np.array(pts), np.array(wts)


def mesh(np, n):
    """Vertices and 'right'-diagonal triangles of the n × n grid, numbered as rungs numbers them."""
    t = np.arange(n + 1) * (1.0 / n)
    t[n] = 1.0
    x, y = np.meshgrid(t, t)                  # row j holds y_j: vertex i + j (n + 1)
    coords = np.column_stack([x.ravel(), y.ravel()])
    i, j = np.meshgrid(np.arange(n), np.arange(n))
    v00 = (i + j * (n + 1)).ravel()
    v10, v01 = v00 + 1, v00 + n + 1
    v11 = v01 + 1
    lower = np.column_stack([v00, v10, v11])  # counter-clockwise, as rungs writes them
    upper = np.column_stack([v00, v11, v01])
    cells = np.empty((2 * n * n, 3), dtype=np.int64)
    cells[0::2], cells[1::2] = lower, upper   # square by square: its two triangles together
    return coords, cells


def geometry(np, coords, cells):
    """Per triangle: area and the (constant) gradients of the three barycentric functions, shape (cells, 3, 2)."""
    p0, p1, p2 = coords[cells[:, 0]], coords[cells[:, 1]], coords[cells[:, 2]]
    e1, e2 = p1 - p0, p2 - p0
    det = e1[:, 0] * e2[:, 1] - e1[:, 1] * e2[:, 0]
    # Inverse transpose of the Jacobian [e1 e2]: ∇λ1 and ∇λ2; ∇λ0 = −∇λ1 − ∇λ2.
    g1 = np.column_stack([e2[:, 1], -e2[:, 0]]) / det[:, None]
    g2 = np.column_stack([-e1[:, 1], e1[:, 0]]) / det[:, None]
    grads = np.stack([-g1 - g2, g1, g2], axis=1)
    return 0.5 * det, grads


def exact(np, x, y):
    s, c = np.sin(np.pi * x), np.cos(np.pi * x)
    t, d = np.sin(np.pi * y), np.cos(np.pi * y)
    return s * t, np.pi * c * t, np.pi * s * d


def source(np, x, y):
    return 2 * np.pi ** 2 * np.sin(np.pi * x) * np.sin(np.pi * y)


def points(np, coords, cells, lam):
    """Physical coordinates of one barycentric point on every triangle."""
    xy = lam[0] * coords[cells[:, 0]] + lam[1] * coords[cells[:, 1]] + lam[2] * coords[cells[:, 2]]
    return xy[:, 0], xy[:, 1]


def assemble(np, sp, coords, cells, area, grads, qp, qw):
    """Global stiffness matrix (CSR, duplicates summed) and load vector."""
    nv = len(coords)
    local = area[:, None, None] * np.einsum('cad,cbd->cab', grads, grads)
    rows = np.repeat(cells, 3, axis=1).ravel()
    cols = np.tile(cells, (1, 3)).ravel()
    A = sp.csr_matrix((local.ravel(), (rows, cols)), shape=(nv, nv))
    b = np.zeros(nv)
    for lam, w in zip(qp, qw):
        fx = source(np, *points(np, coords, cells, lam)) * (w * area)
        for a in range(3):
            b += np.bincount(cells[:, a], weights=lam[a] * fx, minlength=nv)
    return A, b


def boundary_nodes(np, n):
    idx = np.arange((n + 1) ** 2)
    i, j = idx % (n + 1), idx // (n + 1)
    return (i == 0) | (i == n) | (j == 0) | (j == n)


def errors(np, coords, cells, area, grads, U, qp, qw):
    """||u − u_h||_L2 and |u − u_h|_H1 with the 6-point rule."""
    Uc = U[cells]
    duh = np.einsum('ca,cad->cd', Uc, grads)   # ∇u_h, constant per triangle
    l2 = h1 = 0.0
    for lam, w in zip(qp, qw):
        x, y = points(np, coords, cells, lam)
        u, ux, uy = exact(np, x, y)
        uh = Uc @ lam
        l2 += np.dot(w * area, (u - uh) ** 2)
        h1 += np.dot(w * area, (ux - duh[:, 0]) ** 2 + (uy - duh[:, 1]) ** 2)
    return math.sqrt(l2), math.sqrt(h1)


def level(np, sp, spla, pyamg, n, rtol, direct, qp, qw):
    t0 = time.perf_counter()
    coords, cells = mesh(np, n)
    area, grads = geometry(np, coords, cells)
    t1 = time.perf_counter()
    A, b = assemble(np, sp, coords, cells, area, grads, qp, qw)
    # Dirichlet: interpolate g at the boundary nodes, move its columns to the right-hand side, keep the free rows.
    bnd = boundary_nodes(np, n)
    free = ~bnd
    U = np.zeros(len(coords))
    U[bnd] = exact(np, coords[bnd, 0], coords[bnd, 1])[0]
    Aff = A[free][:, free].tocsr()
    bf = b[free] - A[free][:, bnd] @ U[bnd]
    t2 = time.perf_counter()
    if direct:
        U[free] = spla.spsolve(Aff.tocsc(), bf)
        iterations, setup = 0, 0.0
        t3 = time.perf_counter()
    else:
        ml = pyamg.smoothed_aggregation_solver(Aff)
        t3a = time.perf_counter()
        setup = t3a - t2
        residuals = []
        U[free] = ml.solve(bf, tol=rtol, accel='cg', maxiter=500, residuals=residuals)
        iterations = len(residuals) - 1
        t3 = time.perf_counter()
    relres = float(np.linalg.norm(bf - Aff @ U[free]) / np.linalg.norm(bf))
    eL2, eH1 = errors(np, coords, cells, area, grads, U, qp, qw)
    t4 = time.perf_counter()
    return {
        'n': n, 'dofs': len(coords), 'L2': eL2, 'H1semi': eH1, 'iterations': iterations, 'rtol': rtol,
        'relativeResidual': relres,
        'seconds': {'mesh': t1 - t0, 'assemble': t2 - t1, 'setup': setup, 'solve': t3 - t2, 'errors': t4 - t3,
                    'total': t4 - t0},
    }


def main(argv):
    a = parse_args(argv)
    if a.plan:
        print(json.dumps({'levels': a.levels, 'rtol': a.rtol, 'direct': a.direct}))
        return 0
    import numpy as np
    import scipy
    import scipy.sparse as sp
    import scipy.sparse.linalg as spla
    pyamg = None
    if not a.direct:
        import pyamg
    qp, qw = quadrature(np)
    t0 = time.perf_counter()
    out = []
    solver = 'SciPy spsolve (SuperLU)' if a.direct else f'pyamg {pyamg.__version__} smoothed aggregation + CG'
    print(f'P1 ladder, {solver}; Python {sys.version.split()[0]}, NumPy {np.__version__}, SciPy {scipy.__version__}')
    for n, rtol in zip(a.levels, a.rtol):
        r = level(np, sp, spla, pyamg, n, rtol, a.direct, qp, qw)
        s = r['seconds']
        print(f"  n {n:5d}  dofs {r['dofs']:8d}  L2 {r['L2']:.10e}  H1semi {r['H1semi']:.10e}  "
              f"it {r['iterations']:3d}  relres {r['relativeResidual']:.2e}  "
              f"s: mesh {s['mesh']:.2f} assemble {s['assemble']:.2f} solve {s['solve']:.2f} "
              f"(setup {s['setup']:.2f}) errors {s['errors']:.2f}", flush=True)
        out.append(r)
    print(f'total {time.perf_counter() - t0:.2f} s after imports')
    if a.json:
        print(json.dumps({'solver': solver, 'python': sys.version.split()[0], 'numpy': np.__version__,
                          'scipy': scipy.__version__, 'pyamg': None if pyamg is None else pyamg.__version__,
                          'levels': out}))
    return 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1:]))

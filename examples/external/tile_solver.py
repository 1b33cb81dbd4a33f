#!/usr/bin/env python3
"""Heat in a square ceramic tile, solved by a small P1 finite element code (Python 3 standard library only).

The tile is the unit square with Dirichlet data on its whole boundary. Nothing about the manufactured temperature is
typed here: the exact temperature, its gradient and the source come from rungs_data.py, the code rungs generates
for the study (folder --data, or RUNGS_DATA, which rungs sets for every level). For the bundled studies

    u(x, y) = sin(pi x) sinh(pi y) / sinh(pi) + x (1 - x) / 2,   with  -Laplace(u) = 1.

rungs_data.py uses NumPy when it is installed and the math module otherwise; this solver calls it with plain floats. The mesh is an n x n grid of squares, each cut into two
triangles by the diagonal from its lower-left to its upper-right corner; the linear system is solved by a banded
Cholesky factorization.

Output, into the folder given by --out (rungs creates one per level):
  --write errors   errors.json with dofs, h, the L2 and H1-seminorm errors (7-point degree-5 rule per triangle,
                   Stroud 1971, formula T2:5-1) and two quantities (mean temperature, heat flux through the top edge)
  --write vtk      solution.vtk, legacy ASCII VTK: the nodal temperatures on the triangles (VTK_TRIANGLE = 5)
  --write vtu      solution.vtu, the same as VTK XML with ASCII DataArrays
With --quantities, the vtk/vtu modes also write errors.json holding only dofs and the quantities.
Arguments left out are read from RUNGS_N, RUNGS_OUT and RUNGS_DEGREE, which rungs sets for every level.
"""
import argparse
import json
import math
import os
import sys
from operator import mul

DATA = None  # the generated module rungs_data, loaded by load_data()


def load_data(folder):
    """Import rungs_data.py from the folder rungs wrote it into."""
    global DATA
    path = os.path.join(folder, "rungs_data.py")
    if not os.path.isfile(path):
        raise SystemExit(f"tile_solver.py: no {path}; run through rungs (which sets RUNGS_DATA) or give --data")
    sys.path.insert(0, folder)
    # This solver works point by point on plain floats: the math-module path of rungs_data is far faster there.
    os.environ["RUNGS_DATA_SCALAR"] = "1"
    import rungs_data
    DATA = rungs_data


def exact(x, y):
    return float(DATA.exact_u(x, y, 0.0, 0.0))


def exact_grad(x, y):
    gx, gy = DATA.grad_u(x, y, 0.0, 0.0)
    return float(gx), float(gy)


def source(x, y):
    return float(DATA.source_balance(x, y, 0.0, 0.0))

# Stroud (1971), T2:5-1 (Radon's 7-point rule, degree 5; label from memory): barycentric points and weights
# summing to 1. It integrates every x^a y^b with a + b <= 5 exactly (check_rule, run with --check-rule).
_S15 = math.sqrt(15.0)
_A1, _A2 = (6.0 - _S15) / 21.0, (6.0 + _S15) / 21.0
_W1, _W2 = (155.0 - _S15) / 1200.0, (155.0 + _S15) / 1200.0
RULE = [((1 / 3, 1 / 3, 1 / 3), 9.0 / 40.0)]
for a, w in ((_A1, _W1), (_A2, _W2)):
    b = 1.0 - 2.0 * a
    RULE += [((a, a, b), w), ((a, b, a), w), ((b, a, a), w)]


def check_rule():
    """The rule must integrate x^a y^b (a + b <= 5) exactly on the triangle (0,0), (1,0), (0,1): the exact integral is
    a! b! / (a + b + 2)! (a Dirichlet integral). Returns the largest deviation."""
    worst = 0.0
    for a in range(6):
        for b in range(6 - a):
            q = sum(w * 0.5 * lam[1] ** a * lam[2] ** b for lam, w in RULE)
            exact_value = math.factorial(a) * math.factorial(b) / math.factorial(a + b + 2)
            worst = max(worst, abs(q - exact_value))
    return worst


def grid_mesh(n):
    """Vertices (i, j) -> j (n + 1) + i and two counter-clockwise triangles per square."""
    xs = [i / n for i in range(n)] + [1.0]
    points = [(xs[i], xs[j]) for j in range(n + 1) for i in range(n + 1)]
    tris = []
    for j in range(n):
        for i in range(n):
            v00, v10 = j * (n + 1) + i, j * (n + 1) + i + 1
            v01, v11 = v00 + n + 1, v10 + n + 1
            tris.append((v00, v10, v11))
            tris.append((v00, v11, v01))
    return points, tris


def p1_gradients(p0, p1, p2):
    """Twice the signed area and the (constant) gradients of the three barycentric coordinates."""
    area2 = (p1[0] - p0[0]) * (p2[1] - p0[1]) - (p2[0] - p0[0]) * (p1[1] - p0[1])
    bx = ((p1[1] - p2[1]) / area2, (p2[1] - p0[1]) / area2, (p0[1] - p1[1]) / area2)
    by = ((p2[0] - p1[0]) / area2, (p0[0] - p2[0]) / area2, (p1[0] - p0[0]) / area2)
    return area2, bx, by


def solve(n):
    points, tris = grid_mesh(n)
    m = n - 1  # interior vertices per row
    unknown = [-1] * len(points)
    for j in range(1, n):
        for i in range(1, n):
            unknown[j * (n + 1) + i] = (j - 1) * m + (i - 1)
    size = m * m
    width = n  # lower half-bandwidth: the diagonal neighbour (i+1, j+1) is m + 1 = n further on
    band = [[0.0] * (width + 1) for _ in range(size)]  # band[k][j - k + width] = A[k][j], j <= k
    rhs = [0.0] * size
    values = [exact(x, y) if unknown[v] < 0 else 0.0 for v, (x, y) in enumerate(points)]

    for tri in tris:
        p = [points[v] for v in tri]
        area2, bx, by = p1_gradients(*p)
        area = 0.5 * area2
        for a in range(3):
            ka = unknown[tri[a]]
            if ka < 0:
                continue
            # Load with the 7-point rule (degree 5), so a variable source is integrated well beyond P1's order.
            for lam, w in RULE:
                xq = lam[0] * p[0][0] + lam[1] * p[1][0] + lam[2] * p[2][0]
                yq = lam[0] * p[0][1] + lam[1] * p[1][1] + lam[2] * p[2][1]
                rhs[ka] += w * area * source(xq, yq) * lam[a]
            for b in range(3):
                kab = area * (bx[a] * bx[b] + by[a] * by[b])
                kb = unknown[tri[b]]
                if kb < 0:
                    rhs[ka] -= kab * values[tri[b]]  # Dirichlet value moved to the right-hand side
                elif kb <= ka:
                    band[ka][kb - ka + width] += kab

    # Banded Cholesky A = L L^T (Golub & Van Loan 2013, §4.3; section from memory), L stored in place of the band.
    for k in range(size):
        lo = max(0, k - width)
        row = band[k]
        for j in range(lo, k + 1):
            other = band[j]
            start = max(lo, j - width)
            s = row[j - k + width] - sum(map(mul, row[start - k + width:j - k + width], other[start - j + width:width]))
            if j == k:
                if s <= 0.0:
                    raise ArithmeticError(f"matrix not positive definite at row {k}")
                row[width] = math.sqrt(s)
            else:
                row[j - k + width] = s / other[width]
    y = [0.0] * size
    for k in range(size):
        lo = max(0, k - width)
        row = band[k]
        y[k] = (rhs[k] - sum(map(mul, row[lo - k + width:width], y[lo:k]))) / row[width]
    u = y
    for k in range(size - 1, -1, -1):
        u[k] /= band[k][width]
        for j in range(max(0, k - width), k):
            u[j] -= band[k][j - k + width] * u[k]
    for v, k in enumerate(unknown):
        if k >= 0:
            values[v] = u[k]
    return points, tris, values


def errors_and_quantities(n, points, tris, values):
    l2 = h1 = mean = flux_top = 0.0
    for tri in tris:
        p = [points[v] for v in tri]
        uh = [values[v] for v in tri]
        area2, bx, by = p1_gradients(*p)
        area = 0.5 * area2
        gx = sum(uh[a] * bx[a] for a in range(3))
        gy = sum(uh[a] * by[a] for a in range(3))
        mean += area * sum(uh) / 3.0
        for lam, w in RULE:
            x = sum(lam[a] * p[a][0] for a in range(3))
            yq = sum(lam[a] * p[a][1] for a in range(3))
            e = exact(x, yq) - sum(lam[a] * uh[a] for a in range(3))
            ex, ey = exact_grad(x, yq)
            l2 += w * area * e * e
            h1 += w * area * ((ex - gx) ** 2 + (ey - gy) ** 2)
        top = [a for a in range(3) if p[a][1] == 1.0]
        if len(top) == 2:
            flux_top += gy * abs(p[top[0]][0] - p[top[1]][0])
    return {"L2": math.sqrt(l2), "H1semi": math.sqrt(h1)}, {"mean_temperature": mean, "flux_top": flux_top}


def write_legacy_vtk(path, points, tris, values):
    lines = ["# vtk DataFile Version 3.0", "ceramic tile temperature, P1", "ASCII", "DATASET UNSTRUCTURED_GRID",
             f"POINTS {len(points)} double"]
    lines += [f"{x!r} {y!r} 0" for x, y in points]
    lines.append(f"CELLS {len(tris)} {4 * len(tris)}")
    lines += [f"3 {a} {b} {c}" for a, b, c in tris]
    lines.append(f"CELL_TYPES {len(tris)}")
    lines += ["5"] * len(tris)
    lines += [f"POINT_DATA {len(points)}", "SCALARS temperature double 1", "LOOKUP_TABLE default"]
    lines += [repr(v) for v in values]
    with open(path, "w") as f:
        f.write("\n".join(lines) + "\n")


def write_vtu(path, points, tris, values):
    conn = " ".join(f"{a} {b} {c}" for a, b, c in tris)
    offsets = " ".join(str(3 * (k + 1)) for k in range(len(tris)))
    with open(path, "w") as f:
        f.write('<?xml version="1.0"?>\n<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian">\n')
        f.write(f'  <UnstructuredGrid>\n    <Piece NumberOfPoints="{len(points)}" NumberOfCells="{len(tris)}">\n')
        f.write('      <PointData Scalars="temperature">\n        <DataArray type="Float64" Name="temperature" format="ascii">\n')
        f.write("\n".join(repr(v) for v in values) + "\n        </DataArray>\n      </PointData>\n")
        f.write('      <Points>\n        <DataArray type="Float64" NumberOfComponents="3" format="ascii">\n')
        f.write("\n".join(f"{x!r} {y!r} 0" for x, y in points) + "\n        </DataArray>\n      </Points>\n")
        f.write('      <Cells>\n        <DataArray type="Int64" Name="connectivity" format="ascii">\n' + conn + "\n        </DataArray>\n")
        f.write('        <DataArray type="Int64" Name="offsets" format="ascii">\n' + offsets + "\n        </DataArray>\n")
        f.write('        <DataArray type="UInt8" Name="types" format="ascii">\n' + " ".join("5" for _ in tris))
        f.write("\n        </DataArray>\n      </Cells>\n    </Piece>\n  </UnstructuredGrid>\n</VTKFile>\n")


def main(argv):
    parser = argparse.ArgumentParser(description="P1 finite elements for heat in a ceramic tile")
    parser.add_argument("--n", type=int, default=int(os.environ.get("RUNGS_N", "0")), help="squares per side")
    parser.add_argument("--degree", type=int, default=int(os.environ.get("RUNGS_DEGREE", "1")))
    parser.add_argument("--out", default=os.environ.get("RUNGS_OUT"), help="output folder")
    parser.add_argument("--write", choices=["errors", "vtk", "vtu"], default="errors")
    parser.add_argument("--quantities", action="store_true", help="with vtk/vtu, also write the quantities to errors.json")
    parser.add_argument("--data", default=os.environ.get("RUNGS_DATA"), help="folder holding rungs_data.py (default RUNGS_DATA)")
    parser.add_argument("--check-rule", action="store_true", help="only check the quadrature rule's exactness and exit")
    args = parser.parse_args(argv)
    if args.check_rule:
        worst = check_rule()
        print(f"largest deviation of the 7-point rule on monomials of degree <= 5: {worst:.3e}")
        sys.exit(0 if worst < 1e-15 else 1)
    if args.n < 1:
        parser.error("--n must be a positive number of squares per side (or set RUNGS_N)")
    if args.degree != 1:
        parser.error(f"only degree 1 (P1) is implemented, got --degree {args.degree}")
    if not args.out:
        parser.error("--out is required (or set RUNGS_OUT)")
    if not args.data:
        parser.error("--data is required (or set RUNGS_DATA): the folder of the generated rungs_data.py")
    load_data(args.data)
    os.makedirs(args.out, exist_ok=True)

    points, tris, values = solve(args.n)
    errors, quantities = errors_and_quantities(args.n, points, tris, values)
    summary = {"dofs": len(points), "h": math.sqrt(2.0) / args.n, "cells": len(tris)}
    if args.write == "errors":
        summary.update(errors=errors, quantities=quantities)
    elif args.quantities:
        summary.update(quantities=quantities)
    if args.write == "vtk":
        write_legacy_vtk(os.path.join(args.out, "solution.vtk"), points, tris, values)
    elif args.write == "vtu":
        write_vtu(os.path.join(args.out, "solution.vtu"), points, tris, values)
    if args.write == "errors" or args.quantities:
        with open(os.path.join(args.out, "errors.json"), "w") as f:
            json.dump(summary, f, allow_nan=False, indent=2)
    print(f"tile n={args.n}: {len(points)} nodes, L2 error {errors['L2']:.3e}")


if __name__ == "__main__":
    main(sys.argv[1:])

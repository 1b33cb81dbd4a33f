#!/usr/bin/env python3
"""Route 3 of docs/verify-your-discretization.md: an external code (here Python 3, standard library only).

Heat along a kiln rod, -(k u')' = f on [0, 1], both ends held at the exact temperature, solved with linear elements
on n equal cells. Nothing about the manufactured solution is typed here: the conductivity k, the source f and the
end temperatures come from rungs_data.py, which rungs generates into the folder given by --data (it also sets
RUNGS_DATA). The solution is written to <out>/solution.vtk (legacy ASCII VTK, VTK_LINE cells) and rungs integrates
the errors itself. Invented data.
"""
import argparse
import math
import os
import sys


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, required=True)
    ap.add_argument("--data", default=os.environ.get("RUNGS_DATA"))
    ap.add_argument("--out", required=True)
    args = ap.parse_args()
    sys.path.insert(0, args.data)
    os.environ["RUNGS_DATA_SCALAR"] = "1"  # plain floats: no NumPy needed
    import rungs_data as d

    n = args.n
    x = [i / n for i in range(n + 1)]
    # Tridiagonal system, 2-point Gauss rule per cell (Abramowitz & Stegun 1964, 25.4.29).
    gauss = [(0.5 - 0.5 / math.sqrt(3), 0.5), (0.5 + 0.5 / math.sqrt(3), 0.5)]
    low, dia, up, rhs = [0.0] * (n + 1), [0.0] * (n + 1), [0.0] * (n + 1), [0.0] * (n + 1)
    for c in range(n):
        a, b = c, c + 1
        length = x[b] - x[a]
        for xi, w in gauss:
            xq = x[a] + xi * length
            kq = float(d.coef_k(xq, 0.0, 0.0, 0.0)) * w / length
            fq = float(d.source_balance(xq, 0.0, 0.0, 0.0)) * w * length
            dia[a] += kq; dia[b] += kq; up[a] -= kq; low[b] -= kq
            rhs[a] += fq * (1 - xi); rhs[b] += fq * xi
    for v in (0, n):
        low[v] = up[v] = 0.0
        dia[v] = 1.0
        rhs[v] = float(d.exact_u(x[v], 0.0, 0.0, 0.0))
    for i in range(1, n + 1):  # Thomas algorithm
        m = low[i] / dia[i - 1]
        dia[i] -= m * up[i - 1]
        rhs[i] -= m * rhs[i - 1]
    u = [0.0] * (n + 1)
    u[n] = rhs[n] / dia[n]
    for i in range(n - 1, -1, -1):
        u[i] = (rhs[i] - up[i] * u[i + 1]) / dia[i]

    with open(os.path.join(args.out, "solution.vtk"), "w") as out:
        out.write("# vtk DataFile Version 3.0\nkiln rod\nASCII\nDATASET UNSTRUCTURED_GRID\n")
        out.write(f"POINTS {n + 1} double\n")
        out.writelines(f"{xi!r} 0 0\n" for xi in x)
        out.write(f"CELLS {n} {3 * n}\n")
        out.writelines(f"2 {c} {c + 1}\n" for c in range(n))
        out.write(f"CELL_TYPES {n}\n")
        out.writelines("3\n" for _ in range(n))
        out.write(f"POINT_DATA {n + 1}\nSCALARS temperature double 1\nLOOKUP_TABLE default\n")
        out.writelines(f"{v!r}\n" for v in u)


if __name__ == "__main__":
    main()

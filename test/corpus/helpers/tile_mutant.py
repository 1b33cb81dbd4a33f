#!/usr/bin/env python3
"""Runs examples/external/tile_solver.py with one named mutation applied to its source text.

    python3 test/corpus/helpers/tile_mutant.py MUTATION [tile_solver.py arguments ...]

Each mutation is a list of (original, replacement) snippets; every original must occur exactly once in the
solver's text, so a change to the solver that makes a mutation stale stops the run (exit status 3, naming the
mutation and the snippet) instead of silently running the unmutated solver. The mutated text is compiled under
the solver's own file name and its main() is called with the remaining arguments. The solver file itself is
never written. Variables the replacements read (CELLS: squares per side) are set before main() runs.
"""
import os
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
SOLVER = os.path.normpath(os.path.join(HERE, "..", "..", "..", "examples", "external", "tile_solver.py"))

LOAD_LOOP = (
    "            for lam, w in RULE:\n"
    "                xq = lam[0] * p[0][0] + lam[1] * p[1][0] + lam[2] * p[2][0]"
)
SOURCE = "    return float(DATA.source_balance(x, y, 0.0, 0.0))"
ERROR_GRAD = "            ex, ey = exact_grad(x, yq)"

MUTATIONS = {
    # The solver as it is (the wrapper must not change anything by itself).
    "none": [],
    # Flaw: the source evaluated half a cell to the right of the quadrature point.
    "source-half-cell": [(SOURCE, "    return float(DATA.source_balance(x + 0.5 / CELLS, y, 0.0, 0.0))")],
    # Benign: the source evaluated h^2/2 to the right (an O(h^2) perturbation of the load).
    "source-shift-h2": [(SOURCE, "    return float(DATA.source_balance(x + 0.5 / CELLS ** 2, y, 0.0, 0.0))")],
    # Flaw: an off-by-one in the assembly loop leaves the last triangle out.
    "skip-last-cell": [("    for tri in tris:\n        p = [points[v] for v in tri]\n        area2, bx, by = p1_gradients(*p)\n        area = 0.5 * area2\n        for a in range(3):",
                        "    for tri in tris[:-1]:\n        p = [points[v] for v in tri]\n        area2, bx, by = p1_gradients(*p)\n        area = 0.5 * area2\n        for a in range(3):")],
    # Flaw: the Dirichlet lifting added to the right-hand side instead of subtracted.
    "lift-sign": [("rhs[ka] -= kab * values[tri[b]]", "rhs[ka] += kab * values[tri[b]]")],
    # Flaw in the error routine: the H1 error measured against the gradient of the interpolant of u.
    "grad-interpolant": [(ERROR_GRAD,
                          "            ex = sum(exact(*p[a]) * bx[a] for a in range(3))\n"
                          "            ey = sum(exact(*p[a]) * by[a] for a in range(3))")],
    # Benign: the load integrated by the one-point centroid rule.
    "load-centroid": [(LOAD_LOOP, LOAD_LOOP.replace("in RULE:", "in (((1 / 3, 1 / 3, 1 / 3), 1.0),):"))],
}


def mutated_source(name):
    if name not in MUTATIONS:
        raise SystemExit(f"tile_mutant.py: unknown mutation '{name}'; known: {', '.join(sorted(MUTATIONS))}")
    with open(SOLVER) as f:
        text = f.read()
    for original, replacement in MUTATIONS[name]:
        count = text.count(original)
        if count != 1:
            sys.stderr.write(f"tile_mutant.py: mutation '{name}' no longer applies: snippet found {count} times in {SOLVER}:\n{original}\n")
            sys.exit(3)
        text = text.replace(original, replacement)
    return text


def cells_from(argv):
    for i, a in enumerate(argv):
        if a == "--n" and i + 1 < len(argv):
            return int(argv[i + 1])
        if a.startswith("--n="):
            return int(a[4:])
    return int(os.environ.get("RUNGS_N", "0"))


def main():
    if len(sys.argv) < 2:
        raise SystemExit("usage: tile_mutant.py MUTATION [tile_solver.py arguments ...]")
    name, rest = sys.argv[1], sys.argv[2:]
    namespace = {"__name__": "tile_solver_mutant", "__file__": SOLVER}
    exec(compile(mutated_source(name), SOLVER, "exec"), namespace)
    namespace["CELLS"] = cells_from(rest)
    namespace["main"](rest)


if __name__ == "__main__":
    main()

#!/usr/bin/env python3
"""Heat in a kiln rod, u_t - (k(x) u_x)_x = f(x, t) on [a, b], solved by a small finite element code (Python 3
standard library only).

Nothing about the manufactured temperature is typed here: it all comes from rungs_data.py, the code rungs generates
for the study (folder --data, or RUNGS_DATA, which rungs sets for every level). The names read from it, all called
with (x, 0, 0, t) on plain floats (RUNGS_DATA_SCALAR=1 selects its math-module path):

    exact_u(x, y, z, t)         Dirichlet data u = g(x, t) at both ends (and the errors of --write errors)
    initial_u(x, y, z)          initial temperature (generated when the problem depends on time;
                                without it exact_u(x, 0, 0, 0) is used)
    source_balance(x, y, z, t)  the source f
    coef_k(x, y, z, t)          the conductivity k(x), when the study has one (else k = 1); it must not depend on t
    grad_u(x, y, z, t)          u_x, only for the H1-seminorm error of --write errors

The interval [a, b] is the bounding box of the domain in problem.json next to rungs_data.py; without that file it
is --a / --b (default [0, 1]).

Space: P1 (or P2 with --degree 2) Lagrange elements on n equal cells. The consistent mass matrix M, the stiffness
matrix K and the load vector F(t) are assembled with the (p + 2)-point Gauss-Legendre rule per cell (exact for
polynomials of degree 2p + 3: M and K exactly for k of degree <= 2p + 1; rungs's own rule for a load that is not a
polynomial is degree 2p + 2). F is integrated afresh at every time the stepper needs it. Initial data are the
nodal interpolant. Systems with M + s K are solved on the interior nodes by a banded LDL^T factorization, set up
once per step size (half-bandwidth p: for P1 it is the Thomas algorithm), with the Dirichlet values moved to the
right-hand side.

Steppers for the method of lines M U' + K U = F(t), equal steps dt = T / steps (--method):
  be     backward Euler                                           (order 1)
  cn     Crank-Nicolson (trapezoidal rule), F averaged            (order 2)
  bdf2   two-step backward differentiation, first step one CN step (order 2)
  dirk3  Alexander's three-stage SDIRK (Alexander 1977): stiffly accurate, L-stable, order 3, stage order 1
The Dirichlet values are g(t_{n+1}) at every new time level. Stages of the DIRK are solution values at
t_n + c_i dt; their boundary values (--stage-boundary):
  integrated  (default) the boundary values obey u_b' = dg/dt, integrated with the same Runge-Kutta stages:
              U_b,i = g(t_n) + dt sum_j a_ij g'(t_n + c_j dt). The consistent method of lines: the DIRK is then
              applied to one ODE system and keeps its classical order as dt -> 0 on a fixed mesh. (While dt is
              large against the mesh's fastest mode, its stage order 1 still shows as rates below 3 when the data
              do not vanish at the ends; measured with sin(pi x) e^-t + x t, k = 1 + x/2, 64 P2 cells: rates 2.5,
              2.7, 2.5 for dt = 1/8 .. 1/64, the same errors to three digits as rungs's own P2 DIRK; a u linear in
              x shows 3.0.) rungs_data.py holds no time derivative, so
              g' is the fourth-order central difference of exact_u with spacing dt/16 (its error, O(dt^4) plus
              O(eps/dt) round-off, stays below the method's own O(dt^3)); the end value is reset to g(t_{n+1}).
  evaluated   each stage gets g at its stage time (kept for demonstration). Those boundary values are not the
              stages of any Runge-Kutta integration of g; their error (stage order 1) reaches the interior through
              the mass and stiffness couplings, and while dt is large against the mesh's fastest mode the method
              loses order when g moves. Measured (u = (1 + x) sin t + 1, k = 2 on [0, 2], T = 1, dt = 1/16 .. 1/256):
              rates 2.0 .. 2.6 with 8 cells, 2.4 .. 2.8 with 4 cells, against 3.0 for the default.

Deliberate flaws (--flaw), for demonstration studies that must be caught:
  old-time-source  CN with the source at the old time only, dt F(t_n) instead of dt (F(t_n) + F(t_{n+1})) / 2:
                   first order in time
  stage-time       the DIRK with F(t_n) at every stage instead of F(t_n + c_i dt): first order in time whenever
                   f varies in time

Output, into the folder --out (rungs creates one per level), at the final time T:
  --write vtk     solution.vtk, legacy ASCII VTK: the nodal temperatures on the cells (VTK_LINE = 3 for P1,
                  VTK_QUADRATIC_EDGE = 21 for P2), point array 'temperature'; and errors.json with dofs, h, cells
                  and the time steps under info
  --write errors  errors.json with dofs, h, cells and the L2 and H1-seminorm errors at T ((p + 4)-point rule)
  --write-series  (with --write vtk) every time level instead of the final time alone: solution-<k>.vtk at
                  t_k = k dt for k = 0 .. steps (k = 0 the initial data, k = steps the final time, the same file
                  solution.vtk would be), each written as soon as its step is done; solution.vtk is then not written.
                  rungs measures every file against u(., t_k) for the norms over time (Linf_L2, L2_H1).

Arguments left out are read from RUNGS_N, RUNGS_STEPS, RUNGS_T, RUNGS_DEGREE, RUNGS_OUT and RUNGS_DATA.
"""
import argparse
import json
import math
import os
import sys
from operator import mul

DATA = None  # the generated module rungs_data, loaded by load_data()


# ---------------------------------------------------------------------------------------------- data from rungs


def fail(message):
    """A user mistake: one line on standard error, exit status 2 (as argparse does for bad arguments)."""
    sys.stderr.write(f"rod_heat.py: {message}\n")
    sys.exit(2)


def load_data(folder):
    """Import rungs_data.py from the folder rungs wrote it into; return problem.json's content (or None)."""
    global DATA
    path = os.path.join(folder, "rungs_data.py")
    if not os.path.isfile(path):
        fail(f"no {path}; run through rungs (which sets RUNGS_DATA) or give --data")
    sys.path.insert(0, folder)
    # This code works point by point on plain floats: the math-module path of rungs_data is far faster there.
    os.environ["RUNGS_DATA_SCALAR"] = "1"
    import rungs_data
    DATA = rungs_data
    for name in ("exact_u", "source_balance"):
        if not hasattr(DATA, name):
            fail(f"{path} has no function {name}; generate the data of a heat-equation study of a field u")
    problem = os.path.join(folder, "problem.json")
    if not os.path.isfile(problem):
        return None
    with open(problem) as f:
        return json.load(f)


def check_problem(problem):
    """The data must be for this code's equation: one dimension, u_t - (k u_x)_x = f (rungs's heat preset)."""
    if problem is None:
        return
    if problem.get("dim") != 1:
        fail(f"the data are for a {problem.get('dim')}D domain; this code solves on an interval (1D)")
    equations = problem.get("pde", {}).get("equations", {})
    if equations:
        found = [(e.get("flux", "").replace(" ", ""), e.get("rest", "").replace(" ", "")) for e in equations.values()]
        if len(found) != 1 or found[0][0] not in ("grad(u)", "k*grad(u)") or found[0][1] != "dt(u)":
            fail(f"the data are for the equation(s) {found} (flux, rest); this code solves u_t - (k u_x)_x = f, "
                 "the heat preset: flux 'k*grad(u)' or 'grad(u)', rest 'dt(u)'")


def exact(x, t):
    return float(DATA.exact_u(x, 0.0, 0.0, t))


def initial(x):
    if hasattr(DATA, "initial_u"):
        return float(DATA.initial_u(x, 0.0, 0.0))
    return exact(x, 0.0)


def conductivity_function():
    """k(x) as a function, or None for k = 1."""
    if not hasattr(DATA, "coef_k"):
        return None
    return lambda x, t: float(DATA.coef_k(x, 0.0, 0.0, t))


def boundary_rate(x, t, delta):
    """dg/dt at (x, t): the fourth-order central difference of exact_u, weights (1, -8, 8, -1) / 12 at t - 2 delta ..
    t + 2 delta (Fornberg 1988, Math. Comp. 51, Table 1; from memory); error delta^4 g^(5) / 30 plus a round-off of
    about 1.5 eps |g| / delta. Called at stage times t >= t_n + gamma dt with delta = dt / 16, so it never looks
    before t_n (and at most dt / 8 beyond T)."""
    return (8.0 * (exact(x, t + delta) - exact(x, t - delta)) - (exact(x, t + 2 * delta) - exact(x, t - 2 * delta))) \
        / (12.0 * delta)


# ------------------------------------------------------------------------------------------- quadrature, space


def gauss_legendre(m):
    """Points and weights of the m-point Gauss-Legendre rule on [-1, 1], exact for degree 2m - 1: Newton's method on
    the Legendre polynomial P_m (three-term recurrence) from Chebyshev-like starting points (common practice, e.g.
    Press et al. 2007, Numerical Recipes 3rd ed., section 4.6; from memory)."""
    points, weights = [0.0] * m, [0.0] * m
    for i in range((m + 1) // 2):
        x = math.cos(math.pi * (i + 0.75) / (m + 0.5))
        for _ in range(100):
            p0, p1 = 1.0, x
            for k in range(2, m + 1):
                p0, p1 = p1, ((2 * k - 1) * x * p1 - (k - 1) * p0) / k
            dp = m * (x * p1 - p0) / (x * x - 1.0) if m > 1 else 1.0
            step = p1 / dp
            x -= step
            if abs(step) < 1e-16:
                break
        p0, p1 = 1.0, x
        for k in range(2, m + 1):
            p0, p1 = p1, ((2 * k - 1) * x * p1 - (k - 1) * p0) / k
        dp = m * (x * p1 - p0) / (x * x - 1.0) if m > 1 else 1.0
        w = 2.0 / ((1.0 - x * x) * dp * dp)
        points[i], points[m - 1 - i] = -x, x
        weights[i] = weights[m - 1 - i] = w
    if m % 2 == 1:
        points[m // 2] = 0.0
    return points, weights


def check_rule():
    """Each rule this code uses must integrate x^j on [-1, 1] exactly for j <= 2m - 1 (exact value 2/(j+1) for even
    j, 0 for odd j). Returns the largest deviation over m = 1..6 (3, 4: assembly; 5, 6: errors)."""
    worst = 0.0
    for m in range(1, 7):
        xs, ws = gauss_legendre(m)
        for j in range(2 * m):
            exact_value = 2.0 / (j + 1) if j % 2 == 0 else 0.0
            worst = max(worst, abs(sum(w * x ** j for x, w in zip(xs, ws)) - exact_value))
    return worst


def shape(p, xi):
    """Values and d/dxi of the Lagrange basis on [-1, 1], nodes in the order left, (middle,) right."""
    if p == 1:
        return [(1.0 - xi) / 2.0, (1.0 + xi) / 2.0], [-0.5, 0.5]
    return [xi * (xi - 1.0) / 2.0, 1.0 - xi * xi, xi * (xi + 1.0) / 2.0], [xi - 0.5, -2.0 * xi, xi + 0.5]


class Rod:
    """n equal cells of degree p on [a, b]: nodes numbered left to right (cell e holds p e .. p e + p)."""

    def __init__(self, a, b, n, p):
        self.a, self.b, self.n, self.p = a, b, n, p
        self.h = (b - a) / n
        self.size = n * p + 1
        self.x = [a + (b - a) * i / (n * p) for i in range(self.size)]
        self.x[-1] = b
        xi, w = gauss_legendre(p + 2)
        self.quad_x = [a + self.h * (e + (q + 1.0) / 2.0) for e in range(n) for q in xi]
        self.m = len(xi)
        # (h/2) w_q phi_a(xi_q): the same for every cell on equal cells, so the load needs one product per point.
        self.load_weights = [[self.h / 2.0 * w[q] * shape(p, xi[q])[0][a] for q in range(self.m)] for a in range(p + 1)]
        self.xi, self.w = xi, w

    def assemble(self, k):
        """The mass and stiffness matrices as symmetric bands: band[d][i] = A[i][i + d], d = 0 .. p."""
        p, h, size = self.p, self.h, self.size
        M = [[0.0] * size for _ in range(p + 1)]
        K = [[0.0] * size for _ in range(p + 1)]
        tables = [shape(p, xi) for xi in self.xi]
        for e in range(self.n):
            base = e * p
            for q in range(self.m):
                phi, dphi = tables[q]
                kq = 1.0 if k is None else k(self.quad_x[e * self.m + q], 0.0)
                wm = self.w[q] * h / 2.0              # dx = (h/2) dxi
                wk = self.w[q] * kq * 2.0 / h         # d/dx = (2/h) d/dxi, twice, times (h/2)
                for a in range(p + 1):
                    for c in range(a, p + 1):
                        M[c - a][base + a] += wm * phi[a] * phi[c]
                        K[c - a][base + a] += wk * dphi[a] * dphi[c]
        return M, K

    def load(self, t, out, fq):
        """F(t) into out: integral of f(., t) phi_i by the cells' Gauss rule; fq is a work list of one value per point.
        Both lists are allocated once by the caller and refilled in place, so a time step creates no new lists (the
        project's rule for hot loops, DEVELOPERS.md 'Conventions'; CPython still boxes each float)."""
        source = DATA.source_balance
        for q, x in enumerate(self.quad_x):
            fq[q] = float(source(x, 0.0, 0.0, t))
        for i in range(self.size):
            out[i] = 0.0
        m, p = self.m, self.p
        for a, wa in enumerate(self.load_weights):
            for e in range(self.n):
                acc, base = 0.0, e * m
                for q in range(m):
                    acc += wa[q] * fq[base + q]
                out[e * p + a] += acc


# ------------------------------------------------------------------------------------------ banded linear algebra


def band_matvec(band, v, out):
    """out = A v for a symmetric band (band[d][i] = A[i][i + d])."""
    size = len(v)
    diag = band[0]
    for i in range(size):
        out[i] = diag[i] * v[i]
    for d in range(1, len(band)):
        row = band[d]
        for i in range(size - d):
            out[i] += row[i] * v[i + d]
            out[i + d] += row[i] * v[i]


def combine(M, K, s):
    """The band of M + s K."""
    return [[m + s * k for m, k in zip(Md, Kd)] for Md, Kd in zip(M, K)]


class BandSolver:
    """A = L D L^T on the interior nodes 1 .. size-2 of a symmetric positive definite band of half-bandwidth w
    (Golub & Van Loan 2013, Matrix Computations 4th ed., section 4.3 on band LDL^T; from memory). For w = 1 this is
    the Thomas algorithm. No pivoting is needed: M + s K with s > 0 is SPD."""

    def __init__(self, band):
        self.band = band
        self.w = w = len(band) - 1
        m = len(band[0]) - 2                     # interior rows 1 .. m
        # L[d][i] = L[i + d][i] (subdiagonal d of the unit lower factor), D[i]; indices relative to row 1.
        L = [[0.0] * m for _ in range(w + 1)]
        D = [0.0] * m
        for j in range(m):
            s = band[0][j + 1] - sum(L[j - k][k] ** 2 * D[k] for k in range(max(0, j - w), j))
            if s <= 0.0:
                raise ArithmeticError(f"matrix not positive definite at interior row {j}")
            D[j] = s
            for d in range(1, w + 1):
                i = j + d
                if i >= m:
                    break
                s = band[d][j + 1] - sum(L[i - k][k] * L[j - k][k] * D[k] for k in range(max(0, i - w), j))
                L[d][j] = s / D[j]
        self.L, self.D, self.m = L, D, m

    def solve(self, rhs, u):
        """Solves the interior rows of A u = rhs for the interior of u; u's first and last entries hold the Dirichlet
        values and are kept (their columns moved to the right-hand side). rhs is overwritten."""
        band, w, L, D, m = self.band, self.w, self.L, self.D, self.m
        last = len(u) - 1
        for d in range(1, w + 1):                 # columns of the two boundary nodes
            if d <= last - 1:
                rhs[d] -= band[d][0] * u[0]
                rhs[last - d] -= band[d][last - d] * u[last]
        y = rhs                                   # forward L y = r, in place on rows 1 .. m
        for i in range(m):
            acc = y[i + 1]
            for d in range(1, min(w, i) + 1):
                acc -= L[d][i - d] * y[i - d + 1]
            y[i + 1] = acc
        for i in range(m - 1, -1, -1):            # D z = y, then L^T x = z
            acc = y[i + 1] / D[i]
            for d in range(1, min(w, m - 1 - i) + 1):
                acc -= L[d][i] * u[i + d + 1]
            u[i + 1] = acc


# ---------------------------------------------------------------------------------------------------- steppers


def alexander_dirk3():
    """Alexander (1977), SIAM J. Numer. Anal. 14, 1006-1021, the three-stage method of order 3 (from memory):
    gamma the root in (1/6, 1/2) of 6 g^3 - 18 g^2 + 9 g - 1 = 0 (about 0.435866521508459), tau = (1 + gamma)/2,
    b1 = -(6 g^2 - 16 g + 1)/4, b2 = (6 g^2 - 20 g + 5)/4, last row = b (stiffly accurate), c = (g, tau, 1)."""
    g = 0.4358665
    for _ in range(50):
        g -= (6 * g ** 3 - 18 * g ** 2 + 9 * g - 1) / (18 * g ** 2 - 36 * g + 9)
    tau = (1.0 + g) / 2.0
    b1 = -(6 * g * g - 16 * g + 1) / 4.0
    b2 = (6 * g * g - 20 * g + 5) / 4.0
    return g, [[g], [tau - g, g], [b1, b2, g]], [g, tau, 1.0]


def run(rod, k, T, steps, method, flaw, stage_boundary, on_level=None):
    """Advances from the initial data to T; returns the nodal values at T. on_level(j, U), when given, is called with
    the nodal values of every time level j = 0 .. steps as soon as they are known (U is the stepper's own list: use it
    before returning)."""
    if on_level is None:
        on_level = lambda j, values: None
    dt = T / steps
    size = rod.size
    M, K = rod.assemble(k)
    a, b = rod.a, rod.b
    U = [initial(x) for x in rod.x]
    # Work lists, allocated once and refilled (see Rod.load).
    rhs, MU, KU, F0, F1, fq = ([0.0] * size for _ in range(6))
    nq = [0.0] * len(rod.quad_x)

    def set_boundary(v, t):
        v[0], v[-1] = exact(a, t), exact(b, t)

    on_level(0, U)

    if method in ("cn", "bdf2"):
        cn = BandSolver(combine(M, K, dt / 2.0))
    if method == "cn":
        rod.load(0.0, F0, nq)
        for step in range(steps):
            t1 = (step + 1) * dt
            rod.load(t1, F1, nq)
            band_matvec(M, U, MU)
            band_matvec(K, U, KU)
            for i in range(size):
                if flaw == "old-time-source":     # deliberate: dt F(t_n) instead of dt (F(t_n) + F(t_n+1)) / 2
                    rhs[i] = MU[i] - dt / 2.0 * KU[i] + dt * F0[i]
                else:
                    rhs[i] = MU[i] - dt / 2.0 * KU[i] + dt / 2.0 * (F0[i] + F1[i])
            set_boundary(U, t1)
            cn.solve(rhs, U)
            F0, F1 = F1, F0
            on_level(step + 1, U)
        return U

    if method == "be":
        solver = BandSolver(combine(M, K, dt))
        for step in range(steps):
            t1 = (step + 1) * dt
            rod.load(t1, F1, nq)
            band_matvec(M, U, MU)
            for i in range(size):
                rhs[i] = MU[i] + dt * F1[i]
            set_boundary(U, t1)
            solver.solve(rhs, U)
            on_level(step + 1, U)
        return U

    if method == "bdf2":
        # BDF2 (3/2 U^{n+1} - 2 U^n + 1/2 U^{n-1}) / dt = U'(t_{n+1}); the first step is one Crank-Nicolson step.
        bdf = BandSolver(combine(M, K, 2.0 * dt / 3.0))
        previous = U[:]
        rod.load(0.0, F0, nq)
        rod.load(dt, F1, nq)
        band_matvec(M, U, MU)
        band_matvec(K, U, KU)
        for i in range(size):
            rhs[i] = MU[i] - dt / 2.0 * KU[i] + dt / 2.0 * (F0[i] + F1[i])
        set_boundary(U, dt)
        cn.solve(rhs, U)
        on_level(1, U)
        combo = KU  # reused as work list
        for step in range(1, steps):
            t1 = (step + 1) * dt
            rod.load(t1, F1, nq)
            for i in range(size):
                combo[i] = (4.0 * U[i] - previous[i]) / 3.0
            band_matvec(M, combo, MU)
            for i in range(size):
                rhs[i] = MU[i] + 2.0 * dt / 3.0 * F1[i]
            previous, U = U, previous
            set_boundary(U, t1)
            bdf.solve(rhs, U)
            on_level(step + 1, U)
        return U

    # dirk3: stage i solves (M + gamma dt K) U_i = M W_i + gamma dt F(t_n + c_i dt), W_i = U^n + dt sum_{j<i} a_ij k_j,
    # and its slope is k_i = (U_i - W_i) / (gamma dt) (= U'_i, so M^-1 is never needed). U^{n+1} = U_3.
    gamma, A, c = alexander_dirk3()
    solver = BandSolver(combine(M, K, gamma * dt))
    slopes = [[0.0] * size for _ in range(3)]
    W = [0.0] * size
    stage = [0.0] * size
    delta = dt / 16.0
    for step in range(steps):
        t0 = step * dt
        if flaw == "stage-time":                  # deliberate: every stage sees F(t_n)
            rod.load(t0, F0, nq)
        for i in range(3):
            ti = t0 + c[i] * dt
            W[:] = U
            for l in range(i):
                coefficient, slope = dt * A[i][l], slopes[l]
                for j in range(size):
                    W[j] += coefficient * slope[j]
            if flaw != "stage-time":
                rod.load(ti, F0, nq)
            band_matvec(M, W, MU)
            for j in range(size):
                rhs[j] = MU[j] + gamma * dt * F0[j]
            if stage_boundary == "integrated":    # u_b' = dg/dt through the same stages
                stage[0] = W[0] + gamma * dt * boundary_rate(a, ti, delta)
                stage[-1] = W[-1] + gamma * dt * boundary_rate(b, ti, delta)
            else:                                 # g at the stage time
                set_boundary(stage, ti)
            solver.solve(rhs, stage)
            slope = slopes[i]
            for j in range(size):
                slope[j] = (stage[j] - W[j]) / (gamma * dt)
        U, stage = stage, U                       # stiffly accurate: the last stage is the new value
        set_boundary(U, t0 + dt)
        on_level(step + 1, U)
    return U


# ---------------------------------------------------------------------------------------------------- output


def errors_at(rod, values, T):
    """L2 and H1-seminorm errors of the discrete solution at T, with the (p + 4)-point Gauss rule per cell."""
    p, h = rod.p, rod.h
    xi, w = gauss_legendre(p + 4)
    tables = [shape(p, s) for s in xi]
    l2 = h1 = 0.0
    for e in range(rod.n):
        local = values[e * p:e * p + p + 1]
        for q in range(len(xi)):
            phi, dphi = tables[q]
            x = rod.a + h * (e + (xi[q] + 1.0) / 2.0)
            uh = sum(map(mul, phi, local))
            duh = sum(map(mul, dphi, local)) * 2.0 / h
            l2 += w[q] * h / 2.0 * (exact(x, T) - uh) ** 2
            h1 += w[q] * h / 2.0 * (float(DATA.grad_u(x, 0.0, 0.0, T)) - duh) ** 2
    return {"L2": math.sqrt(l2), "H1semi": math.sqrt(h1)}


def write_legacy_vtk(path, rod, values):
    p = rod.p
    lines = ["# vtk DataFile Version 3.0", f"kiln rod temperature, P{p}", "ASCII", "DATASET UNSTRUCTURED_GRID",
             f"POINTS {rod.size} double"]
    lines += [f"{x!r} 0 0" for x in rod.x]
    lines.append(f"CELLS {rod.n} {(p + 2) * rod.n}")
    if p == 1:
        lines += [f"2 {e} {e + 1}" for e in range(rod.n)]
    else:  # VTK_QUADRATIC_EDGE lists the two ends, then the middle node
        lines += [f"3 {2 * e} {2 * e + 2} {2 * e + 1}" for e in range(rod.n)]
    lines.append(f"CELL_TYPES {rod.n}")
    lines += ["3" if p == 1 else "21"] * rod.n
    lines += [f"POINT_DATA {rod.size}", "SCALARS temperature double 1", "LOOKUP_TABLE default"]
    lines += [repr(v) for v in values]
    with open(path, "w") as f:
        f.write("\n".join(lines) + "\n")


def env_number(name, kind):
    """The value of RUNGS_<name> as int or float, or None when unset; a malformed value is reported."""
    text = os.environ.get(name)
    if text is None or text == "":
        return None
    try:
        return kind(text)
    except ValueError:
        fail(f"{name}={text!r} is not {'an integer' if kind is int else 'a number'}")


def main(argv):
    parser = argparse.ArgumentParser(description="P1/P2 finite elements and implicit time steppers for heat in a kiln rod")
    parser.add_argument("--n", type=int, default=None, help="cells (default RUNGS_N)")
    parser.add_argument("--steps", type=int, default=None, help="equal time steps (default RUNGS_STEPS)")
    parser.add_argument("--T", type=float, default=None, help="final time (default RUNGS_T)")
    parser.add_argument("--degree", type=int, default=None, help="1 (P1, default) or 2 (P2) (default RUNGS_DEGREE)")
    parser.add_argument("--method", choices=["be", "cn", "bdf2", "dirk3"], default=None, help="time stepper (required)")
    parser.add_argument("--flaw", choices=["old-time-source", "stage-time"], default=None,
                        help="deliberate flaw: old-time-source (with cn), stage-time (with dirk3)")
    parser.add_argument("--stage-boundary", choices=["integrated", "evaluated"], default="integrated",
                        help="DIRK stage boundary values: integrated from dg/dt (default) or g at the stage times")
    parser.add_argument("--a", type=float, default=None, help="left end when the data give no interval (default 0)")
    parser.add_argument("--b", type=float, default=None, help="right end when the data give no interval (default 1)")
    parser.add_argument("--data", default=os.environ.get("RUNGS_DATA"), help="folder holding rungs_data.py (default RUNGS_DATA)")
    parser.add_argument("--out", default=os.environ.get("RUNGS_OUT"), help="output folder (default RUNGS_OUT)")
    parser.add_argument("--write", choices=["vtk", "errors"], default="vtk")
    parser.add_argument("--write-series", action="store_true",
                        help="with --write vtk: write every time level k = 0 .. steps as solution-<k>.vtk (not solution.vtk)")
    parser.add_argument("--check-rule", action="store_true", help="only check the Gauss rules' exactness and exit")
    args = parser.parse_args(argv)
    if args.check_rule:
        worst = check_rule()
        print(f"largest deviation of the Gauss-Legendre rules (1..6 points) on monomials: {worst:.3e}")
        sys.exit(0 if worst < 1e-14 else 1)

    n = args.n if args.n is not None else env_number("RUNGS_N", int)
    steps = args.steps if args.steps is not None else env_number("RUNGS_STEPS", int)
    T = args.T if args.T is not None else env_number("RUNGS_T", float)
    degree = args.degree if args.degree is not None else env_number("RUNGS_DEGREE", int)
    degree = 1 if degree is None else degree
    if n is None or n < 1:
        parser.error(f"--n must be a positive number of cells (or set RUNGS_N), got {n}")
    if steps is None or steps < 1:
        parser.error(f"--steps must be a positive number of time steps (or set RUNGS_STEPS), got {steps}")
    if T is None or not (math.isfinite(T) and T > 0.0):
        parser.error(f"--T must be a positive final time (or set RUNGS_T), got {T}")
    if degree not in (1, 2):
        parser.error(f"--degree must be 1 (P1) or 2 (P2), got {degree}")
    if args.method is None:
        parser.error("--method is required: be, cn, bdf2 or dirk3")
    if args.flaw == "old-time-source" and args.method != "cn":
        parser.error(f"--flaw old-time-source belongs to --method cn, not {args.method}")
    if args.flaw == "stage-time" and args.method != "dirk3":
        parser.error(f"--flaw stage-time belongs to --method dirk3, not {args.method}")
    if not args.out:
        parser.error("--out is required (or set RUNGS_OUT)")
    if not args.data:
        parser.error("--data is required (or set RUNGS_DATA): the folder of the generated rungs_data.py")
    if args.write_series and args.write != "vtk":
        parser.error("--write-series writes VTK files, one per time level; use it with --write vtk")

    problem = load_data(args.data)
    check_problem(problem)
    if problem is not None and "domain" in problem:
        a, b = (float(v) for v in problem["domain"]["bounding_box"][0])
        for name, given, value in (("--a", args.a, a), ("--b", args.b, b)):
            if given is not None and given != value:
                parser.error(f"{name} {given} contradicts the data's interval [{a!r}, {b!r}] (problem.json); leave it out")
    else:
        a = 0.0 if args.a is None else args.a
        b = 1.0 if args.b is None else args.b
    if not b > a:
        parser.error(f"the interval [{a!r}, {b!r}] is empty; need a < b")

    rod = Rod(a, b, n, degree)
    k = conductivity_function()
    if k is not None:
        # The matrices are assembled once: k must not change in time (the heat preset's k is a formula in x).
        for x in rod.quad_x:
            k0, k1 = k(x, 0.0), k(x, T)
            if abs(k1 - k0) > 1e-13 * max(1.0, abs(k0)):
                fail(f"coef_k depends on t (k({x!r}, 0) = {k0!r}, k({x!r}, T) = {k1!r}); this code needs k = k(x)")
            if not k0 > 0.0:
                fail(f"coef_k must be positive; k({x!r}) = {k0!r}")
    os.makedirs(args.out, exist_ok=True)

    on_level = None
    if args.write_series:
        def on_level(j, level_values):
            write_legacy_vtk(os.path.join(args.out, f"solution-{j}.vtk"), rod, level_values)
    values = run(rod, k, T, steps, args.method, args.flaw, args.stage_boundary, on_level)
    if not all(math.isfinite(v) for v in values):
        sys.stderr.write("rod_heat.py: the solution is not finite\n")
        sys.exit(1)
    summary = {"dofs": rod.size, "h": rod.h, "cells": n,
               "info": {"steps": steps, "dt": T / steps, "T": T, "method": args.method, "flaw": args.flaw,
                        "degree": degree, "stage_boundary": args.stage_boundary if args.method == "dirk3" else None}}
    if args.write == "errors":
        summary["errors"] = errors_at(rod, values, T)
    elif not args.write_series:
        write_legacy_vtk(os.path.join(args.out, "solution.vtk"), rod, values)
    with open(os.path.join(args.out, "errors.json"), "w") as f:
        json.dump(summary, f, allow_nan=False, indent=2)
    print(f"rod n={n} P{degree} {args.method}{' flaw ' + args.flaw if args.flaw else ''} steps={steps} T={T!r}: "
          f"{rod.size} nodes")


if __name__ == "__main__":
    main(sys.argv[1:])

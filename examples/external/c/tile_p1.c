/*
 * tile_p1.c: heat in a rectangular ceramic tile, solved by a small P1 finite element code (C99, libc and libm only).
 *
 * Problem: -div(k grad u) = f on [x0,x1]x[y0,y1], u = exact_u on the Dirichlet edges, k grad u . n = flux_balance
 * on the others. exact_u, coef_k, source_balance and flux_balance come from "rungs_data.h", which rungs writes for a
 * study into its data folder; the build picks the header with -I. Convection b and reaction c are not discretized
 * here: a header that declares coef_b / coef_c is accepted, but they are ignored, so use this solver only for
 * studies without them.
 *
 * Mesh: round(n*width) x round(n*height) squares (at least one each way), each cut into two triangles by the
 * diagonal from its lower-left to its upper-right corner.
 * Quadrature: stiffness with a degree-2 rule (exact for k bilinear, as grad phi is constant per triangle), load with
 * a degree-5 rule, Neumann data with 3-point Gauss-Legendre per edge. --check-rules reports the highest degree each
 * rule integrates exactly.
 * Linear system: Dirichlet values set at the boundary nodes and eliminated from rows and columns (the matrix stays
 * symmetric positive definite); conjugate gradients with Jacobi preconditioning to relative residual 1e-12.
 * Output: OUT/solution.vtk, legacy ASCII VTK (UNSTRUCTURED_GRID of VTK_TRIANGLE = 5 cells, POINT_DATA "temperature").
 *
 * Usage: tile_p1 --n N --out DIR [--x X0 X1] [--y Y0 Y1] [--dirichlet TAG[,TAG...]]
 *        tile_p1 --check-rules
 * TAG is left, right, bottom or top; default: all four edges Dirichlet, unit square.
 */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "rungs_data.h"

#define PROG "tile_p1"
#define USAGE "usage: tile_p1 --n N --out DIR [--x X0 X1] [--y Y0 Y1] [--dirichlet left,right,bottom,top] | --check-rules"
#define CG_TOLERANCE 1e-12
/* Far beyond any ladder level; keeps node counts well inside int and memory within a few GB. */
#define MAX_NODES 20000000.0

enum { LEFT = 1, RIGHT = 2, BOTTOM = 4, TOP = 8 };
static const char *const EDGE_NAMES[4] = { "left", "right", "bottom", "top" };

/* Degree-2 rule on the triangle, barycentric points (2/3,1/6,1/6) and permutations, weights 1/3 each (of the area):
 * Strang & Fix 1973, Table 4.1 (from memory). */
static const double RULE2_BARY[3][3] = {
    { 2.0 / 3.0, 1.0 / 6.0, 1.0 / 6.0 }, { 1.0 / 6.0, 2.0 / 3.0, 1.0 / 6.0 }, { 1.0 / 6.0, 1.0 / 6.0, 2.0 / 3.0 } };
static const double RULE2_WEIGHT[3] = { 1.0 / 3.0, 1.0 / 3.0, 1.0 / 3.0 };

/* Degree-5 7-point rule (Radon 1948; Stroud 1971, formula T2:5-1, label from memory): centroid with weight 9/40,
 * (a,a,1-2a) for a = (6 -+ sqrt 15)/21 with weights (155 -+ sqrt 15)/1200. Filled by init_rules. */
static double RULE5_BARY[7][3];
static double RULE5_WEIGHT[7];

/* 3-point Gauss-Legendre on [-1,1]: nodes 0, +-sqrt(3/5), weights 8/9, 5/9 (Abramowitz & Stegun 1964, Table 25.4). */
static double GAUSS3_NODE[3];
static const double GAUSS3_WEIGHT[3] = { 5.0 / 9.0, 8.0 / 9.0, 5.0 / 9.0 };

static void init_rules(void)
{
    const double s15 = sqrt(15.0);
    const double a[2] = { (6.0 - s15) / 21.0, (6.0 + s15) / 21.0 };
    const double w[2] = { (155.0 - s15) / 1200.0, (155.0 + s15) / 1200.0 };
    int q = 1, g, p;
    RULE5_BARY[0][0] = RULE5_BARY[0][1] = RULE5_BARY[0][2] = 1.0 / 3.0;
    RULE5_WEIGHT[0] = 9.0 / 40.0;
    for (g = 0; g < 2; g++) {
        for (p = 0; p < 3; p++, q++) {
            RULE5_BARY[q][0] = RULE5_BARY[q][1] = RULE5_BARY[q][2] = a[g];
            RULE5_BARY[q][p] = 1.0 - 2.0 * a[g];
            RULE5_WEIGHT[q] = w[g];
        }
    }
    GAUSS3_NODE[0] = -sqrt(0.6);
    GAUSS3_NODE[1] = 0.0;
    GAUSS3_NODE[2] = sqrt(0.6);
}

static void fail(int status, const char *message, const char *detail)
{
    fprintf(stderr, PROG ": %s%s\n", message, detail ? detail : "");
    exit(status);
}

static void usage_error(const char *message, const char *detail)
{
    fprintf(stderr, PROG ": %s%s; " USAGE "\n", message, detail ? detail : "");
    exit(2);
}

static double factorial(int m)
{
    double f = 1.0;
    while (m > 1) f *= m--;
    return f;
}

/* Highest degree d such that the triangle rule integrates every x^a y^b with a + b <= d on the reference triangle
 * (0,0),(1,0),(0,1) to 1e-14, against the exact a! b! / (a+b+2)! (a Dirichlet integral; common practice, no source). */
static int triangle_rule_degree(const double (*bary)[3], const double *weight, int npoints)
{
    int d, a, q;
    for (d = 0; d <= 12; d++) {
        for (a = 0; a <= d; a++) {
            int b = d - a;
            double sum = 0.0;
            for (q = 0; q < npoints; q++) sum += 0.5 * weight[q] * pow(bary[q][1], a) * pow(bary[q][2], b);
            if (fabs(sum - factorial(a) * factorial(b) / factorial(a + b + 2)) > 1e-14) return d - 1;
        }
    }
    return 12;
}

/* Same for the edge rule: x^m on [-1,1] integrates to 2/(m+1) for even m, 0 for odd m. */
static int gauss_rule_degree(void)
{
    int m, q;
    for (m = 0; m <= 12; m++) {
        double sum = 0.0;
        for (q = 0; q < 3; q++) sum += GAUSS3_WEIGHT[q] * pow(GAUSS3_NODE[q], m);
        if (fabs(sum - (m % 2 ? 0.0 : 2.0 / (m + 1))) > 1e-14) return m - 1;
    }
    return 12;
}

static int check_rules(void)
{
    int d2 = triangle_rule_degree(RULE2_BARY, RULE2_WEIGHT, 3);
    int d5 = triangle_rule_degree((const double (*)[3])RULE5_BARY, RULE5_WEIGHT, 7);
    int dg = gauss_rule_degree();
    printf("stiffness_rule_degree %d\nload_rule_degree %d\nedge_rule_degree %d\n", d2, d5, dg);
    return d2 >= 2 && d5 >= 4 && dg >= 5 ? 0 : 1;
}

static double parse_number(const char *text, const char *what)
{
    char *end;
    double v;
    errno = 0;
    v = strtod(text, &end);
    if (end == text || *end != '\0' || errno == ERANGE || !isfinite(v)) usage_error(what, text);
    return v;
}

static int parse_tags(const char *text)
{
    int mask = 0;
    const char *p = text;
    while (*p) {
        size_t len = strcspn(p, ",");
        int e, found = 0;
        for (e = 0; e < 4; e++) {
            if (len == strlen(EDGE_NAMES[e]) && strncmp(p, EDGE_NAMES[e], len) == 0) {
                mask |= 1 << e;
                found = 1;
            }
        }
        if (!found) usage_error("unknown edge in --dirichlet (valid: left, right, bottom, top): ", text);
        p += len;
        if (*p == ',') p++;
    }
    if (!mask) usage_error("--dirichlet needs at least one edge (without reaction, pure Neumann is singular): ", text);
    return mask;
}

/* Grid points from lo to hi with both ends exact, as rungs's rectangle builds them (src/mesh/grid.ts). */
static void grid_points(double lo, double hi, int n, double *out)
{
    double step = (hi - lo) / n;
    int i;
    for (i = 0; i < n; i++) out[i] = lo + i * step;
    out[n] = hi;
}

/* CSR of the P1 matrix on the structured grid: node (i,j) couples with itself, its four axis neighbours and the two
 * diagonal neighbours (i-1,j-1), (i+1,j+1) along the cut; columns ascending. */
typedef struct {
    int n;
    int *start, *col;
    double *val;
} Csr;

static void *xcalloc(size_t count, size_t size)
{
    void *p = calloc(count, size);
    if (!p) fail(3, "out of memory", NULL);
    return p;
}

static void csr_build(Csr *A, int nx, int ny)
{
    static const int DI[7] = { -1, 0, -1, 0, 1, 0, 1 };
    static const int DJ[7] = { -1, -1, 0, 0, 0, 1, 1 };
    int i, j, s, nnz = 0;
    A->n = (nx + 1) * (ny + 1);
    A->start = xcalloc((size_t)A->n + 1, sizeof(int));
    A->col = xcalloc((size_t)A->n * 7, sizeof(int));
    for (j = 0; j <= ny; j++) {
        for (i = 0; i <= nx; i++) {
            A->start[j * (nx + 1) + i] = nnz;
            for (s = 0; s < 7; s++) {
                int ii = i + DI[s], jj = j + DJ[s];
                if (ii >= 0 && ii <= nx && jj >= 0 && jj <= ny) A->col[nnz++] = jj * (nx + 1) + ii;
            }
        }
    }
    A->start[A->n] = nnz;
    A->val = xcalloc((size_t)nnz, sizeof(double));
}

static double *csr_entry(const Csr *A, int row, int column)
{
    int p;
    for (p = A->start[row]; p < A->start[row + 1]; p++)
        if (A->col[p] == column) return &A->val[p];
    fail(4, "internal error: matrix entry outside the sparsity pattern", NULL);
    return NULL;
}

static void csr_multiply(const Csr *A, const double *x, double *y)
{
    int r, p;
    for (r = 0; r < A->n; r++) {
        double s = 0.0;
        for (p = A->start[r]; p < A->start[r + 1]; p++) s += A->val[p] * x[A->col[p]];
        y[r] = s;
    }
}

static double dot(int n, const double *a, const double *b)
{
    double s = 0.0;
    int i;
    for (i = 0; i < n; i++) s += a[i] * b[i];
    return s;
}

/* Jacobi-preconditioned conjugate gradients (Hestenes & Stiefel 1952; preconditioned form as in Saad 2003,
 * Algorithm 9.1, from memory). Stops at ||b - A x|| <= tol ||b|| (recursive residual). Returns the iterations, or -1. */
static int pcg(const Csr *A, const double *b, double *x, double tol, int max_iterations, double *relative)
{
    int n = A->n, i, it;
    double *r = xcalloc((size_t)n, sizeof(double)), *z = xcalloc((size_t)n, sizeof(double));
    double *p = xcalloc((size_t)n, sizeof(double)), *q = xcalloc((size_t)n, sizeof(double));
    double *inv_diag = xcalloc((size_t)n, sizeof(double));
    double bnorm = sqrt(dot(n, b, b)), rz, rnorm;
    for (i = 0; i < n; i++) inv_diag[i] = 1.0 / *csr_entry(A, i, i);
    csr_multiply(A, x, q);
    for (i = 0; i < n; i++) r[i] = b[i] - q[i];
    rnorm = sqrt(dot(n, r, r));
    it = 0;
    if (bnorm == 0.0) bnorm = 1.0;
    if (rnorm > tol * bnorm) {
        for (i = 0; i < n; i++) p[i] = z[i] = inv_diag[i] * r[i];
        rz = dot(n, r, z);
        for (it = 1; it <= max_iterations; it++) {
            double alpha, beta, rz_next;
            csr_multiply(A, p, q);
            alpha = rz / dot(n, p, q);
            for (i = 0; i < n; i++) {
                x[i] += alpha * p[i];
                r[i] -= alpha * q[i];
            }
            rnorm = sqrt(dot(n, r, r));
            if (rnorm <= tol * bnorm) break;
            for (i = 0; i < n; i++) z[i] = inv_diag[i] * r[i];
            rz_next = dot(n, r, z);
            beta = rz_next / rz;
            rz = rz_next;
            for (i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
        }
    }
    /* Report the true residual, not the recursive one CG updated. */
    csr_multiply(A, x, q);
    for (i = 0; i < n; i++) r[i] = b[i] - q[i];
    *relative = sqrt(dot(n, r, r)) / bnorm;
    free(r); free(z); free(p); free(q); free(inv_diag);
    return it > max_iterations ? -1 : it;
}

int main(int argc, char **argv)
{
    double n_value = 0.0, x0 = 0.0, x1 = 1.0, y0 = 0.0, y1 = 1.0, relative;
    const char *out = NULL;
    int dirichlet = LEFT | RIGHT | BOTTOM | TOP, have_n = 0;
    int nx, ny, nodes, cells, i, j, t, q, e, iterations;
    double *xs, *ys, *b, *u;
    unsigned char *fixed;
    Csr A;
    char *path, *part;
    FILE *f;
    int a;

    init_rules();
    if (argc == 2 && strcmp(argv[1], "--check-rules") == 0) return check_rules();
    for (a = 1; a < argc; a++) {
        const char *opt = argv[a];
        int need = strcmp(opt, "--x") == 0 || strcmp(opt, "--y") == 0 ? 2 : 1;
        if (strcmp(opt, "--n") && strcmp(opt, "--out") && strcmp(opt, "--x") && strcmp(opt, "--y") && strcmp(opt, "--dirichlet"))
            usage_error("unknown argument ", opt);
        if (a + need >= argc) usage_error(opt, need == 2 ? " needs two numbers" : " needs a value");
        if (strcmp(opt, "--n") == 0) {
            n_value = parse_number(argv[++a], "--n must be a positive integer, found ");
            if (n_value < 1 || n_value != floor(n_value)) usage_error("--n must be a positive integer, found ", argv[a]);
            have_n = 1;
        } else if (strcmp(opt, "--out") == 0) {
            out = argv[++a];
            if (!*out) usage_error("--out needs a folder", NULL);
        } else if (strcmp(opt, "--dirichlet") == 0) {
            dirichlet = parse_tags(argv[++a]);
        } else {
            double lo = parse_number(argv[a + 1], "bounds must be finite numbers, found ");
            double hi = parse_number(argv[a + 2], "bounds must be finite numbers, found ");
            if (!(lo < hi)) usage_error(opt, " needs its lower bound below its upper bound");
            if (opt[2] == 'x') { x0 = lo; x1 = hi; } else { y0 = lo; y1 = hi; }
            a += 2;
        }
    }
    if (!have_n) usage_error("--n is required", NULL);
    if (!out) usage_error("--out is required", NULL);

    /* Squares per direction as rungs's rectangle(): max(1, round(n * width)). */
    {
        double cx = round(n_value * (x1 - x0)), cy = round(n_value * (y1 - y0));
        if (cx < 1) cx = 1;
        if (cy < 1) cy = 1;
        if ((cx + 1) * (cy + 1) > MAX_NODES) usage_error("the mesh would exceed 2e7 nodes; lower --n", NULL);
        nx = (int)cx;
        ny = (int)cy;
    }
    nodes = (nx + 1) * (ny + 1);
    cells = 2 * nx * ny;

    xs = xcalloc((size_t)nx + 1, sizeof(double));
    ys = xcalloc((size_t)ny + 1, sizeof(double));
    grid_points(x0, x1, nx, xs);
    grid_points(y0, y1, ny, ys);
    csr_build(&A, nx, ny);
    b = xcalloc((size_t)nodes, sizeof(double));
    u = xcalloc((size_t)nodes, sizeof(double));
    fixed = xcalloc((size_t)nodes, 1);

    /* Element matrices and loads, two counter-clockwise triangles per square. */
    for (j = 0; j < ny; j++) {
        for (i = 0; i < nx; i++) {
            int v00 = j * (nx + 1) + i, v10 = v00 + 1, v01 = v00 + nx + 1, v11 = v01 + 1;
            int tri[2][3] = { { v00, v10, v11 }, { v00, v11, v01 } };
            for (t = 0; t < 2; t++) {
                const int *v = tri[t];
                double px[3], py[3], gx[3], gy[3], det, area, kint = 0.0;
                int r, c;
                for (r = 0; r < 3; r++) {
                    px[r] = xs[v[r] % (nx + 1)];
                    py[r] = ys[v[r] / (nx + 1)];
                }
                det = (px[1] - px[0]) * (py[2] - py[0]) - (px[2] - px[0]) * (py[1] - py[0]);
                area = 0.5 * det;
                /* Gradients of the barycentric coordinates (constant on the triangle). */
                gx[0] = (py[1] - py[2]) / det; gy[0] = (px[2] - px[1]) / det;
                gx[1] = (py[2] - py[0]) / det; gy[1] = (px[0] - px[2]) / det;
                gx[2] = (py[0] - py[1]) / det; gy[2] = (px[1] - px[0]) / det;
                for (q = 0; q < 3; q++) {
                    const double *l = RULE2_BARY[q];
                    kint += RULE2_WEIGHT[q] * coef_k(l[0] * px[0] + l[1] * px[1] + l[2] * px[2],
                                                     l[0] * py[0] + l[1] * py[1] + l[2] * py[2], 0.0, 0.0);
                }
                kint *= area;
                for (r = 0; r < 3; r++)
                    for (c = 0; c < 3; c++) *csr_entry(&A, v[r], v[c]) += kint * (gx[r] * gx[c] + gy[r] * gy[c]);
                for (q = 0; q < 7; q++) {
                    const double *l = RULE5_BARY[q];
                    double fq = source_balance(l[0] * px[0] + l[1] * px[1] + l[2] * px[2],
                                               l[0] * py[0] + l[1] * py[1] + l[2] * py[2], 0.0, 0.0);
                    for (r = 0; r < 3; r++) b[v[r]] += area * RULE5_WEIGHT[q] * fq * l[r];
                }
            }
        }
    }

    /* Boundary edges: Dirichlet nodes marked, Neumann flux k grad u . n integrated against the two hat functions. */
    for (e = 0; e < 4; e++) {
        int side = 1 << e, count = e < 2 ? ny : nx, s;
        double nxo = e == 0 ? -1.0 : e == 1 ? 1.0 : 0.0, nyo = e == 2 ? -1.0 : e == 3 ? 1.0 : 0.0;
        for (s = 0; s <= count; s++) {
            int node = e == 0 ? s * (nx + 1) : e == 1 ? s * (nx + 1) + nx : e == 2 ? s : ny * (nx + 1) + s;
            if (dirichlet & side) fixed[node] = 1;
        }
        if (dirichlet & side) continue;
        for (s = 0; s < count; s++) {
            int na = e == 0 ? s * (nx + 1) : e == 1 ? s * (nx + 1) + nx : e == 2 ? s : ny * (nx + 1) + s;
            int nb = e < 2 ? na + nx + 1 : na + 1;
            double ax = xs[na % (nx + 1)], ay = ys[na / (nx + 1)], bx = xs[nb % (nx + 1)], by = ys[nb / (nx + 1)];
            double half = 0.5 * hypot(bx - ax, by - ay);
            for (q = 0; q < 3; q++) {
                double sq = 0.5 * (1.0 + GAUSS3_NODE[q]);
                double g = flux_balance(ax + sq * (bx - ax), ay + sq * (by - ay), 0.0, 0.0, nxo, nyo, 0.0);
                b[na] += half * GAUSS3_WEIGHT[q] * g * (1.0 - sq);
                b[nb] += half * GAUSS3_WEIGHT[q] * g * sq;
            }
        }
    }

    /* Dirichlet elimination: known values moved to the right-hand side, rows and columns replaced by the identity. */
    for (i = 0; i < nodes; i++)
        if (fixed[i]) u[i] = exact_u(xs[i % (nx + 1)], ys[i / (nx + 1)], 0.0, 0.0);
    for (i = 0; i < nodes; i++) {
        int p;
        for (p = A.start[i]; p < A.start[i + 1]; p++) {
            int c = A.col[p];
            if (fixed[i]) {
                A.val[p] = c == i ? 1.0 : 0.0;
            } else if (fixed[c]) {
                b[i] -= A.val[p] * u[c];
                A.val[p] = 0.0;
            }
        }
        if (fixed[i]) b[i] = u[i];
    }

    iterations = pcg(&A, b, u, CG_TOLERANCE, 10 * nodes + 1000, &relative);
    if (iterations < 0) {
        char detail[96];
        sprintf(detail, " (true relative residual %.3e)", relative);
        fail(3, "conjugate gradients did not reach relative residual 1e-12", detail);
    }
    for (i = 0; i < nodes; i++)
        if (!isfinite(u[i])) fail(3, "the solution holds NaN or infinite values (check the header's functions)", NULL);

    /* Written under a temporary name and renamed, so an interrupted run leaves no truncated solution.vtk. */
    path = xcalloc(strlen(out) + 32, 1);
    part = xcalloc(strlen(out) + 32, 1);
    sprintf(path, "%s/solution.vtk", out);
    sprintf(part, "%s/solution.vtk.part", out);
    f = fopen(part, "w");
    if (!f) {
        fprintf(stderr, PROG ": cannot write %s (%s); does the output folder exist?\n", part, strerror(errno));
        return 1;
    }
    fprintf(f, "# vtk DataFile Version 3.0\ntile_p1 temperature, n=%.17g, %dx%d squares\nASCII\nDATASET UNSTRUCTURED_GRID\n",
            n_value, nx, ny);
    fprintf(f, "POINTS %d double\n", nodes);
    for (i = 0; i < nodes; i++) fprintf(f, "%.17g %.17g 0\n", xs[i % (nx + 1)], ys[i / (nx + 1)]);
    fprintf(f, "CELLS %d %d\n", cells, 4 * cells);
    for (j = 0; j < ny; j++) {
        for (i = 0; i < nx; i++) {
            int v00 = j * (nx + 1) + i, v10 = v00 + 1, v01 = v00 + nx + 1, v11 = v01 + 1;
            fprintf(f, "3 %d %d %d\n3 %d %d %d\n", v00, v10, v11, v00, v11, v01);
        }
    }
    fprintf(f, "CELL_TYPES %d\n", cells);
    for (i = 0; i < cells; i++) fputs("5\n", f);
    fprintf(f, "POINT_DATA %d\nSCALARS temperature double 1\nLOOKUP_TABLE default\n", nodes);
    for (i = 0; i < nodes; i++) fprintf(f, "%.17g\n", u[i]);
    if (ferror(f) | fclose(f)) {
        fprintf(stderr, PROG ": writing %s failed (%s)\n", part, strerror(errno));
        return 1;
    }
    if (rename(part, path) != 0) {
        fprintf(stderr, PROG ": cannot rename %s to %s (%s)\n", part, path, strerror(errno));
        return 1;
    }
    printf(PROG ": n=%.17g squares=%dx%d nodes=%d triangles=%d cg_iterations=%d relative_residual=%.3e\n",
           n_value, nx, ny, nodes, cells, iterations, relative);
    free(xs); free(ys); free(b); free(u); free(fixed); free(A.start); free(A.col); free(A.val); free(path); free(part);
    return 0;
}

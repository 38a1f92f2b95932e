/* solver: the one module that touches GLPK. Solves a MIP built by a model
 * module, with a time limit, a relative gap, an optional starting incumbent
 * from a heuristic, and a GLPK error hook so a GLPK failure returns an error
 * instead of ending the process. Reports status, objective, best bound, gap,
 * nodes and time. GLPK output is silenced. */
#ifndef SOLVER_H
#define SOLVER_H

#include <stddef.h>

#include "err.h"

enum solver_status {
    SOLVER_OPTIMAL = 0,     /* proved optimal within the requested gap */
    SOLVER_FEASIBLE,        /* stopped (time limit) with a plan and a gap */
    SOLVER_NO_PLAN,         /* stopped (time limit) before any plan was found */
    SOLVER_INFEASIBLE,      /* no plan exists (models avoid this with slack variables) */
    SOLVER_UNBOUNDED
};

typedef struct solver_opts {
    double time_limit_s;    /* wall-clock limit; <= 0 means none */
    double rel_gap;         /* stop when (incumbent - bound)/|incumbent| <= rel_gap; 0 = exact */
    int presolve;           /* 1 = run GLPK's LP presolver (default) */
    int cuts;               /* 1 = GLPK's Gomory/MIR/cover/clique cuts */
    int lp_dual;            /* 1 = root LP by the dual simplex (fast when the all-slack
                             * basis is dual feasible, as in covering/median models) */
} solver_opts_t;

typedef struct solver_result {
    int status;             /* SOLVER_* */
    double objective;       /* incumbent objective (NAN when no plan) */
    double bound;           /* best bound proved (minimisation: lower bound) */
    double gap;             /* relative gap |objective - bound| / max(|objective|, 1e-9) */
    long nodes;             /* branch-and-bound nodes explored */
    double seconds;         /* wall-clock time in the solver */
    double *x;              /* values of columns 1..n_cols (index 0 unused); owned */
    size_t n_cols;
} solver_result_t;

/* An opaque MIP under construction; the columns and rows use 1-based indices
 * as GLPK does. */
typedef struct solver_mip solver_mip_t;

enum { SOLVER_MIN = 0, SOLVER_MAX = 1 };
enum { SOLVER_CONTINUOUS = 0, SOLVER_INTEGER = 1, SOLVER_BINARY = 2 };

void solver_opts_default(solver_opts_t *o);  /* no limit, gap 0, presolve on, cuts off, primal */

/* Create an empty MIP named 'name' (for messages). Caller frees with solver_mip_free. */
int solver_mip_new(const char *name, int sense, solver_mip_t **out, err_t *e);
void solver_mip_free(solver_mip_t *m);       /* NULL-safe */

/* Add 'n' columns of one kind with bounds [lo, hi] (hi = INFINITY for none) and
 * objective coefficients obj[0..n-1] (NULL = all zero). Returns the index of the
 * first new column (1-based) in *first. */
int solver_add_cols(solver_mip_t *m, size_t n, int kind, double lo, double hi,
                    const double *obj, int *first, err_t *e);
/* Add one row lo <= sum(val[k] * x[idx[k]]) <= hi (use -INFINITY/INFINITY for
 * one-sided rows); idx are 1-based column indices. Returns the row index in *row. */
int solver_add_row(solver_mip_t *m, size_t nnz, const int *idx, const double *val,
                   double lo, double hi, int *row, err_t *e);
/* Change one column's bounds (fix a variable: lo == hi). */
int solver_set_col_bounds(solver_mip_t *m, int col, double lo, double hi, err_t *e);

/* Solve. 'start' (may be NULL) holds a feasible value for every column 1..n
 * (index 0 unused); it is offered to GLPK as the first incumbent. On success
 * 'res' is filled (caller frees with solver_result_destroy). Returns ERR_SOLVER
 * when GLPK fails; a time limit is not an error (status says so). */
int solver_solve(solver_mip_t *m, const solver_opts_t *o, const double *start,
                 solver_result_t *res, err_t *e);
void solver_result_destroy(solver_result_t *r);  /* NULL-safe */

/* "optimal", "feasible (gap)", "no plan (time limit)", "infeasible", "unbounded". */
const char *solver_status_name(int status);

#endif

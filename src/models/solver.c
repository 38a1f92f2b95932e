/* solver: the one module that touches GLPK (see include/solver.h).
 * GLPK ends the process on an internal error unless an error hook leaves by
 * longjmp first; we do that, free GLPK's environment, and hand back ERR_SOLVER.
 * A heuristic plan is offered through the branch-and-cut callback; GLPK only
 * sees it in the original column space when the MIP presolver is off, so a
 * start disables that presolver and solves the root LP with glp_simplex first. */
#include "solver.h"

#include <glpk.h>
#include <math.h>
#include <stdio.h>
#include <setjmp.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

struct solver_mip {
    glp_prob *P;
    char name[64];
    int n_cols;
};

/* State shared with the GLPK callback during one solve. */
typedef struct solve_ctx {
    const double *start;   /* heuristic plan to offer once, or NULL */
    int offered;
    double bound;          /* best bound seen so far */
    long nodes;
} solve_ctx_t;

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* GLPK prints even with glp_term_out off when it fails; swallow all of it. */
static int swallow_output(void *info, const char *s)
{
    (void)info;
    (void)s;
    return 1;
}

static void on_glpk_error(void *info)
{
    longjmp(*(jmp_buf *)info, 1);
}

void solver_opts_default(solver_opts_t *o)
{
    o->time_limit_s = 0;
    o->rel_gap = 0;
    o->presolve = 1;
    o->cuts = 0;
    o->lp_dual = 0;
}

int solver_mip_new(const char *name, int sense, solver_mip_t **out, err_t *e)
{
    solver_mip_t *m = calloc(1, sizeof *m);

    *out = NULL;
    if (m == NULL) return err_set(e, ERR_NOMEM, "out of memory creating model '%s'", name);
    glp_term_hook(swallow_output, NULL);
    m->P = glp_create_prob();
    snprintf(m->name, sizeof m->name, "%s", name);
    glp_set_prob_name(m->P, m->name);
    glp_set_obj_dir(m->P, sense == SOLVER_MAX ? GLP_MAX : GLP_MIN);
    *out = m;
    return ERR_OK;
}

void solver_mip_free(solver_mip_t *m)
{
    if (m == NULL) return;
    if (m->P != NULL) glp_delete_prob(m->P);
    free(m);
}

static int bound_type(double lo, double hi)
{
    if (isinf(lo) && isinf(hi)) return GLP_FR;
    if (isinf(hi)) return GLP_LO;
    if (isinf(lo)) return GLP_UP;
    if (lo == hi) return GLP_FX;
    return GLP_DB;
}

static int check_bounds(const solver_mip_t *m, double lo, double hi, const char *what,
                        err_t *e)
{
    if (isnan(lo) || isnan(hi) || lo > hi || (isinf(lo) && lo > 0) || (isinf(hi) && hi < 0))
        return err_set(e, ERR_INTERNAL, "model '%s': bad %s bounds [%g, %g]", m->name, what, lo,
                       hi);
    return ERR_OK;
}

int solver_add_cols(solver_mip_t *m, size_t n, int kind, double lo, double hi,
                    const double *obj, int *first, err_t *e)
{
    int j0;

    if (m->P == NULL) return err_set(e, ERR_SOLVER, "model '%s' was lost after a GLPK failure", m->name);
    if (n == 0) {
        *first = m->n_cols + 1;
        return ERR_OK;
    }
    if (kind == SOLVER_BINARY) {
        lo = 0;
        hi = 1;
    }
    if (check_bounds(m, lo, hi, "column", e) != ERR_OK) return e->code;
    j0 = glp_add_cols(m->P, (int)n);
    for (size_t k = 0; k < n; k++) {
        int j = j0 + (int)k;
        if (obj != NULL) {
            if (!isfinite(obj[k]))
                return err_set(e, ERR_INPUT, "model '%s': cost of column %d is not a finite number",
                               m->name, j);
            glp_set_obj_coef(m->P, j, obj[k]);
        }
        glp_set_col_kind(m->P, j, kind == SOLVER_BINARY ? GLP_BV
                                  : kind == SOLVER_INTEGER ? GLP_IV : GLP_CV);
        if (kind != SOLVER_BINARY) glp_set_col_bnds(m->P, j, bound_type(lo, hi), lo, hi);
    }
    m->n_cols += (int)n;
    *first = j0;
    return ERR_OK;
}

int solver_add_row(solver_mip_t *m, size_t nnz, const int *idx, const double *val,
                   double lo, double hi, int *row, err_t *e)
{
    int i, rc = ERR_OK;
    int *ind = NULL;
    double *v = NULL;

    if (m->P == NULL) return err_set(e, ERR_SOLVER, "model '%s' was lost after a GLPK failure", m->name);
    if (check_bounds(m, lo, hi, "row", e) != ERR_OK) return e->code;
    /* GLPK wants 1-based arrays with element 0 unused. */
    ind = malloc((nnz + 1) * sizeof *ind);
    v = malloc((nnz + 1) * sizeof *v);
    if (ind == NULL || v == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory adding a row to model '%s'", m->name);
        goto done;
    }
    for (size_t k = 0; k < nnz; k++) {
        if (idx[k] < 1 || idx[k] > m->n_cols || !isfinite(val[k])) {
            rc = err_set(e, ERR_INTERNAL, "model '%s': bad row entry (column %d, value %g)",
                         m->name, idx[k], val[k]);
            goto done;
        }
        ind[k + 1] = idx[k];
        v[k + 1] = val[k];
    }
    i = glp_add_rows(m->P, 1);
    glp_set_row_bnds(m->P, i, bound_type(lo, hi), lo, hi);
    if (nnz > 0) {
        /* GLPK rejects a repeated column in a row by ending the process. */
        jmp_buf env;
        if (setjmp(env) != 0) {
            glp_error_hook(NULL, NULL);
            m->P = NULL;
            glp_free_env();
            rc = err_set(e, ERR_SOLVER, "GLPK refused a row of model '%s' (repeated column?)",
                         m->name);
            goto done;
        }
        glp_error_hook(on_glpk_error, &env);
        glp_set_mat_row(m->P, i, (int)nnz, ind, v);
        glp_error_hook(NULL, NULL);
    }
    if (row != NULL) *row = i;
done:
    free(ind);
    free(v);
    return rc;
}

int solver_set_col_bounds(solver_mip_t *m, int col, double lo, double hi, err_t *e)
{
    if (m->P == NULL) return err_set(e, ERR_SOLVER, "model '%s' was lost after a GLPK failure", m->name);
    if (col < 1 || col > m->n_cols)
        return err_set(e, ERR_INTERNAL, "model '%s': no column %d", m->name, col);
    if (check_bounds(m, lo, hi, "column", e) != ERR_OK) return e->code;
    glp_set_col_bnds(m->P, col, bound_type(lo, hi), lo, hi);
    return ERR_OK;
}

/* Branch-and-cut callback: offer the start once, track the bound and nodes. */
static void on_tree(glp_tree *T, void *info)
{
    solve_ctx_t *c = info;
    int reason = glp_ios_reason(T);
    int best, a_cnt, n_cnt, t_cnt;

    if (reason == GLP_IHEUR && c->start != NULL && !c->offered) {
        c->offered = 1;
        glp_ios_heur_sol(T, c->start);
    }
    best = glp_ios_best_node(T);
    if (best != 0) c->bound = glp_ios_node_bound(T, best);
    glp_ios_tree_size(T, &a_cnt, &n_cnt, &t_cnt);
    c->nodes = t_cnt;
}

int solver_solve(solver_mip_t *m, const solver_opts_t *o, const double *start,
                 solver_result_t *res, err_t *e)
{
    jmp_buf env;
    glp_iocp ip;
    glp_smcp sp;
    solve_ctx_t ctx = {start, 0, NAN, 0};
    volatile double t0 = now_s();
    int ret = 0, mst, sense;

    memset(res, 0, sizeof *res);
    res->objective = NAN;
    res->bound = NAN;
    if (m->P == NULL) return err_set(e, ERR_SOLVER, "model '%s' was lost after a GLPK failure", m->name);

    glp_init_iocp(&ip);
    ip.msg_lev = GLP_MSG_OFF;
    ip.presolve = (o->presolve && start == NULL) ? GLP_ON : GLP_OFF;
    ip.mip_gap = o->rel_gap > 0 ? o->rel_gap : 0.0;
    if (o->time_limit_s > 0) ip.tm_lim = (int)fmin(o->time_limit_s * 1000.0, 2e9);
    if (o->cuts) {
        ip.gmi_cuts = GLP_ON;
        ip.mir_cuts = GLP_ON;
        ip.cov_cuts = GLP_ON;
        ip.clq_cuts = GLP_ON;
    }
    ip.cb_func = on_tree;
    ip.cb_info = &ctx;

    if (setjmp(env) != 0) {
        /* GLPK failed inside; its memory is unusable now: drop it all. */
        glp_error_hook(NULL, NULL);
        m->P = NULL;
        glp_free_env();
        return err_set(e, ERR_SOLVER, "GLPK failed while solving model '%s'; no plan was produced",
                       m->name);
    }
    glp_error_hook(on_glpk_error, &env);

    if (ip.presolve == GLP_OFF) {
        glp_init_smcp(&sp);
        sp.msg_lev = GLP_MSG_OFF;
        sp.presolve = GLP_ON;
        if (o->lp_dual) sp.meth = GLP_DUALP;
        if (o->time_limit_s > 0) sp.tm_lim = ip.tm_lim;
        ret = glp_simplex(m->P, &sp);
        if (ret == 0 && glp_get_status(m->P) != GLP_OPT) {
            int st = glp_get_status(m->P);
            glp_error_hook(NULL, NULL);
            res->status = st == GLP_UNBND ? SOLVER_UNBOUNDED : SOLVER_INFEASIBLE;
            res->seconds = now_s() - t0;
            return ERR_OK;
        }
        /* The presolving simplex leaves no basis when it proves infeasibility. */
        if (ret == GLP_ENOPFS || ret == GLP_ENODFS) {
            glp_error_hook(NULL, NULL);
            res->status = ret == GLP_ENOPFS ? SOLVER_INFEASIBLE : SOLVER_UNBOUNDED;
            res->seconds = now_s() - t0;
            return ERR_OK;
        }
        if (ret == GLP_ETMLIM) {
            glp_error_hook(NULL, NULL);
            res->status = SOLVER_NO_PLAN;
            res->seconds = now_s() - t0;
            return ERR_OK;
        }
        if (ret != 0) {
            glp_error_hook(NULL, NULL);
            return err_set(e, ERR_SOLVER, "GLPK could not solve the LP relaxation of model '%s' (code %d)",
                           m->name, ret);
        }
        if (o->time_limit_s > 0) {
            double left = o->time_limit_s - (now_s() - t0);
            ip.tm_lim = (int)fmax(1.0, fmin(left * 1000.0, 2e9));
        }
    }
    ret = glp_intopt(m->P, &ip);
    glp_error_hook(NULL, NULL);
    res->seconds = now_s() - t0;
    res->nodes = ctx.nodes;

    if (ret == GLP_ENOPFS) {
        res->status = SOLVER_INFEASIBLE;
        return ERR_OK;
    }
    if (ret == GLP_ENODFS) {
        res->status = SOLVER_UNBOUNDED;
        return ERR_OK;
    }
    if (ret != 0 && ret != GLP_ETMLIM && ret != GLP_EMIPGAP && ret != GLP_ESTOP)
        return err_set(e, ERR_SOLVER, "GLPK failed on model '%s' (glp_intopt code %d)", m->name,
                       ret);

    mst = glp_mip_status(m->P);
    sense = glp_get_obj_dir(m->P);
    if (mst == GLP_NOFEAS) {
        res->status = SOLVER_INFEASIBLE;
        return ERR_OK;
    }
    if (mst != GLP_OPT && mst != GLP_FEAS) {
        res->status = SOLVER_NO_PLAN;
        res->bound = ctx.bound;
        return ERR_OK;
    }
    res->objective = glp_mip_obj_val(m->P);
    if (mst == GLP_OPT && ret == 0) {
        res->status = SOLVER_OPTIMAL;
        res->bound = res->objective;
    } else {
        res->status = SOLVER_FEASIBLE;
        res->bound = isnan(ctx.bound) ? (sense == GLP_MIN ? -INFINITY : INFINITY) : ctx.bound;
        /* With a gap stop the bound is still the tree's best node. */
        if (ret == GLP_EMIPGAP) res->status = SOLVER_OPTIMAL;
    }
    res->gap = fabs(res->objective - res->bound) / fmax(fabs(res->objective), 1e-9);
    if (!isfinite(res->gap)) res->gap = INFINITY;

    res->n_cols = (size_t)m->n_cols;
    res->x = calloc(res->n_cols + 1, sizeof *res->x);
    if (res->x == NULL) return err_set(e, ERR_NOMEM, "out of memory reading the plan of model '%s'", m->name);
    for (int j = 1; j <= m->n_cols; j++) res->x[j] = glp_mip_col_val(m->P, j);
    return ERR_OK;
}

void solver_result_destroy(solver_result_t *r)
{
    if (r == NULL) return;
    free(r->x);
    r->x = NULL;
    r->n_cols = 0;
}

const char *solver_status_name(int status)
{
    switch (status) {
    case SOLVER_OPTIMAL: return "optimal";
    case SOLVER_FEASIBLE: return "feasible (gap)";
    case SOLVER_NO_PLAN: return "no plan (time limit)";
    case SOLVER_INFEASIBLE: return "infeasible";
    case SOLVER_UNBOUNDED: return "unbounded";
    default: return "unknown";
    }
}

/* OR-Library checks: p-median pmed1..pmed10 through the edge-list path (igraph
 * shortest paths) and capacitated location cap41..cap134 through the cost-matrix
 * path, each against the published optimum in optima.csv (Beasley 1985, 1988;
 * data and caveats in $SITEREACH_SHARED/data/orlib/README.md).
 * Usage: test_orlib [pmed|cap|capabc|all] [first last [reduce heuristic time_limit]]
 * (default: pmed1..10 and cap41..cap134);
 * tools/bench-orlib.sh runs every instance with the same binary and prints times. */
#define _GNU_SOURCE
#include <igraph.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "capacity.h"
#include "check.h"
#include "median.h"
#include "tables.h"

static char shared[1024];
static char tmpdir[256];
static int opt_reduce = 1, opt_heuristic = 1;   /* bench switches (argv 4, 5) */
static double opt_time_limit = 0;                /* bench switch (argv 6), seconds */

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* Published optimum of an instance from optima.csv, or NAN. */
static double optimum(const char *name)
{
    char path[1200], line[512];
    double v = NAN;
    snprintf(path, sizeof path, "%s/data/orlib/optima.csv", shared);
    FILE *f = fopen(path, "r");
    if (f == NULL) return NAN;
    while (fgets(line, sizeof line, f)) {
        char *c1 = strchr(line, ',');
        if (c1 == NULL) continue;
        *c1 = '\0';
        if (strcmp(line, name) == 0) {
            char *c2 = strchr(c1 + 1, ',');
            if (c2) v = strtod(c2 + 1, NULL);
            break;
        }
    }
    fclose(f);
    return v;
}

/* Whole file as whitespace-separated tokens (the README: parse by tokens). */
static char **read_tokens(const char *path, size_t *n)
{
    FILE *f = fopen(path, "r");
    char **t = NULL, buf[128];
    size_t cap = 0;
    *n = 0;
    if (f == NULL) return NULL;
    while (fscanf(f, "%127s", buf) == 1) {
        if (*n == cap) {
            cap = cap ? 2 * cap : 4096;
            char **q = realloc(t, cap * sizeof *q);
            if (q == NULL) break;
            t = q;
        }
        t[(*n)++] = strdup(buf);
    }
    fclose(f);
    return t;
}

static void free_tokens(char **t, size_t n)
{
    for (size_t k = 0; k < n; k++) free(t[k]);
    free(t);
}

/* Convert pmedK.txt to edges/demand/sites CSV. OR-Library's rule for repeated
 * edges: read the lines in turn, each overwriting c(i,j) = c(j,i), so the LAST
 * cost counts (README, "duplicate edges"). Returns p, or -1. */
static int pmed_to_csv(const char *path, const char *edges, const char *demand,
                       const char *sites)
{
    size_t nt;
    char **t = read_tokens(path, &nt);
    int n, m, p;
    int *last = NULL;
    if (t == NULL || nt < 3) return -1;
    n = atoi(t[0]);
    m = atoi(t[1]);
    p = atoi(t[2]);
    if (nt < 3 + 3 * (size_t)m) {
        free_tokens(t, nt);
        return -1;
    }
    /* last[(a-1)*n + (b-1)] (a < b) = cost of the last line naming the pair. */
    last = malloc((size_t)n * (size_t)n * sizeof *last);
    for (size_t k = 0; k < (size_t)n * (size_t)n; k++) last[k] = -1;
    for (int k = 0; k < m; k++) {
        int a = atoi(t[3 + 3 * k]), b = atoi(t[4 + 3 * k]), c = atoi(t[5 + 3 * k]);
        if (a > b) {
            int s = a;
            a = b;
            b = s;
        }
        last[(size_t)(a - 1) * (size_t)n + (size_t)(b - 1)] = c;
    }
    FILE *fe = fopen(edges, "w"), *fd = fopen(demand, "w"), *fs = fopen(sites, "w");
    if (!fe || !fd || !fs) {
        if (fe) fclose(fe);
        if (fd) fclose(fd);
        if (fs) fclose(fs);
        free(last);
        free_tokens(t, nt);
        return -1;
    }
    fprintf(fe, "from,to,cost\n");
    fprintf(fd, "id,weight\n");
    fprintf(fs, "id\n");
    for (int a = 0; a < n; a++) {
        fprintf(fd, "%d,1\n", a + 1);
        fprintf(fs, "%d\n", a + 1);
        for (int b = a + 1; b < n; b++)
            if (last[(size_t)a * (size_t)n + (size_t)b] >= 0)
                fprintf(fe, "%d,%d,%d\n", a + 1, b + 1, last[(size_t)a * (size_t)n + (size_t)b]);
    }
    fclose(fe);
    fclose(fd);
    fclose(fs);
    free(last);
    free_tokens(t, nt);
    return p;
}

static void run_pmed(int k, int verbose)
{
    char name[32], path[1200], ed[400], dm[400], st[400];
    loc_problem_t *prob = NULL;
    loc_opts_t o;
    loc_result_t r;
    err_t e = {0};
    double t0 = now_s();

    snprintf(name, sizeof name, "pmed%d", k);
    snprintf(path, sizeof path, "%s/data/orlib/pmed/%s.txt", shared, name);
    snprintf(ed, sizeof ed, "%s/edges.csv", tmpdir);
    snprintf(dm, sizeof dm, "%s/demand.csv", tmpdir);
    snprintf(st, sizeof st, "%s/sites.csv", tmpdir);
    int p = pmed_to_csv(path, ed, dm, st);
    CHECK(p > 0);
    if (p <= 0) return;
    CHECK(tables_load_network(ed, 0, dm, st, INFINITY, &prob, &e) == ERR_OK);
    if (prob == NULL) {
        fprintf(stderr, "%s: %s\n", name, e.msg);
        return;
    }
    loc_opts_default(&o);
    o.p = p;
    o.reduce = opt_reduce;
    o.heuristic = opt_heuristic;
    o.solver.time_limit_s = opt_time_limit;
    CHECK(median_solve(prob, &o, &r, &e) == ERR_OK);
    double opt = optimum(name);
    /* Published optimum: OR-Library pmedopt (Beasley 1985, Table 2). A
     * time-limited bench run only has to bracket it. */
    if (opt_time_limit > 0 && r.status != SOLVER_OPTIMAL) {
        CHECK(r.bound <= opt + 1e-6 && r.objective >= opt - 1e-6);
    } else {
        CHECK_NEAR(r.objective, opt, 1e-6);
        CHECK(r.status == SOLVER_OPTIMAL);
    }
    if (verbose || fabs(r.objective - opt) > 1e-6)
        printf("%-7s n=%-3zu p=%-3d obj=%-6.0f opt=%-6.0f gap=%-7.1e %s heur=%-6.0f "
               "lagr=%-8.1f fixed=%-4zu cols=%-6zu rows=%-6zu nnz=%-7zu nodes=%-4ld glpk=%.2fs "
               "total=%.2fs\n", name, prob->n_units, p, r.objective, opt, (r.objective - opt) / opt,
               r.status == SOLVER_OPTIMAL ? "opt " : "lim ",
               r.heuristic_objective, r.lagrange_bound, r.n_fixed, r.n_cols, r.n_rows,
               r.n_nonzeros, r.nodes, r.solver_seconds, now_s() - t0);
    loc_result_destroy(&r);
    loc_free(prob);
}

/* Convert capNN.txt to demand/sites/matrix CSV. Each cost c_ij is for serving
 * ALL of customer j's demand (README, CFLP caveat); per_person = 1 writes c_ij / d_j,
 * else c_ij as is. 'capacity' tokens (capa/capb/capc) are replaced by 'cap'. */
static int cap_to_csv(const char *path, double cap, int per_person, const char *demand,
                      const char *sites, const char *matrix)
{
    size_t nt, at = 2;
    char **t = read_tokens(path, &nt);
    if (t == NULL || nt < 2) return -1;
    int m = atoi(t[0]), n = atoi(t[1]);
    if (nt != 2 + 2 * (size_t)m + (size_t)n * ((size_t)m + 1)) {
        free_tokens(t, nt);
        return -1;
    }
    FILE *fd = fopen(demand, "w"), *fs = fopen(sites, "w"), *fm = fopen(matrix, "w");
    if (!fd || !fs || !fm) {
        if (fd) fclose(fd);
        if (fs) fclose(fs);
        if (fm) fclose(fm);
        free_tokens(t, nt);
        return -1;
    }
    fprintf(fd, "id,weight\n");
    fprintf(fs, "id,capacity,fixed_cost\n");
    fprintf(fm, "demand_id,site_id,cost\n");
    for (int i = 0; i < m; i++, at += 2) {
        double c = strcmp(t[at], "capacity") == 0 ? cap : strtod(t[at], NULL);
        fprintf(fs, "w%d,%.17g,%.17g\n", i + 1, c, strtod(t[at + 1], NULL));
    }
    for (int j = 0; j < n; j++) {
        double d = strtod(t[at++], NULL);
        fprintf(fd, "c%d,%.17g\n", j + 1, d);
        for (int i = 0; i < m; i++) {
            double c = strtod(t[at++], NULL);
            fprintf(fm, "c%d,w%d,%.17g\n", j + 1, i + 1, per_person ? c / d : c);
        }
    }
    fclose(fd);
    fclose(fs);
    fclose(fm);
    free_tokens(t, nt);
    return 0;
}

/* Solve one CFLP instance; returns the seconds taken. */
static double run_cap(const char *file, const char *name, double cap, int per_person,
                      int verbose, double time_limit)
{
    char path[1200], dm[400], st[400], mx[400];
    loc_problem_t *prob = NULL;
    loc_opts_t o;
    loc_result_t r;
    err_t e = {0};
    double t0 = now_s();

    snprintf(path, sizeof path, "%s/data/orlib/cap/%s.txt", shared, file);
    snprintf(dm, sizeof dm, "%s/demand.csv", tmpdir);
    snprintf(st, sizeof st, "%s/sites.csv", tmpdir);
    snprintf(mx, sizeof mx, "%s/matrix.csv", tmpdir);
    CHECK(cap_to_csv(path, cap, per_person, dm, st, mx) == 0);
    CHECK(tables_load_matrix(mx, dm, st, &prob, &e) == ERR_OK);
    if (prob == NULL) {
        fprintf(stderr, "%s: %s\n", name, e.msg);
        return 0;
    }
    loc_opts_default(&o);
    o.per_unit_cost = per_person;
    o.solver.time_limit_s = time_limit;
    CHECK(capacity_solve(prob, &o, &r, &e) == ERR_OK);
    double opt = optimum(name);
    /* Published optimum: OR-Library capopt (Beasley 1988); split demand; the
     * README asks for an absolute tolerance of at least 1e-3. A time-limited
     * bench run only has to bracket it. */
    if (time_limit > 0 && r.status != SOLVER_OPTIMAL) {
        CHECK(r.bound <= opt + 1e-3 && r.objective >= opt - 1e-3);
    } else {
        CHECK_NEAR(r.objective, opt, 1e-3 + 1e-9 * fabs(opt));
        CHECK(r.status == SOLVER_OPTIMAL);
    }
    CHECK_NEAR(r.unserved_weight, 0, 1e-6);
    double dt = now_s() - t0;
    if (verbose || fabs(r.objective - opt) > 1e-3 + 1e-9 * fabs(opt))
        printf("%-12s m=%-3zu n=%-4zu obj=%-16.4f opt=%-16.4f diff=%-9.2e %s bound=%.4f "
               "nodes=%-5ld glpk=%.2fs total=%.2fs\n", name, prob->n_sites, prob->n_units,
               r.objective, opt, r.objective - opt, solver_status_name(r.status), r.bound,
               r.nodes, r.solver_seconds, dt);
    loc_result_destroy(&r);
    loc_free(prob);
    return dt;
}

static const char *const cap_names[] = {
    "cap41", "cap42", "cap43", "cap44", "cap51", "cap61", "cap62", "cap63", "cap64",
    "cap71", "cap72", "cap73", "cap74", "cap81", "cap82", "cap83", "cap84", "cap91", "cap92",
    "cap93", "cap94", "cap101", "cap102", "cap103", "cap104", "cap111", "cap112", "cap113",
    "cap114", "cap121", "cap122", "cap123", "cap124", "cap131", "cap132", "cap133", "cap134",
    NULL};

int main(int argc, char **argv)
{
    const char *which = argc > 1 ? argv[1] : "all";
    int verbose = argc > 1;
    const char *s = getenv("SITEREACH_SHARED");

    igraph_set_error_handler(igraph_error_handler_ignore);
    snprintf(shared, sizeof shared, "%s", s ? s : "../shared");
    snprintf(tmpdir, sizeof tmpdir, "/tmp/sitereach-orlib-XXXXXX");
    if (mkdtemp(tmpdir) == NULL) {
        perror("mkdtemp");
        return 1;
    }
    if (isnan(optimum("pmed1"))) {
        fprintf(stderr, "OR-Library data not found under '%s/data/orlib'; set SITEREACH_SHARED\n",
                shared);
        CHECK(0);
        rmdir(tmpdir);
        return CHECK_DONE("test_orlib");
    }
    if (strcmp(which, "pmed") == 0 || strcmp(which, "all") == 0) {
        int a = argc > 3 ? atoi(argv[2]) : 1, b = argc > 3 ? atoi(argv[3]) : 10;
        if (argc > 4) opt_reduce = atoi(argv[4]);
        if (argc > 5) opt_heuristic = atoi(argv[5]);
        if (argc > 6) opt_time_limit = atof(argv[6]);
        for (int k = a; k <= b; k++) run_pmed(k, verbose);
    }
    if (strcmp(which, "cap") == 0 || strcmp(which, "all") == 0) {
        double total = 0;
        for (int k = 0; cap_names[k] != NULL; k++)
            total += run_cap(cap_names[k], cap_names[k], 0, 0, verbose, 0);
        /* Per-person costs c_ij / d_j must give the same optimum. */
        total += run_cap("cap41", "cap41", 0, 1, verbose, 0);
        if (verbose) printf("cap41..cap134 total %.2fs\n", total);
    }
    if (strcmp(which, "capabc") == 0) {
        /* Large sets: bench only (CBC needs about 11 min each, README); 10 min limit each. */
        static const char *const f[] = {"capa", "capb", "capc"};
        static const double caps[3][4] = {{8000, 10000, 12000, 14000}, {5000, 6000, 7000, 8000},
                                          {5000, 5750, 6500, 7250}};
        int a = argc > 3 ? atoi(argv[2]) : 0, b = argc > 3 ? atoi(argv[3]) : 11;
        for (int k = a; k <= b && k < 12; k++) {
            char nm[32];
            snprintf(nm, sizeof nm, "%s-%.0f", f[k / 4], caps[k / 4][k % 4]);
            run_cap(f[k / 4], nm, caps[k / 4][k % 4], 0, 1, 600);
        }
    }
    char f[400];
    const char *files[] = {"edges.csv", "demand.csv", "sites.csv", "matrix.csv"};
    for (int k = 0; k < 4; k++) {
        snprintf(f, sizeof f, "%s/%s", tmpdir, files[k]);
        unlink(f);
    }
    rmdir(tmpdir);
    return CHECK_DONE("test_orlib");
}

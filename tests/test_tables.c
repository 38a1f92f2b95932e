/* Tests for the CSV table inputs: an edge list turned into costs by igraph
 * shortest paths (undirected and directed, worked out by hand), a cost matrix,
 * optional site columns, and the catalogue of bad inputs with their messages. */
#include <igraph.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "capacity.h"
#include "check.h"
#include "cover.h"
#include "median.h"
#include "tables.h"

static char dir[64];
static char path_buf[64][256];   /* every file written keeps its own slot */
static int n_paths;

/* Write 'text' to dir/name and return the path (kept for removal). */
static const char *put(const char *name, const char *text)
{
    char *p = path_buf[n_paths % 64];
    snprintf(p, 256, "%s/%s", dir, name);
    FILE *f = fopen(p, "w");
    if (f) {
        fputs(text, f);
        fclose(f);
    }
    n_paths++;
    return p;
}

/* Cost of the pair (unit, site) or -1 when absent. */
static double pair_cost(const loc_problem_t *p, size_t unit, size_t site)
{
    for (size_t k = p->unit_start[unit]; k < p->unit_start[unit + 1]; k++)
        if ((size_t)p->pair_site[k] == site) return p->pair_cost[k];
    return -1;
}

static void expect_fail(int rc, const err_t *e, int code, const char *sub)
{
    CHECK(rc == code);
    CHECK_STR_HAS(e->msg, sub);
}

/* Helper mode for tests/xcheck/models_scipy.sh: solve one table instance and
 * print "objective V status S".
 *   test_tables --solve KIND MATRIX DEMAND SITES P LIMIT PENALTY SHARE
 * KIND: maxcover, setcover, median, capacity, capacity1 (single-source). */
static int solve_mode(int argc, char **argv)
{
    loc_problem_t *p = NULL;
    loc_opts_t o;
    loc_result_t r;
    err_t e = {0};
    int rc;

    if (argc != 10) {
        fprintf(stderr, "usage: test_tables --solve KIND MATRIX DEMAND SITES P LIMIT PENALTY SHARE\n");
        return 2;
    }
    if (tables_load_matrix(argv[3], argv[4], argv[5], &p, &e) != ERR_OK) {
        fprintf(stderr, "%s\n", e.msg);
        return 1;
    }
    loc_opts_default(&o);
    o.p = atoi(argv[6]);
    o.limit = strtod(argv[7], NULL);
    o.penalty = strtod(argv[8], NULL);
    o.share = strtod(argv[9], NULL);
    if (strcmp(argv[2], "maxcover") == 0) rc = cover_max(p, &o, &r, &e);
    else if (strcmp(argv[2], "setcover") == 0) rc = cover_set(p, &o, &r, &e);
    else if (strcmp(argv[2], "median") == 0) rc = median_solve(p, &o, &r, &e);
    else {
        o.single_source = strcmp(argv[2], "capacity1") == 0;
        rc = capacity_solve(p, &o, &r, &e);
    }
    if (rc != ERR_OK) {
        fprintf(stderr, "%s\n", e.msg);
        loc_free(p);
        return 1;
    }
    printf("objective %.12g status %s\n", r.objective, solver_status_name(r.status));
    loc_result_destroy(&r);
    loc_free(p);
    return 0;
}

/* Helper mode: print the cost pairs the network loader derives, one
 * "unit_id site_id cost" line each (tests/xcheck/models_scipy.py compares them
 * with networkx).   test_tables --network-costs EDGES DEMAND SITES DIRECTED */
static int costs_mode(int argc, char **argv)
{
    loc_problem_t *p = NULL;
    err_t e = {0};

    if (argc != 6) {
        fprintf(stderr, "usage: test_tables --network-costs EDGES DEMAND SITES DIRECTED\n");
        return 2;
    }
    if (tables_load_network(argv[2], atoi(argv[5]), argv[3], argv[4], INFINITY, &p, &e)) {
        fprintf(stderr, "%s\n", e.msg);
        return 1;
    }
    for (size_t j = 0; j < p->n_units; j++)
        for (size_t k = p->unit_start[j]; k < p->unit_start[j + 1]; k++)
            printf("%s %s %.17g\n", p->unit_id[j], p->site_id[p->pair_site[k]], p->pair_cost[k]);
    loc_free(p);
    return 0;
}

int main(int argc, char **argv)
{
    loc_problem_t *p = NULL;
    err_t e = {0};
    int rc;

    igraph_set_error_handler(igraph_error_handler_ignore);
    if (argc > 1 && strcmp(argv[1], "--solve") == 0) return solve_mode(argc, argv);
    if (argc > 1 && strcmp(argv[1], "--network-costs") == 0) return costs_mode(argc, argv);

    igraph_set_error_handler(igraph_error_handler_ignore);
    snprintf(dir, sizeof dir, "/tmp/sitereach-tables-XXXXXX");
    if (mkdtemp(dir) == NULL) return 1;

    /* Network: a - b 5, b - c 3, a - c 10, c - d 2 (spaces, CR and a blank line
     * are tolerated; an extra column is ignored). Undirected costs by hand:
     * a->c = min(10, 5+3) = 8, a->d = 10, b->d = 5. */
    const char *edges = put("edges.csv", "from,to,cost,name\r\na, b, 5,x\nb,c,3,y\n\na,c,10,z\nc,d,2,w\n");
    const char *demand = put("demand.csv", "id,weight\na,100\nb,50.5\nd,0\n");
    const char *sites = put("sites.csv", "id,capacity,fixed_cost,state\nc,500,7,\nd,,,open\nb,1e3,2.5,may_close\n");
    rc = tables_load_network(edges, 0, demand, sites, INFINITY, &p, &e);
    CHECK(rc == ERR_OK);
    if (p != NULL) {
        CHECK(p->n_units == 3 && p->n_sites == 3);
        CHECK_NEAR(p->weight[1], 50.5, 1e-12);
        CHECK_NEAR(pair_cost(p, 0, 0), 8, 1e-12);    /* a -> c */
        CHECK_NEAR(pair_cost(p, 0, 1), 10, 1e-12);   /* a -> d */
        CHECK_NEAR(pair_cost(p, 0, 2), 5, 1e-12);    /* a -> b */
        CHECK_NEAR(pair_cost(p, 2, 2), 5, 1e-12);    /* d -> b */
        CHECK_NEAR(pair_cost(p, 1, 2), 0, 1e-12);    /* b -> b */
        CHECK_NEAR(p->capacity[0], 500, 0);
        CHECK(isinf(p->capacity[1]));
        CHECK_NEAR(p->fixed_cost[2], 2.5, 0);
        CHECK(p->state[0] == LOC_CANDIDATE && p->state[1] == LOC_FIXED_OPEN &&
              p->state[2] == LOC_MAY_CLOSE);
        CHECK(strcmp(p->site_id[2], "b") == 0 && strcmp(p->unit_id[2], "d") == 0);
        /* p = 1 median with d fixed open: a pays 100*min(10, 5 at b) ... with b:
         * a 500, b 0; with c: a 800, b 50.5*3: b wins (500). */
        loc_opts_t o;
        loc_result_t r;
        loc_opts_default(&o);
        o.p = 1;
        CHECK(median_solve(p, &o, &r, &e) == ERR_OK);
        CHECK_NEAR(r.objective, 500, 1e-9);
        loc_result_destroy(&r);
        o.p = 3;
        expect_fail(median_solve(p, &o, &r, &e), &e, ERR_INPUT, "p = 3 is larger than the 2");
        loc_free(p);
        p = NULL;
    }
    /* Limit 7: only pairs within 7 are kept (a->c 8 and a->d 10 go). */
    CHECK(tables_load_network(edges, 0, demand, sites, 7, &p, &e) == ERR_OK);
    if (p != NULL) {
        CHECK(pair_cost(p, 0, 0) < 0 && pair_cost(p, 0, 1) < 0);
        CHECK_NEAR(pair_cost(p, 0, 2), 5, 1e-12);
        loc_free(p);
        p = NULL;
    }
    /* Directed: edges run from -> to only; cost is unit -> site. a->b 5,
     * b->c 3, a->c 10, c->d 2: a reaches c at 8, d at 10; d reaches nothing
     * but itself; b reaches d at 5 but not a. */
    CHECK(tables_load_network(edges, 1, demand, sites, INFINITY, &p, &e) == ERR_OK);
    if (p != NULL) {
        CHECK_NEAR(pair_cost(p, 0, 0), 8, 1e-12);
        CHECK_NEAR(pair_cost(p, 1, 1), 5, 1e-12);    /* b -> d */
        CHECK(pair_cost(p, 2, 0) < 0);               /* d -> c: no path */
        CHECK_NEAR(pair_cost(p, 2, 1), 0, 1e-12);    /* d -> d */
        loc_free(p);
        p = NULL;
    }

    /* Cost matrix; pairs not listed do not exist. */
    const char *matrix = put("matrix.csv", "demand_id,site_id,cost\na,c,4\na,b,6.5\nb,c,1\n");
    CHECK(tables_load_matrix(matrix, demand, sites, &p, &e) == ERR_OK);
    if (p != NULL) {
        CHECK(p->n_pairs == 3);
        CHECK_NEAR(pair_cost(p, 0, 2), 6.5, 0);
        CHECK(pair_cost(p, 2, 0) < 0);
        loc_free(p);
        p = NULL;
    }

    /* The catalogue of bad inputs. */
    rc = tables_load_matrix(matrix, "/nonexistent/demand.csv", sites, &p, &e);
    expect_fail(rc, &e, ERR_IO, "cannot open demand table '/nonexistent/demand.csv'");
    CHECK(p == NULL);
    rc = tables_load_network("/nonexistent/e.csv", 0, demand, sites, INFINITY, &p, &e);
    expect_fail(rc, &e, ERR_IO, "cannot open edge list table '/nonexistent/e.csv'");
    rc = tables_load_matrix(matrix, put("d1.csv", "id,persons\na,1\n"), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 1: bad header, no column 'weight' (expected id,weight)");
    rc = tables_load_matrix(matrix, put("d2.csv", ""), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "is empty; it needs a header row");
    rc = tables_load_matrix(matrix, put("d3.csv", "id,weight\na,1\nb,2\na,3\n"), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 4, column 'id': duplicate id 'a' (first on line 2)");
    rc = tables_load_matrix(matrix, put("d4.csv", "id,weight\na,1\nb,-2\n"), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 3, column 'weight': -2 is negative");
    rc = tables_load_matrix(matrix, put("d5.csv", "id,weight\na,nan\nb,2\n"), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 2, column 'weight': 'nan' is not a finite number");
    rc = tables_load_matrix(matrix, put("d6.csv", "id,weight\na,lots\nb,2\n"), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 2, column 'weight': 'lots' is not a number");
    rc = tables_load_matrix(matrix, put("d7.csv", "id,weight\n,4\n"), sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "empty id in the demand table");
    rc = tables_load_matrix(matrix, demand, put("s1.csv", "id,capacity\n"), &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "has no candidates");
    rc = tables_load_matrix(matrix, demand, put("s2.csv", "name\nc\n"), &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "bad header, no column 'id'");
    rc = tables_load_matrix(matrix, demand, put("s3.csv", "id,state\nc,shut\nb,\n"), &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 2, column 'state': 'shut' is not one of");
    rc = tables_load_matrix(matrix, demand, put("s4.csv", "id,capacity\nc,-1\nb,\n"), &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "column 'capacity': -1 is negative");
    rc = tables_load_matrix(put("m1.csv", "demand_id,site_id,cost\na,c,-4\n"), demand, sites, &p,
                            &e);
    expect_fail(rc, &e, ERR_INPUT, "m1.csv' line 2, column 'cost': -4 is negative");
    rc = tables_load_matrix(put("m2.csv", "demand_id,site_id,cost\na,c,NaN\n"), demand, sites, &p,
                            &e);
    expect_fail(rc, &e, ERR_INPUT, "column 'cost': 'NaN' is not a finite number");
    rc = tables_load_matrix(put("m3.csv", "demand_id,site_id,cost\na,c,1\nz,c,1\n"), demand,
                            sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 3, column 'demand_id': 'z' is not in the demand table");
    rc = tables_load_matrix(put("m4.csv", "demand_id,site_id,cost\na,q,1\n"), demand, sites, &p,
                            &e);
    expect_fail(rc, &e, ERR_INPUT, "line 2, column 'site_id': 'q' is not in the site table");
    rc = tables_load_matrix(put("m5.csv", "demand_id,site,cost\n"), demand, sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "bad header, no column 'site_id'");
    rc = tables_load_matrix(put("m6.csv", "demand_id,site_id,cost\na,c,1\na,c,2\n"), demand,
                            sites, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "lists 1 (demand_id, site_id) pairs more than once");
    rc = tables_load_matrix(put("m7.csv", "demand_id,site_id,cost\na,c,inf\n"), demand, sites, &p,
                            &e);
    expect_fail(rc, &e, ERR_INPUT, "'inf' is not a finite number");
    rc = tables_load_network(put("e1.csv", "from,to,cost\na,b,-1\n"), 0, demand, sites, INFINITY,
                             &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "e1.csv' line 2, column 'cost': -1 is negative");
    rc = tables_load_network(put("e2.csv", "from,to,cost\na,b,1\nb,c,1\n"), 0, demand, sites,
                             INFINITY, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "demand id 'd' is not a node of the edge list");
    rc = tables_load_network(put("e3.csv", "from,to,cost\na,b,1\nb,d,1\n"), 0,
                             put("d8.csv", "id,weight\na,1\n"), sites, INFINITY, &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 2: site id 'c' is not a node of the edge list");
    rc = tables_load_network(put("e4.csv", "source,to,cost\n"), 0, demand, sites, INFINITY, &p,
                             &e);
    expect_fail(rc, &e, ERR_INPUT, "bad header, no column 'from' (expected from,to,cost)");
    rc = tables_load_network(put("e5.csv", "from,to,cost\na,,1\n"), 0, demand, sites, INFINITY,
                             &p, &e);
    expect_fail(rc, &e, ERR_INPUT, "line 2, column 'to': empty node id");
    CHECK(p == NULL);

    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    CHECK(system(cmd) == 0);
    return CHECK_DONE("test_tables");
}

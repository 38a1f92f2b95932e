/* test_links: road links and their criticality on hand-made networks.
 * Outside references: answers worked on paper (a single bridge whose closure cuts
 * off a known village; two mirrored parallel roads, either of which serves the
 * village as fast as the other), and a brute-force full igraph search per closed
 * link (links_score_one_full) for every link of a mixed network, in both travel
 * directions and both modes. The networkx brute force on Burundi's roads is in
 * tests/xcheck/links_networkx.sh, fed by this program's export mode:
 *   test_links --export SCENARIO.json DIR   write edges, sites, people and the
 *                                           scores of some links into DIR. */
#include <igraph.h>
#include <gdal.h>
#include <cpl_error.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "fixtures.h"
#include "inputs.h"
#include "links.h"
#include "network.h"
#include "output.h"
#include "travel.h"

static roads_t *mk_roads(size_t n_nodes, size_t n_segs)
{
    roads_t *r = fx_roads(n_nodes, n_segs, 2);
    r->classes[0] = (road_class_count_t){strdup("main"), 0, 0.0, 2.0, 15.0, 1};
    r->classes[1] = (road_class_count_t){strdup("path"), 0, 0.0, 1.5, 0.0, 1};
    return r;
}

static void road_at(roads_t *r, const grid_t *g, size_t i, int col, int row)
{
    r->x[i] = g->gt[0] + (col + 0.5) * g->gt[1];
    r->y[i] = g->gt[3] + (row + 0.5) * g->gt[5];
}

static void seg(roads_t *r, size_t i, int a, int b, int cls, int feat, uint8_t flags)
{
    r->segs[i].a = a;
    r->segs[i].b = b;
    r->segs[i].cls = cls;
    r->segs[i].feature = feat;
    r->segs[i].length_m = hypot(r->x[b] - r->x[a], r->y[b] - r->y[a]);
    r->segs[i].flags = flags;
}

static points_t *one_site(const grid_t *g, int col, int row)
{
    points_t *p = calloc(1, sizeof *p);
    p->n = 1;
    p->cell = malloc(sizeof *p->cell);
    p->cell[0] = (int64_t)row * g->nx + col;
    return p;
}

static void free_site(points_t *p)
{
    if (p == NULL) return;
    free(p->cell);
    free(p);
}

/* A river (barrier column 10) crossed by one bridge between the centres of cells
 * (9,1) and (11,1); one person per land cell; the site in cell (0,1). On paper:
 * closing the bridge cuts off the 10 x 3 cells east of the river = 30 people, all
 * within the hour in the base (at most about 2,000 s away), so 30 are pushed
 * beyond the limit and 30 cut off. */
static void test_single_bridge(void)
{
    grid_t *g = fx_lattice(21, 3, 100.0);
    roads_t *r = mk_roads(2, 1);
    points_t *site = one_site(g, 0, 1);
    network_t *net = NULL;
    links_t *L = NULL;
    scen_t s;
    err_t e = {0};
    link_t full;

    fx_scen_init(&s);
    g->barrier = calloc(21 * 3, 1);
    for (int row = 0; row < 3; row++) {
        g->barrier[row * 21 + 10] = 1;
        for (int col = 0; col < 21; col++) g->people[row * 21 + col] = col == 10 ? 0 : 1;
    }
    road_at(r, g, 0, 9, 1);
    road_at(r, g, 1, 11, 1);
    seg(r, 0, 0, 1, 0, 0, ROAD_BRIDGE);
    r->node_junction[0] = r->node_junction[1] = 1;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK(links_build(r, &L, &e) == ERR_OK);
    CHECK(L != NULL && L->n == 1);
    if (L == NULL || net == NULL) goto done;
    CHECK(L->l[0].bridge == 1);
    CHECK(links_score(L, net, g->people, site, g->nx, 3600.0, 2, &e) == ERR_OK);
    CHECK(L->n_on_tree == 1);
    CHECK_NEAR(L->l[0].pushed_beyond, 30.0, 1e-9);
    CHECK_NEAR(L->l[0].cut_off, 30.0, 1e-9);
    CHECK_NEAR(L->l[0].added_person_h, 0.0, 1e-9);   /* only the cut-off moved */
    CHECK(links_score_one_full(L, 0, net, g->people, site, g->nx, 3600.0, &full, &e) == ERR_OK);
    CHECK_NEAR(full.pushed_beyond, 30.0, 1e-9);
    /* The full search leaves the network as it was. */
    CHECK(network_n_edits(net) == 0);
    /* A limit shorter than the walk to the village: nobody there is within it in the
     * base, so nobody is pushed beyond it, but 30 are still cut off. */
    CHECK(links_score(L, net, g->people, site, g->nx, 600.0, 1, &e) == ERR_OK);
    CHECK_NEAR(L->l[0].pushed_beyond, 0.0, 1e-9);
    CHECK_NEAR(L->l[0].cut_off, 30.0, 1e-9);
    /* No site: an error that says what to give. */
    {
        points_t none = {0};
        err_t e2 = {0};
        CHECK(links_score(L, net, g->people, &none, g->nx, 600.0, 1, &e2) == ERR_INPUT);
        CHECK_STR_HAS(e2.msg, "sites.existing");
    }
done:
    links_free(L);
    network_free(net);
    free_site(site);
    roads_free(r);
    grid_free(g);
}

/* Two mirrored roads from W (cell 1,3) to E (cell 19,3), one along row 1 and one
 * along row 5 (up, across, down: three segments joined at bends that are not
 * junctions, so each road is one link; every densified node falls on a cell centre,
 * so the mirror image holds exactly). Walking off-road is slow (0.5 m/s) and the roads fast (2 m/s).
 * The village sits on row 3 east of E, the mirror line, so either road brings it
 * in the same time: closing one changes nothing (on paper: 0 pushed, 0 hours). */
static void test_parallel(void)
{
    grid_t *g = fx_lattice(21, 7, 100.0);
    roads_t *r = mk_roads(6, 6);
    points_t *site = one_site(g, 1, 3);
    network_t *net = NULL;
    links_t *L = NULL;
    scen_t s;
    err_t e = {0};

    fx_scen_init(&s);
    s.walk_mps = 0.5;
    for (int col = 17; col < 21; col++) g->people[3 * 21 + col] = 25;
    road_at(r, g, 0, 1, 3);    /* W */
    road_at(r, g, 1, 19, 3);   /* E */
    road_at(r, g, 2, 1, 1);
    road_at(r, g, 3, 19, 1);
    road_at(r, g, 4, 1, 5);
    road_at(r, g, 5, 19, 5);
    seg(r, 0, 0, 2, 0, 0, 0);
    seg(r, 1, 2, 3, 0, 0, 0);
    seg(r, 2, 3, 1, 0, 0, 0);
    seg(r, 3, 0, 4, 0, 1, 0);
    seg(r, 4, 4, 5, 0, 1, 0);
    seg(r, 5, 5, 1, 0, 1, 0);
    r->node_junction[0] = r->node_junction[1] = 1;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK(links_build(r, &L, &e) == ERR_OK);
    CHECK(L != NULL && L->n == 2);
    if (L == NULL || net == NULL) goto done;
    CHECK(L->l[0].n_segs == 3 && L->l[1].n_segs == 3);
    CHECK(links_score(L, net, g->people, site, g->nx, 3600.0, 2, &e) == ERR_OK);
    for (size_t k = 0; k < L->n; k++) {
        CHECK_NEAR(L->l[k].pushed_beyond, 0.0, 1e-9);
        CHECK_NEAR(L->l[k].cut_off, 0.0, 1e-9);
        CHECK_NEAR(L->l[k].added_person_h, 0.0, 1e-9);
    }
done:
    links_free(L);
    network_free(net);
    free_site(site);
    roads_free(r);
    grid_free(g);
}

/* A mixed network: a loop, a dead end, a chain of several segments, a one-way
 * road, a path closed to vehicles, a river with two bridges, people everywhere.
 * Every link's incremental score must equal a full igraph search with the link
 * closed, in both directions and both modes, with 1 and 3 threads. */
static void test_against_full(int mode, int direction, int threads)
{
    grid_t *g = fx_lattice(30, 12, 100.0);
    roads_t *r = mk_roads(12, 13);
    points_t site = {0};
    int64_t cells[2];
    network_t *net = NULL;
    links_t *L = NULL;
    scen_t s;
    err_t e = {0};
    int bad = 0;

    fx_scen_init(&s);
    s.mode = mode;
    s.direction = direction;
    s.walk_mps = 1.2;
    g->barrier = calloc(30 * 12, 1);
    for (int row = 0; row < 12; row++)
        for (int col = 0; col < 30; col++) {
            size_t c = (size_t)row * 30 + col;
            g->barrier[c] = col == 14;
            g->people[c] = col == 14 ? 0 : 1 + (col * 7 + row * 3) % 5;
        }
    road_at(r, g, 0, 1, 1);
    road_at(r, g, 1, 8, 2);
    road_at(r, g, 2, 13, 3);
    road_at(r, g, 3, 15, 3);
    road_at(r, g, 4, 25, 2);
    road_at(r, g, 5, 28, 10);
    road_at(r, g, 6, 13, 9);
    road_at(r, g, 7, 15, 9);
    road_at(r, g, 8, 20, 8);
    road_at(r, g, 9, 5, 8);
    road_at(r, g, 10, 3, 11);
    road_at(r, g, 11, 22, 5);
    seg(r, 0, 0, 1, 0, 0, 0);
    seg(r, 1, 1, 2, 0, 0, 0);               /* chain 0-1-2 (1 is not a junction) */
    seg(r, 2, 2, 3, 0, 1, ROAD_BRIDGE);
    seg(r, 3, 3, 4, 0, 2, 0);
    seg(r, 4, 4, 5, 0, 2, ROAD_ONEWAY);
    seg(r, 5, 6, 7, 0, 3, ROAD_BRIDGE);
    seg(r, 6, 7, 8, 1, 4, 0);               /* path: closed to vehicles */
    seg(r, 7, 8, 5, 0, 4, 0);
    seg(r, 8, 9, 6, 0, 5, 0);
    seg(r, 9, 1, 9, 0, 6, 0);
    seg(r, 10, 9, 10, 1, 7, 0);             /* dead end */
    seg(r, 11, 4, 11, 0, 8, 0);             /* loop 4-11-8 back to 4 via 3? */
    seg(r, 12, 11, 8, 0, 8, 0);
    for (int i = 0; i < 12; i++) r->node_junction[i] = 1;
    r->node_junction[1] = 1;
    r->node_junction[11] = 0;
    site.n = 2;
    cells[0] = 1 * 30 + 2;
    cells[1] = 10 * 30 + 27;
    site.cell = cells;
    CHECK(network_build(g, r, &s, &net, &e) == ERR_OK);
    CHECK(links_build(r, &L, &e) == ERR_OK);
    if (L == NULL || net == NULL) goto done;
    {
        size_t total = 0;
        for (size_t k = 0; k < L->n; k++) total += L->l[k].n_segs;
        CHECK(total == r->n_segs);   /* every segment in exactly one link */
    }
    CHECK(links_score(L, net, g->people, &site, g->nx, 900.0, threads, &e) == ERR_OK);
    for (size_t k = 0; k < L->n; k++) {
        link_t full;
        CHECK(links_score_one_full(L, k, net, g->people, &site, g->nx, 900.0, &full, &e) ==
              ERR_OK);
        if (fabs(full.pushed_beyond - L->l[k].pushed_beyond) > 1e-9 ||
            fabs(full.cut_off - L->l[k].cut_off) > 1e-9 ||
            fabs(full.added_person_h - L->l[k].added_person_h) >
                1e-9 * fmax(1.0, fabs(full.added_person_h))) {
            bad++;
            fprintf(stderr, "mode %d dir %d link %zu: incremental %g/%g/%g, full %g/%g/%g\n",
                    mode, direction, k, L->l[k].pushed_beyond, L->l[k].cut_off,
                    L->l[k].added_person_h, full.pushed_beyond, full.cut_off,
                    full.added_person_h);
        }
        /* Tree rule: a skipped link changes nothing in the full search either. */
        if (!L->l[k].on_tree)
            CHECK(full.pushed_beyond == 0 && full.cut_off == 0 && full.added_person_h == 0);
    }
    CHECK(bad == 0);
    /* The ranking is by people pushed beyond the limit, then cut off, then hours. */
    for (size_t q = 1; q < L->n; q++)
        CHECK(L->l[L->rank[q - 1]].pushed_beyond >= L->l[L->rank[q]].pushed_beyond);
done:
    links_free(L);
    network_free(net);
    roads_free(r);
    grid_free(g);
}

/* ---- export mode for tests/xcheck/links_networkx.sh ---- */

static int export(const char *scenario, const char *dir)
{
    inputs_t *in = NULL;
    network_t *net = NULL;
    links_t *L = NULL;
    err_t e = {0};
    FILE *f = NULL;
    char path[4096];
    int rc;

    GDALAllRegister();
    CPLSetErrorHandler(CPLQuietErrorHandler);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    if ((rc = inputs_load(scenario, 1, &in, &e)) != ERR_OK ||
        (rc = network_build(in->grid, in->roads, in->scen, &net, &e)) != ERR_OK ||
        (rc = links_build(in->roads, &L, &e)) != ERR_OK ||
        (rc = links_score(L, net, in->grid->people, in->existing, in->grid->nx,
                          in->scen->limit_s, 0, &e)) != ERR_OK ||
        (rc = out_mkdir(dir, &e)) != ERR_OK)
        goto done;
    {
        const igraph_t *g = network_graph(net);
        const double *w = VECTOR(*network_weights(net));
        snprintf(path, sizeof path, "%s/edges.csv", dir);
        if ((f = fopen(path, "w")) == NULL) goto io;
        fprintf(f, "eid,from,to,weight\n");
        for (int64_t k = 0; k < network_n_edges(net); k++)
            if (isfinite(w[k]))
                fprintf(f, "%ld,%ld,%ld,%.17g\n", (long)k, (long)IGRAPH_FROM(g, k),
                        (long)IGRAPH_TO(g, k), w[k]);
        fclose(f);
    }
    snprintf(path, sizeof path, "%s/meta.csv", dir);
    if ((f = fopen(path, "w")) == NULL) goto io;
    fprintf(f, "direction,%s\nn_nodes,%ld\nn_cells,%ld\nlimit_s,%.17g\n",
            network_direction(net) == SCEN_FROM_SITE ? "from_site" : "to_site",
            (long)network_n_nodes(net), (long)network_n_cells(net), in->scen->limit_s);
    for (size_t i = 0; i < in->existing->n; i++)
        fprintf(f, "site,%ld\n", (long)in->existing->cell[i]);
    fclose(f);
    snprintf(path, sizeof path, "%s/people.csv", dir);
    if ((f = fopen(path, "w")) == NULL) goto io;
    for (size_t c = 0; c < (size_t)in->grid->nx * in->grid->ny; c++)
        if (in->grid->people[c] > 0) fprintf(f, "%zu,%.17g\n", c, in->grid->people[c]);
    fclose(f);
    /* The 6 top-ranked links, 3 more on the tree and 2 skipped by the tree rule. */
    snprintf(path, sizeof path, "%s/links.csv", dir);
    if ((f = fopen(path, "w")) == NULL) goto io;
    fprintf(f, "link,on_tree,pushed_beyond,cut_off,added_person_h,eids\n");
    {
        size_t n_top = 0, n_more = 0, n_skip = 0;
        for (size_t q = 0; q < L->n; q++) {
            const link_t *lk = &L->l[L->rank[q]];
            int take = 0;
            if (lk->on_tree && n_top < 6) take = ++n_top;
            else if (lk->on_tree && q % 7 == 3 && n_more < 3) take = ++n_more;
            else if (!lk->on_tree && n_skip < 2) take = ++n_skip;
            if (!take) continue;
            fprintf(f, "%zu,%d,%.17g,%.17g,%.17g,", L->rank[q], lk->on_tree, lk->pushed_beyond,
                    lk->cut_off, lk->added_person_h);
            for (size_t j = 0; j < lk->n_segs; j++) {
                int64_t first, n;
                network_seg_edges(net, (size_t)L->seg_list[lk->seg0 + j], &first, &n);
                for (int64_t x = first; x < first + n; x++)
                    fprintf(f, "%s%ld", j == 0 && x == first ? "" : ";", (long)x);
            }
            fprintf(f, "\n");
        }
    }
    fclose(f);
    goto done;
io:
    rc = err_set(&e, ERR_IO, "cannot write '%s'", path);
done:
    if (rc != ERR_OK) fprintf(stderr, "test_links --export: %s\n", e.msg);
    links_free(L);
    network_free(net);
    inputs_free(in);
    return rc == ERR_OK ? 0 : 1;
}

int main(int argc, char **argv)
{
    if (argc == 4 && strcmp(argv[1], "--export") == 0) return export(argv[2], argv[3]);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    test_single_bridge();
    test_parallel();
    for (int mode = 0; mode < 2; mode++)
        for (int dir = 0; dir < 2; dir++) test_against_full(mode, dir, 1 + 2 * dir);
    return CHECK_DONE("test_links");
}

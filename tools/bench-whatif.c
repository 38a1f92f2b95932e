/* bench-whatif: speed of what-if variants and of critical-link ranking on
 * synthetic grids. Not a test; prints "key: value" lines.
 * Usage: bench-whatif [--cells N] [--variants V] [--link-cells M] [--threads P]
 *  1. Variants: a square grid of about N cells of 100 m (rolling hills, slope on)
 *     with a road lattice every 50 cells and 200 sites. V variants, each closing 8
 *     random road segments, slowing 40 others to 30 % and (every tenth) flooding a
 *     block of 40 x 40 cells and closing 5 sites, each followed by the repair of the
 *     base search tree (as compare does) and a cell-by-cell comparison with the
 *     base, then undone. Every tenth variant is also searched in full, to check the
 *     repair and to time that path. Compared with a full rebuild of the network plus
 *     one pass, which is what a variant would cost without edits.
 *  2. Links: a grid of about M cells with a road lattice every 10 cells (about
 *     10,000 links for M = 490,000), vehicles, 50 sites, limit 30 min: time to rank
 *     every link, and how many the tree rule skipped. */
#include <igraph.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "compare.h"
#include "links.h"
#include "network.h"
#include "sptree.h"
#include "travel.h"
#include "synth.h"

/* The tool's own random sequence (seeded as it always was, for comparable runs). */
static synth_rng_t rng = {4242};

static int edit_seg(network_t *net, size_t s, double factor, err_t *e)
{
    int64_t f, n;
    network_seg_edges(net, s, &f, &n);
    for (int64_t k = f; k < f + n; k++) {
        double w = network_edge_weight(net, k);
        if (network_edit_edge(net, k, factor > 0 ? w / factor : INFINITY, e) != ERR_OK) return 1;
    }
    return 0;
}

static int bench_variants(long cells, long n_var)
{
    int n = (int)ceil(sqrt((double)cells));
    grid_t *g = synth_grid(n, 100.0, &rng);
    roads_t *r = synth_roads(g, 50);
    size_t nc = (size_t)n * n;
    scen_t s;
    network_t *net = NULL;
    sptree_t tree = {0};
    travel_result_t *var = NULL;
    int64_t sites[200], *changed = NULL;
    uint8_t *mask = calloc(nc, 1), closed[200];
    float *delta = malloc(nc * sizeof *delta);
    int32_t *label = malloc(nc * sizeof *label), *sv = NULL;
    double *tv = NULL;
    const double limits[3] = {1800, 3600, 7200};
    double pushed = 0, t_apply = 0, t_search = 0, t_cmp = 0, c_full = 0, c_var = 0;
    double t_fullpass = 0, resettled = 0, worst = 0, t_full_g = 0;
    long n_fullpass = 0;
    err_t e = {0};

    memset(&s, 0, sizeof s);
    s.neighbours = 8;
    s.walk_mps = 5.0 / 3.6;
    s.use_slope = 1;
    s.cover_default_factor = 1.0;
    printf("## variants on %d x %d = %zu cells, %zu road segments, 200 sites\n", n, n, nc,
           r->n_segs);
    for (int i = 0; i < 200; i++) sites[i] = (int64_t)(synth_rnd(&rng) % nc);
    if (network_build(g, r, &s, &net, &e) != ERR_OK ||
        sptree_build(net, sites, 200, &tree, &e) != ERR_OK)
        goto fail;
    tv = malloc((size_t)network_n_nodes(net) * sizeof *tv);
    sv = malloc((size_t)network_n_nodes(net) * sizeof *sv);
    {
        /* A rebuild plus one full pass, timed alone. */
        network_t *n2 = NULL;
        travel_result_t *r2 = NULL;
        double t0 = synth_now_s();
        c_full = synth_cpu_s();
        if (network_build(g, r, &s, &n2, &e) != ERR_OK ||
            travel_nearest(n2, sites, 200, &r2, &e) != ERR_OK)
            goto fail;
        t_full_g = synth_now_s() - t0;
        c_full = synth_cpu_s() - c_full;
        travel_result_free(r2);
        network_free(n2);
    }
    printf("full_rebuild_and_pass_s: %.3f (cpu %.3f)\n", t_full_g, c_full);
    c_var = synth_cpu_s();
    for (long v = 0; v < n_var; v++) {
        compare_diff_t d;
        double t1 = synth_now_s(), old;
        size_t ne, nres = 0;
        memset(closed, 0, sizeof closed);
        for (int k = 0; k < 8; k++)
            if (edit_seg(net, synth_rnd(&rng) % r->n_segs, 0.0, &e)) goto fail;
        for (int k = 0; k < 40; k++)
            if (edit_seg(net, synth_rnd(&rng) % r->n_segs, 0.3, &e)) goto fail;
        if (v % 10 == 0) {
            int r0 = (int)(synth_rnd(&rng) % (uint64_t)(n - 40)), c0 = (int)(synth_rnd(&rng) % (uint64_t)(n - 40));
            memset(mask, 0, nc);
            for (int rr = r0; rr < r0 + 40; rr++)
                for (int cc = c0; cc < c0 + 40; cc++) mask[(size_t)rr * n + cc] = 1;
            if (network_edit_cells(net, mask, 0.0, NULL, &e) != ERR_OK) goto fail;
            for (int k = 0; k < 5; k++) closed[synth_rnd(&rng) % 200] = 1;
        }
        ne = network_n_edits(net);
        free(changed);
        changed = malloc((ne + 1) * sizeof *changed);
        for (size_t i = 0; i < ne; i++) network_edit_get(net, i, &changed[i], &old);
        double t2 = synth_now_s();
        if (sptree_resettle(&tree, net, changed, ne, closed, 200, tv, sv, &nres, &e) != ERR_OK)
            goto fail;
        double t3 = synth_now_s();
        resettled += (double)nres;
        if (compare_cells(nc, g->people, tree.time_s, tv, 3600, limits, 3, NULL, 0, &d, delta,
                          label, &e) != ERR_OK)
            goto fail;
        pushed += d.pushed_beyond;
        compare_diff_destroy(&d);
        double t4 = synth_now_s();
        t_apply += t2 - t1;
        t_search += t3 - t2;
        t_cmp += t4 - t3;
        if (v % 10 == 0) {
            /* The same variant by a full search: same times (to 1e-9), and its cost. */
            int64_t open[200];
            size_t n_open = 0;
            double t5 = synth_now_s();
            for (int i = 0; i < 200; i++)
                if (!closed[i]) open[n_open++] = sites[i];
            if (travel_nearest(net, open, n_open, &var, &e) != ERR_OK) goto fail;
            t_fullpass += synth_now_s() - t5;
            n_fullpass++;
            for (size_t c = 0; c < nc; c++) {
                double a = tv[c], b = var->time_s[c];
                double dd = isinf(a) && isinf(b) ? 0 : fabs(a - b) / fmax(1.0, b);
                if (dd > worst) worst = dd;
            }
            travel_result_free(var);
            var = NULL;
        }
        network_edit_reset(net);
        if ((v + 1) % 10 == 0) fprintf(stderr, "bench-whatif: %ld variants done\n", v + 1);
    }
    {
        double per = (t_apply + t_search + t_cmp) / (double)n_var;
        printf("variants: %ld\n", n_var);
        printf("per_variant_s: %.3f (edits %.4f, tree repair %.3f, compare %.3f)\n", per,
               t_apply / n_var, t_search / n_var, t_cmp / n_var);
        printf("mean_nodes_searched_again: %.0f of %ld\n", resettled / (double)n_var,
               (long)network_n_nodes(net));
        printf("full_search_per_variant_s: %.3f (%ld variants; largest relative difference "
               "from the repair %.2g)\n", t_fullpass / (double)(n_fullpass ? n_fullpass : 1),
               n_fullpass, worst);
        printf("cpu_all_variants_s: %.2f (repairs, comparisons and the full checks)\n",
               synth_cpu_s() - c_var);
        printf("ratio_to_full_rebuild: %.3f\n", per / t_full_g);
        printf("mean_people_pushed_beyond_60_min: %.0f\n", pushed / (double)n_var);
    }
    sptree_destroy(&tree);
    network_free(net);
    roads_free(r);
    grid_free(g);
    free(mask);
    free(delta);
    free(label);
    free(tv);
    free(sv);
    free(changed);
    return 0;
fail:
    fprintf(stderr, "bench-whatif: %s\n", e.msg);
    return 1;
}

static int bench_links(long cells, int threads)
{
    int n = (int)ceil(sqrt((double)cells));
    grid_t *g = synth_grid(n, 100.0, &rng);
    roads_t *r = synth_roads(g, 10);
    scen_t s;
    network_t *net = NULL;
    links_t *L = NULL;
    points_t sites = {0};
    int64_t cell[50];
    err_t e = {0};

    memset(&s, 0, sizeof s);
    s.neighbours = 8;
    s.walk_mps = 5.0 / 3.6;
    s.use_slope = 1;
    s.cover_default_factor = 1.0;
    s.mode = SCEN_MODE_VEHICLE;
    for (int i = 0; i < 50; i++) cell[i] = (int64_t)(synth_rnd(&rng) % ((uint64_t)n * n));
    sites.n = 50;
    sites.cell = cell;
    if (network_build(g, r, &s, &net, &e) != ERR_OK || links_build(r, &L, &e) != ERR_OK)
        goto fail;
    printf("## critical links on %d x %d cells, %zu links, 50 sites, vehicles, 30 min\n", n, n,
           L->n);
    double t0 = synth_now_s();
    if (links_score(L, net, g->people, &sites, n, 1800, threads, &e) != ERR_OK) goto fail;
    printf("links_total_s: %.2f (base tree %.2f, scores %.2f) on %d threads\n", synth_now_s() - t0,
           L->seconds_base, L->seconds_scores, threads);
    printf("links_scored: %zu\n", L->n_on_tree);
    printf("links_skipped_by_tree_rule: %zu\n", L->n - L->n_on_tree);
    {
        double mean = 0;
        for (size_t k = 0; k < L->n; k++) mean += (double)L->l[k].nodes_resettled;
        printf("mean_nodes_resettled_per_scored_link: %.0f of %ld\n",
               L->n_on_tree ? mean / (double)L->n_on_tree : 0.0, (long)network_n_nodes(net));
    }
    /* What one link would cost with a full search instead. */
    {
        link_t full;
        t0 = synth_now_s();
        if (links_score_one_full(L, L->rank[0], net, g->people, &sites, n, 1800, &full, &e) !=
            ERR_OK)
            goto fail;
        printf("one_link_by_full_search_s: %.3f (top link pushed %.0f, full search %.0f)\n",
               (synth_now_s() - t0) / 2.0, L->l[L->rank[0]].pushed_beyond, full.pushed_beyond);
    }
    links_free(L);
    network_free(net);
    roads_free(r);
    grid_free(g);
    return 0;
fail:
    fprintf(stderr, "bench-whatif: %s\n", e.msg);
    return 1;
}

int main(int argc, char **argv)
{
    long cells = 1000000, n_var = 100, link_cells = 490000;
    int threads = 2;
    for (int i = 1; i + 1 < argc; i += 2) {
        if (strcmp(argv[i], "--cells") == 0) cells = atol(argv[i + 1]);
        else if (strcmp(argv[i], "--variants") == 0) n_var = atol(argv[i + 1]);
        else if (strcmp(argv[i], "--link-cells") == 0) link_cells = atol(argv[i + 1]);
        else if (strcmp(argv[i], "--threads") == 0) threads = atoi(argv[i + 1]);
        else {
            fprintf(stderr, "bench-whatif: unknown option '%s'\n", argv[i]);
            return 2;
        }
    }
    setvbuf(stdout, NULL, _IOLBF, 0);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    if (n_var > 0 && bench_variants(cells, n_var)) return 1;
    if (link_cells > 0 && bench_links(link_cells, threads)) return 1;
    return 0;
}

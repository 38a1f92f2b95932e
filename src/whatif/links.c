/* links: critical road links (see include/links.h).
 * Scoring. One igraph nearest-site search gives the base time T of every node and
 * its shortest-path tree (sptree_build; igraph's own tree, since zero-weight
 * connectors make "any tight edge" ambiguous). Closing a link can only lengthen
 * paths that use one of its edges; in a tree those are the nodes below the link's
 * tree edges. Every other
 * node keeps its time. So per link: collect the subtrees S below its tree edges,
 * seed each node of S with its best edge from a node outside S (not through the
 * closed link), and run Dijkstra inside S only. A link with no tree edge changes
 * nothing and is skipped. Workers read the igraph_t arrays directly (the layout of
 * igraph 0.10's public struct, as travel.c does) and never call igraph. */
#include "links.h"

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "output.h"
#include "progress.h"
#include "sptree.h"
#include "table.h"
#include "travel.h"

void links_free(links_t *L)
{
    if (L == NULL) return;
    free(L->l);
    free(L->seg_list);
    free(L->rank);
    free(L);
}

int links_build(const roads_t *r, links_t **out, err_t *e)
{
    links_t *L = NULL;
    size_t *deg = NULL, *start = NULL, *fill = NULL;
    int32_t *inc = NULL;
    uint8_t *done = NULL;
    size_t nn = r->n_nodes, ns = r->n_segs, pos = 0;
    int rc = ERR_OK;

    *out = NULL;
    L = calloc(1, sizeof *L);
    deg = calloc(nn + 1, sizeof *deg);
    start = calloc(nn + 1, sizeof *start);
    fill = calloc(nn + 1, sizeof *fill);
    inc = malloc((2 * ns + 1) * sizeof *inc);
    done = calloc(ns + 1, 1);
    if (L == NULL || !deg || !start || !fill || !inc || !done) goto nomem;
    L->l = calloc(ns + 1, sizeof *L->l);
    L->seg_list = malloc((ns + 1) * sizeof *L->seg_list);
    L->rank = malloc((ns + 1) * sizeof *L->rank);
    if (!L->l || !L->seg_list || !L->rank) goto nomem;
    for (size_t i = 0; i < ns; i++) {
        deg[r->segs[i].a]++;
        deg[r->segs[i].b]++;
    }
    for (size_t v = 0; v < nn; v++) start[v + 1] = start[v] + deg[v];
    for (size_t i = 0; i < ns; i++) {
        inc[start[r->segs[i].a] + fill[r->segs[i].a]++] = (int32_t)i;
        inc[start[r->segs[i].b] + fill[r->segs[i].b]++] = (int32_t)i;
    }
    /* Two passes: chains starting at a boundary node, then pure cycles. */
    for (int pass = 0; pass < 2; pass++) {
        for (size_t v0 = 0; v0 < (pass == 0 ? nn : ns); v0++) {
            size_t n_starts = pass == 0 ? deg[v0] : 1;
            if (pass == 0 && !(r->node_junction[v0] || deg[v0] != 2)) continue;
            for (size_t q = 0; q < n_starts; q++) {
                int32_t s = pass == 0 ? inc[start[v0] + q] : (int32_t)v0;
                int32_t at = pass == 0 ? (int32_t)v0 : r->segs[s].a;
                link_t *lk;
                if (done[s]) continue;
                lk = &L->l[L->n++];
                lk->seg0 = pos;
                lk->node_a = at;
                lk->cls = r->segs[s].cls;
                for (;;) {
                    const road_seg_t *sg = &r->segs[s];
                    int32_t w;
                    done[s] = 1;
                    L->seg_list[pos++] = s;
                    lk->n_segs++;
                    lk->length_m += sg->length_m;
                    if (sg->flags & ROAD_BRIDGE) lk->bridge = 1;
                    w = sg->a == at ? sg->b : sg->a;
                    at = w;
                    if (r->node_junction[w] || deg[w] != 2) break;
                    s = inc[start[w]] == s ? inc[start[w] + 1] : inc[start[w]];
                    if (done[s]) break;
                }
                lk->node_b = at;
            }
        }
    }
    *out = L;
    L = NULL;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory splitting %zu road segments into links", ns);
done:
    links_free(L);
    free(deg);
    free(start);
    free(fill);
    free(inc);
    free(done);
    return rc;
}

/* ---- scoring ---- */

typedef struct ctx {
    links_t *L;
    const network_t *net;
    const double *T;          /* base time per node */
    const double *people;
    int64_t n, n_cells;
    double limit_s;
    int search_in;            /* 1: to_site (the search walks edges backwards) */
    int64_t r0, r1;           /* road edge ids [r0, r1) */
    const int32_t *link_of_redge; /* per road edge: its link */
    const int32_t *tree_child;    /* per road edge: the node below it in the tree, or -1 */
    const int64_t *ch_start;  /* tree children CSR */
    const int32_t *ch;
    const size_t *todo;       /* links to score */
    size_t n_todo;
    atomic_size_t next;
    atomic_int failed;
} ctx_t;

typedef struct hitem {
    double d;
    int32_t v;
} hitem_t;

typedef struct wk {
    int32_t *stamp;
    double *dist;
    int32_t *S;
    size_t nS, capS;
    hitem_t *h;
    size_t nh, caph;
} wk_t;

static int push_S(wk_t *w, int32_t v)
{
    if (w->nS == w->capS) {
        size_t c = w->capS ? 2 * w->capS : 1024;
        int32_t *p = realloc(w->S, c * sizeof *p);
        if (p == NULL) return -1;
        w->S = p;
        w->capS = c;
    }
    w->S[w->nS++] = v;
    return 0;
}

static int hpush(wk_t *w, double d, int32_t v)
{
    size_t i;
    if (w->nh == w->caph) {
        size_t c = w->caph ? 2 * w->caph : 1024;
        hitem_t *p = realloc(w->h, c * sizeof *p);
        if (p == NULL) return -1;
        w->h = p;
        w->caph = c;
    }
    i = w->nh++;
    while (i > 0 && w->h[(i - 1) / 2].d > d) {
        w->h[i] = w->h[(i - 1) / 2];
        i = (i - 1) / 2;
    }
    w->h[i].d = d;
    w->h[i].v = v;
    return 0;
}

static hitem_t hpop(wk_t *w)
{
    hitem_t top = w->h[0], last = w->h[--w->nh];
    size_t i = 0, n = w->nh;
    for (;;) {
        size_t c = 2 * i + 1;
        if (c >= n) break;
        if (c + 1 < n && w->h[c + 1].d < w->h[c].d) c++;
        if (w->h[c].d >= last.d) break;
        w->h[i] = w->h[c];
        i = c;
    }
    if (n > 0) w->h[i] = last;
    return top;
}

static int closed_by(const ctx_t *c, int64_t e, int32_t k)
{
    return e >= c->r0 && e < c->r1 && c->link_of_redge[e - c->r0] == k;
}

/* Score link k with workspace w. */
static int score_link(ctx_t *c, wk_t *w, int32_t k)
{
    const igraph_t *g = network_graph(c->net);
    const igraph_integer_t *from = VECTOR(g->from), *to = VECTOR(g->to);
    const igraph_integer_t *os = VECTOR(g->os), *oi = VECTOR(g->oi);
    const igraph_integer_t *is = VECTOR(g->is), *ii = VECTOR(g->ii);
    const double *wt = VECTOR(*network_weights(c->net));
    /* Search-in edges of v (v's time comes through them) and search-out edges. */
    const igraph_integer_t *in_st = c->search_in ? os : is, *in_ix = c->search_in ? oi : ii;
    const igraph_integer_t *out_st = c->search_in ? is : os, *out_ix = c->search_in ? ii : oi;
    const igraph_integer_t *in_other = c->search_in ? to : from;
    const igraph_integer_t *out_other = c->search_in ? from : to;
    link_t *lk = &c->L->l[k];
    int32_t id = k + 1;

    w->nS = 0;
    w->nh = 0;
    for (size_t q = 0; q < lk->n_segs; q++) {
        int64_t first, n;
        if (!network_seg_edges(c->net, (size_t)c->L->seg_list[lk->seg0 + q], &first, &n)) continue;
        for (int64_t e = first; e < first + n; e++) {
            int32_t root = c->tree_child[e - c->r0];
            if (root < 0 || w->stamp[root] == id) continue;
            /* Depth-first over the subtree, using S itself as the stack. */
            size_t base = w->nS;
            w->stamp[root] = id;
            if (push_S(w, root)) return ERR_NOMEM;
            for (size_t i = base; i < w->nS; i++) {
                int32_t v = w->S[i];
                for (int64_t j = c->ch_start[v]; j < c->ch_start[v + 1]; j++) {
                    int32_t x = c->ch[j];
                    if (w->stamp[x] == id) continue;
                    w->stamp[x] = id;
                    if (push_S(w, x)) return ERR_NOMEM;
                }
            }
        }
    }
    lk->nodes_resettled = w->nS;
    /* Seeds from the boundary. */
    for (size_t i = 0; i < w->nS; i++) {
        int32_t v = w->S[i];
        double best = INFINITY;
        for (igraph_integer_t j = in_st[v]; j < in_st[v + 1]; j++) {
            igraph_integer_t e = in_ix[j], u = in_other[e];
            if (u >= c->n || w->stamp[u] == id || closed_by(c, e, k)) continue;
            double d = c->T[u] + wt[e];
            if (d < best) best = d;
        }
        w->dist[v] = best;
        if (isfinite(best) && hpush(w, best, v)) return ERR_NOMEM;
    }
    while (w->nh > 0) {
        hitem_t it = hpop(w);
        int32_t v = it.v;
        if (it.d > w->dist[v]) continue;
        for (igraph_integer_t j = out_st[v]; j < out_st[v + 1]; j++) {
            igraph_integer_t e = out_ix[j], x = out_other[e];
            if (x >= c->n || w->stamp[x] != id || closed_by(c, e, k)) continue;
            double d = it.d + wt[e];
            if (d < w->dist[x]) {
                w->dist[x] = d;
                if (hpush(w, d, (int32_t)x)) return ERR_NOMEM;
            }
        }
    }
    for (size_t i = 0; i < w->nS; i++) {
        int32_t v = w->S[i];
        double tb = c->T[v], tv = w->dist[v], p;
        if (v >= c->n_cells) continue;
        p = c->people[v];
        if (tb <= c->limit_s && !(tv <= c->limit_s)) lk->pushed_beyond += p;
        if (isfinite(tb) && !isfinite(tv)) lk->cut_off += p;
        if (isfinite(tb) && isfinite(tv)) lk->added_person_h += p * (tv - tb) / 3600.0;
    }
    return ERR_OK;
}

static void *worker(void *arg)
{
    ctx_t *c = arg;
    wk_t w = {0};
    w.stamp = calloc((size_t)c->n, sizeof *w.stamp);
    w.dist = malloc((size_t)c->n * sizeof *w.dist);
    if (w.stamp == NULL || w.dist == NULL) {
        atomic_store(&c->failed, 1);
        goto done;
    }
    for (;;) {
        size_t q = atomic_fetch_add(&c->next, 1);
        if (q >= c->n_todo || atomic_load(&c->failed)) break;
        if (score_link(c, &w, (int32_t)c->todo[q]) != ERR_OK) {
            atomic_store(&c->failed, 1);
            break;
        }
    }
done:
    free(w.stamp);
    free(w.dist);
    free(w.S);
    free(w.h);
    return NULL;
}

/* Ranking keys copied out of the links, so qsort needs no outside state. */
typedef struct rank_key {
    double pushed, cut, hours;
    int bridge;
    size_t idx;
} rank_key_t;

static int cmp_links(const void *a, const void *b)
{
    const rank_key_t *x = a, *y = b;
    if (x->pushed != y->pushed) return x->pushed < y->pushed ? 1 : -1;
    if (x->cut != y->cut) return x->cut < y->cut ? 1 : -1;
    if (x->hours != y->hours) return x->hours < y->hours ? 1 : -1;
    if (x->bridge != y->bridge) return x->bridge ? -1 : 1;
    return (x->idx > y->idx) - (x->idx < y->idx);
}

static int site_nodes(const network_t *net, const points_t *sites, int nx, int64_t **out,
                      err_t *e)
{
    *out = malloc((sites->n ? sites->n : 1) * sizeof **out);
    if (*out == NULL) return err_set(e, ERR_NOMEM, "out of memory for %zu sites", sites->n);
    for (size_t i = 0; i < sites->n; i++)
        (*out)[i] = network_cell_node(net, (int)(sites->cell[i] % nx), (int)(sites->cell[i] / nx));
    return ERR_OK;
}

int links_score(links_t *L, network_t *net, const double *people, const points_t *sites,
                int nx, double limit_s, int n_threads, err_t *e)
{
    sptree_t tree = {0};
    int64_t *nodes = NULL;
    int32_t *tree_child = NULL, *link_of_redge = NULL;
    size_t *todo = NULL;
    pthread_t *th = NULL;
    ctx_t c;
    int rc = ERR_OK;
    double t0 = 0;
    int64_t n = network_n_nodes(net), r0 = 0, r1 = 0;
    size_t nseg = network_n_segs(net);

    memset(&c, 0, sizeof c);
    if (sites == NULL || sites->n == 0)
        return err_set(e, ERR_INPUT, "critical links need open sites; give a point layer in "
                       "sites.existing");
    if ((rc = site_nodes(net, sites, nx, &nodes, e)) != ERR_OK) goto done;
    t0 = progress_now();
    if ((rc = sptree_build(net, nodes, sites->n, &tree, e)) != ERR_OK) goto done;
    L->seconds_base = progress_now() - t0;
    t0 += L->seconds_base;
    if (nseg > 0) {
        int64_t f, m;
        network_seg_edges(net, 0, &r0, &m);
        network_seg_edges(net, nseg - 1, &f, &m);
        r1 = f + m;
    }
    tree_child = malloc((size_t)(r1 - r0 + 1) * sizeof *tree_child);
    link_of_redge = malloc((size_t)(r1 - r0 + 1) * sizeof *link_of_redge);
    todo = malloc((L->n + 1) * sizeof *todo);
    if (!tree_child || !link_of_redge || !todo) goto nomem;
    for (int64_t k = 0; k < r1 - r0; k++) {
        tree_child[k] = -1;
        link_of_redge[k] = -1;
    }
    for (size_t k = 0; k < L->n; k++)
        for (size_t q = 0; q < L->l[k].n_segs; q++) {
            int64_t f, m;
            if (!network_seg_edges(net, (size_t)L->seg_list[L->l[k].seg0 + q], &f, &m)) continue;
            for (int64_t x = f; x < f + m; x++) link_of_redge[x - r0] = (int32_t)k;
        }
    /* The tree edge above each node: mark the road edges among them. */
    for (int64_t v = 0; v < n; v++) {
        int64_t pe = tree.inbound[v];
        if (pe >= r0 && pe < r1) tree_child[pe - r0] = (int32_t)v;
    }
    c.search_in = network_search_mode(net) == IGRAPH_IN;
    L->n_on_tree = 0;
    for (size_t k = 0; k < L->n; k++) {
        link_t *lk = &L->l[k];
        lk->on_tree = 0;
        lk->pushed_beyond = lk->cut_off = lk->added_person_h = 0;
        lk->nodes_resettled = 0;
        for (size_t q = 0; q < lk->n_segs && !lk->on_tree; q++) {
            int64_t f, m;
            if (!network_seg_edges(net, (size_t)L->seg_list[lk->seg0 + q], &f, &m)) continue;
            for (int64_t x = f; x < f + m; x++)
                if (tree_child[x - r0] >= 0) lk->on_tree = 1;
        }
        if (lk->on_tree) todo[L->n_on_tree++] = k;
    }

    c.L = L;
    c.net = net;
    c.T = tree.time_s;
    c.people = people;
    c.n = n;
    c.n_cells = network_n_cells(net);
    c.limit_s = limit_s;
    c.r0 = r0;
    c.r1 = r1;
    c.link_of_redge = link_of_redge;
    c.tree_child = tree_child;
    c.ch_start = tree.ch_start;
    c.ch = tree.ch;
    c.todo = todo;
    c.n_todo = L->n_on_tree;
    atomic_init(&c.next, 0);
    atomic_init(&c.failed, 0);
    if (n_threads <= 0) {
        long nc = sysconf(_SC_NPROCESSORS_ONLN);
        n_threads = nc > 0 ? (int)nc : 1;
    }
    if ((size_t)n_threads > c.n_todo) n_threads = c.n_todo > 0 ? (int)c.n_todo : 1;
    if (n_threads <= 1) {
        worker(&c);
    } else {
        int started = 0;
        th = malloc((size_t)n_threads * sizeof *th);
        if (th == NULL) goto nomem;
        for (int i = 0; i < n_threads; i++) {
            if (pthread_create(&th[i], NULL, worker, &c) != 0) break;
            started++;
        }
        if (started == 0) worker(&c);
        for (int i = 0; i < started; i++) pthread_join(th[i], NULL);
    }
    if (atomic_load(&c.failed)) goto nomem;
    {
        rank_key_t *keys = malloc((L->n ? L->n : 1) * sizeof *keys);
        if (keys == NULL) goto nomem;
        for (size_t k = 0; k < L->n; k++)
            keys[k] = (rank_key_t){L->l[k].pushed_beyond, L->l[k].cut_off,
                                   L->l[k].added_person_h, L->l[k].bridge, k};
        qsort(keys, L->n, sizeof *keys, cmp_links);
        for (size_t k = 0; k < L->n; k++) L->rank[k] = keys[k].idx;
        free(keys);
    }
    L->seconds_scores = progress_now() - t0;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory scoring %zu road links", L->n);
done:
    sptree_destroy(&tree);
    free(nodes);
    free(tree_child);
    free(link_of_redge);
    free(todo);
    free(th);
    return rc;
}

int links_score_one_full(const links_t *L, size_t k, network_t *net, const double *people,
                         const points_t *sites, int nx, double limit_s, link_t *out, err_t *e)
{
    travel_result_t *base = NULL, *var = NULL;
    int64_t *nodes = NULL;
    int64_t nc = network_n_cells(net);
    int rc;

    *out = L->l[k];
    out->pushed_beyond = out->cut_off = out->added_person_h = 0;
    if ((rc = site_nodes(net, sites, nx, &nodes, e)) != ERR_OK) goto done;
    if ((rc = travel_nearest(net, nodes, sites->n, &base, e)) != ERR_OK) goto done;
    for (size_t q = 0; q < L->l[k].n_segs; q++) {
        int64_t f, m;
        if (!network_seg_edges(net, (size_t)L->seg_list[L->l[k].seg0 + q], &f, &m)) continue;
        for (int64_t x = f; x < f + m; x++)
            if ((rc = network_edit_edge(net, x, INFINITY, e)) != ERR_OK) goto done;
    }
    if ((rc = travel_nearest(net, nodes, sites->n, &var, e)) != ERR_OK) goto done;
    for (int64_t v = 0; v < nc; v++) {
        double tb = base->time_s[v], tv = var->time_s[v], p = people[v];
        if (tb <= limit_s && !(tv <= limit_s)) out->pushed_beyond += p;
        if (isfinite(tb) && !isfinite(tv)) out->cut_off += p;
        if (isfinite(tb) && isfinite(tv)) out->added_person_h += p * (tv - tb) / 3600.0;
    }
done:
    network_edit_reset(net);
    travel_result_free(base);
    travel_result_free(var);
    free(nodes);
    return rc;
}

/* ---- outputs ---- */

static table_t *links_table(const roads_t *r, const links_t *L)
{
    static const char *names[] = {"rank", "link", "road_id", "class", "bridge", "length_km",
                                  "segments", "on_tree", "pushed_beyond_limit", "cut_off",
                                  "added_person_hours", "nodes_resettled"};
    static const int types[] = {TABLE_INT, TABLE_INT, TABLE_TEXT, TABLE_TEXT, TABLE_INT,
                                TABLE_REAL, TABLE_INT, TABLE_INT, TABLE_REAL, TABLE_REAL,
                                TABLE_REAL, TABLE_INT};
    table_t *t = table_new(12, names, types);
    for (size_t q = 0; t != NULL && q < L->n; q++) {
        const link_t *lk = &L->l[L->rank[q]];
        const road_seg_t *sg = &r->segs[L->seg_list[lk->seg0]];
        long row = table_add_row(t);
        if (row < 0) {
            table_free(t);
            return NULL;
        }
        table_set_num(t, (size_t)row, 0, (double)(q + 1));
        table_set_num(t, (size_t)row, 1, (double)L->rank[q]);
        table_set_text(t, (size_t)row, 2, r->feature_ids[sg->feature]);
        table_set_text(t, (size_t)row, 3, r->classes[lk->cls].name);
        table_set_num(t, (size_t)row, 4, lk->bridge);
        table_set_num(t, (size_t)row, 5, lk->length_m / 1000.0);
        table_set_num(t, (size_t)row, 6, (double)lk->n_segs);
        table_set_num(t, (size_t)row, 7, lk->on_tree);
        table_set_num(t, (size_t)row, 8, lk->pushed_beyond);
        table_set_num(t, (size_t)row, 9, lk->cut_off);
        table_set_num(t, (size_t)row, 10, lk->added_person_h);
        table_set_num(t, (size_t)row, 11, (double)lk->nodes_resettled);
    }
    return t;
}

int links_write(const char *outdir, const inputs_t *in, const links_t *L, cJSON *summary,
                err_t *e)
{
    const roads_t *r = in->roads;
    table_t *t = links_table(r, L);
    double *x = NULL, *y = NULL;
    size_t *start = NULL, k = 0;
    char *p = NULL;
    int rc = ERR_OK;

    x = malloc((r->n_segs + L->n + 1) * sizeof *x);
    y = malloc((r->n_segs + L->n + 1) * sizeof *y);
    start = malloc((L->n + 1) * sizeof *start);
    if (t == NULL || !x || !y || !start) {
        rc = err_set(e, ERR_NOMEM, "out of memory writing road links");
        goto done;
    }
    for (size_t q = 0; q < L->n; q++) {
        const link_t *lk = &L->l[L->rank[q]];
        int32_t at = lk->node_a;
        start[q] = k;
        x[k] = r->x[at];
        y[k++] = r->y[at];
        for (size_t j = 0; j < lk->n_segs; j++) {
            const road_seg_t *sg = &r->segs[L->seg_list[lk->seg0 + j]];
            at = sg->a == at ? sg->b : sg->a;
            x[k] = r->x[at];
            y[k++] = r->y[at];
        }
    }
    start[L->n] = k;
    if ((rc = table_save(t, outdir, "links.csv", e)) != ERR_OK) goto done;
    if ((p = out_join(outdir, "links.gpkg")) == NULL) goto nomem;
    if ((rc = out_write_lines_gpkg(p, "links", in->grid->wkt, x, y, start, t, e)) != ERR_OK)
        goto done;
    {
        cJSON *lj = cJSON_AddObjectToObject(summary, "links"), *top, *files;
        size_t nb = 0;
        for (size_t i = 0; i < L->n; i++) nb += L->l[i].bridge;
        cJSON_AddNumberToObject(lj, "limit_min", in->scen->limit_s / 60.0);
        cJSON_AddNumberToObject(lj, "links", (double)L->n);
        cJSON_AddNumberToObject(lj, "bridges", (double)nb);
        cJSON_AddNumberToObject(lj, "links_scored", (double)L->n_on_tree);
        cJSON_AddNumberToObject(lj, "links_skipped_by_tree_rule", (double)(L->n - L->n_on_tree));
        top = cJSON_AddArrayToObject(lj, "top");
        for (size_t q = 0; q < L->n && q < 10; q++) {
            cJSON *o = cJSON_CreateObject();
            cJSON_AddNumberToObject(o, "rank", (double)(q + 1));
            cJSON_AddStringToObject(o, "road_id", table_text(t, q, 2));
            cJSON_AddStringToObject(o, "class", table_text(t, q, 3));
            cJSON_AddBoolToObject(o, "bridge", L->l[L->rank[q]].bridge);
            cJSON_AddNumberToObject(o, "pushed_beyond_limit", L->l[L->rank[q]].pushed_beyond);
            cJSON_AddNumberToObject(o, "cut_off", L->l[L->rank[q]].cut_off);
            cJSON_AddNumberToObject(o, "added_person_hours", L->l[L->rank[q]].added_person_h);
            cJSON_AddItemToArray(top, o);
        }
        files = cJSON_AddObjectToObject(lj, "files");
        cJSON_AddStringToObject(files, "ranking", "links.csv");
        cJSON_AddStringToObject(files, "links", "links.gpkg");
        cJSON_AddNumberToObject(lj, "seconds_base_search", L->seconds_base);
        cJSON_AddNumberToObject(lj, "seconds_scores", L->seconds_scores);
    }
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory writing road links");
done:
    free(p);
    free(x);
    free(y);
    free(start);
    table_free(t);
    return rc;
}

void links_print(const inputs_t *in, const links_t *L, size_t top)
{
    const roads_t *r = in->roads;
    size_t nb = 0;
    for (size_t i = 0; i < L->n; i++) nb += L->l[i].bridge;
    printf("%zu road links (%zu bridges); %zu on the nearest-site tree scored, %zu skipped "
           "(closing them changes no travel time)\n", L->n, nb, L->n_on_tree,
           L->n - L->n_on_tree);
    printf("most critical links (closing one alone; limit %g min):\n", in->scen->limit_s / 60.0);
    printf("  %-4s %-12s %-12s %-6s %9s %12s %10s %14s\n", "rank", "road", "class", "bridge",
           "km", "pushed out", "cut off", "+person-hours");
    for (size_t q = 0; q < L->n && q < top; q++) {
        const link_t *lk = &L->l[L->rank[q]];
        const road_seg_t *sg = &r->segs[L->seg_list[lk->seg0]];
        printf("  %-4zu %-12.12s %-12.12s %-6s %9.2f %12.0f %10.0f %14.0f\n", q + 1,
               r->feature_ids[sg->feature], r->classes[lk->cls].name, lk->bridge ? "yes" : "no",
               lk->length_m / 1000.0, lk->pushed_beyond, lk->cut_off, lk->added_person_h);
    }
    /* Bridges are the usual single points of failure: list each with its rank. */
    if (nb > 0) {
        size_t shown = 0;
        printf("bridges:");
        for (size_t q = 0; q < L->n && shown < 20; q++) {
            const link_t *lk = &L->l[L->rank[q]];
            if (!lk->bridge) continue;
            printf("%s %s rank %zu (%.0f pushed out, %.0f cut off)", shown ? "," : "",
                   r->feature_ids[r->segs[L->seg_list[lk->seg0]].feature], q + 1,
                   lk->pushed_beyond, lk->cut_off);
            shown++;
        }
        printf("%s\n", nb > shown ? ", ..." : "");
    }
}

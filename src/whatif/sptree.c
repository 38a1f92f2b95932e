/* sptree: a nearest-site search tree and its repair (see include/sptree.h).
 * Why the repair is exact: every weight change is an increase (or a closure), so no
 * node gets closer; a node whose tree path uses no changed edge and no closed site
 * keeps its time and label, because that path is still there and nothing got
 * shorter. The nodes whose tree path does use one are exactly the subtrees below
 * the changed tree edges and the closed sites. Each of them is seeded with its
 * best edge from an unchanged node, and Dijkstra runs inside the subtrees. The
 * graph is read through igraph_t's public arrays (as travel.c does). */
#include "sptree.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void sptree_destroy(sptree_t *t)
{
    if (t == NULL) return;
    free(t->time_s);
    free(t->site);
    free(t->inbound);
    free(t->ch_start);
    free(t->ch);
    memset(t, 0, sizeof *t);
}

/* Search-in edges of v: the edges through which v gets its time (out-edges when
 * people travel to the site and the search walks edges backwards). */
typedef struct adj {
    const igraph_integer_t *in_st, *in_ix, *in_other, *out_st, *out_ix, *out_other;
    const double *w;
} adj_t;

static void get_adj(const network_t *net, adj_t *a)
{
    const igraph_t *g = network_graph(net);
    int s_in = network_search_mode(net) == IGRAPH_IN;
    a->in_st = s_in ? VECTOR(g->os) : VECTOR(g->is);
    a->in_ix = s_in ? VECTOR(g->oi) : VECTOR(g->ii);
    a->in_other = s_in ? VECTOR(g->to) : VECTOR(g->from);
    a->out_st = s_in ? VECTOR(g->is) : VECTOR(g->os);
    a->out_ix = s_in ? VECTOR(g->ii) : VECTOR(g->oi);
    a->out_other = s_in ? VECTOR(g->from) : VECTOR(g->to);
    a->w = VECTOR(*network_weights(net));
}

int sptree_build(network_t *net, const int64_t *site_nodes, size_t n_sites, sptree_t *t,
                 err_t *e)
{
    int64_t n = network_n_nodes(net), *fill = NULL;
    int32_t *order = NULL;
    size_t head = 0, tail = 0;
    adj_t a;
    int rc;

    memset(t, 0, sizeof *t);
    t->n = n;
    t->time_s = malloc((size_t)n * sizeof *t->time_s);
    t->site = malloc((size_t)n * sizeof *t->site);
    t->inbound = malloc((size_t)n * sizeof *t->inbound);
    t->ch_start = calloc((size_t)n + 1, sizeof *t->ch_start);
    t->ch = malloc(((size_t)n + 1) * sizeof *t->ch);
    fill = malloc(((size_t)n + 1) * sizeof *fill);
    order = malloc(((size_t)n + 1) * sizeof *order);
    if (!t->time_s || !t->site || !t->inbound || !t->ch_start || !t->ch || !fill || !order) {
        rc = err_set(e, ERR_NOMEM, "out of memory for the search tree of %ld nodes", (long)n);
        goto done;
    }
    if ((rc = network_search_tree(net, site_nodes, n_sites, t->inbound, e)) != ERR_OK) goto done;
    get_adj(net, &a);
    for (int64_t v = 0; v < n; v++)
        if (t->inbound[v] >= 0) t->ch_start[a.in_other[t->inbound[v]] + 1]++;
    for (int64_t v = 0; v < n; v++) t->ch_start[v + 1] += t->ch_start[v];
    memcpy(fill, t->ch_start, ((size_t)n + 1) * sizeof *fill);
    for (int64_t v = 0; v < n; v++)
        if (t->inbound[v] >= 0) t->ch[fill[a.in_other[t->inbound[v]]]++] = (int32_t)v;
    for (int64_t v = 0; v < n; v++) {
        t->time_s[v] = INFINITY;
        t->site[v] = -1;
    }
    /* Roots: a node listed twice keeps its first index (as travel_nearest). */
    for (size_t i = n_sites; i-- > 0;) {
        int64_t v = site_nodes[i];
        if (v >= 0 && v < n && t->inbound[v] == -1) {
            t->time_s[v] = 0.0;
            t->site[v] = (int32_t)i;
        }
    }
    for (int64_t v = 0; v < n; v++)
        if (t->inbound[v] == -1) order[tail++] = (int32_t)v;
    while (head < tail) {
        int32_t u = order[head++];
        for (int64_t j = t->ch_start[u]; j < t->ch_start[u + 1]; j++) {
            int32_t v = t->ch[j];
            t->time_s[v] = t->time_s[u] + a.w[t->inbound[v]];
            t->site[v] = t->site[u];
            order[tail++] = v;
        }
    }
done:
    free(fill);
    free(order);
    if (rc != ERR_OK) sptree_destroy(t);
    return rc;
}

typedef struct hitem {
    double d;
    int32_t v;
} hitem_t;

static int hpush(hitem_t **h, size_t *n, size_t *cap, double d, int32_t v)
{
    size_t i;
    if (*n == *cap) {
        size_t c = *cap ? 2 * *cap : 1024;
        hitem_t *p = realloc(*h, c * sizeof *p);
        if (p == NULL) return -1;
        *h = p;
        *cap = c;
    }
    i = (*n)++;
    while (i > 0 && (*h)[(i - 1) / 2].d > d) {
        (*h)[i] = (*h)[(i - 1) / 2];
        i = (i - 1) / 2;
    }
    (*h)[i].d = d;
    (*h)[i].v = v;
    return 0;
}

static hitem_t hpop(hitem_t *h, size_t *n)
{
    hitem_t top = h[0], last = h[--(*n)];
    size_t i = 0;
    for (;;) {
        size_t c = 2 * i + 1;
        if (c >= *n) break;
        if (c + 1 < *n && h[c + 1].d < h[c].d) c++;
        if (h[c].d >= last.d) break;
        h[i] = h[c];
        i = c;
    }
    if (*n > 0) h[i] = last;
    return top;
}

int sptree_resettle(const sptree_t *t, const network_t *net, const int64_t *changed,
                    size_t n_changed, const uint8_t *site_closed, size_t n_sites,
                    double *time_out, int32_t *site_out, size_t *n_resettled, err_t *e)
{
    int64_t n = t->n;
    uint8_t *in_s = calloc((size_t)n, 1);
    int32_t *S = NULL;
    size_t nS = 0, capS = 0, nh = 0, caph = 0;
    hitem_t *h = NULL;
    int search_in = network_search_mode(net) == IGRAPH_IN;
    const igraph_t *g = network_graph(net);
    const igraph_integer_t *head = search_in ? VECTOR(g->from) : VECTOR(g->to);
    int64_t n_edges = network_n_edges(net);
    adj_t a;
    int rc = ERR_OK;

    if (in_s == NULL) goto nomem;
    get_adj(net, &a);
    memcpy(time_out, t->time_s, (size_t)n * sizeof *time_out);
    memcpy(site_out, t->site, (size_t)n * sizeof *site_out);
    /* Roots of the subtrees that can change. */
    for (size_t i = 0; i <= n_changed; i++) {
        /* i < n_changed: the node a changed edge settles (if it is its tree edge). */
        int64_t lo = 0, hi = 0;
        if (i < n_changed) {
            int64_t ed = changed[i];
            if (ed < 0 || ed >= n_edges) continue;
            int64_t v = head[ed];
            if (v >= n || t->inbound[v] != ed || in_s[v]) continue;
            lo = v;
            hi = v + 1;
        } else if (site_closed != NULL) {
            lo = 0;
            hi = n;   /* closed sites: scan the roots */
        }
        for (int64_t v = lo; v < hi; v++) {
            if (i == n_changed && !(t->inbound[v] == -1 && t->site[v] >= 0 &&
                                    (size_t)t->site[v] < n_sites && site_closed[t->site[v]]))
                continue;
            if (in_s[v]) continue;
            size_t base = nS;
            if (nS == capS) {
                size_t c = capS ? 2 * capS : 1024;
                int32_t *p = realloc(S, c * sizeof *p);
                if (p == NULL) goto nomem;
                S = p;
                capS = c;
            }
            S[nS++] = (int32_t)v;
            in_s[v] = 1;
            for (size_t k = base; k < nS; k++) {
                int32_t x = S[k];
                for (int64_t j = t->ch_start[x]; j < t->ch_start[x + 1]; j++) {
                    int32_t y = t->ch[j];
                    if (in_s[y]) continue;
                    if (nS == capS) {
                        size_t c = 2 * capS;
                        int32_t *p = realloc(S, c * sizeof *p);
                        if (p == NULL) goto nomem;
                        S = p;
                        capS = c;
                    }
                    S[nS++] = y;
                    in_s[y] = 1;
                }
            }
        }
    }
    /* Seeds from the boundary, on the current weights. A closed site is no source:
     * its time comes from its neighbours like any node's. */
    for (size_t k = 0; k < nS; k++) {
        int32_t v = S[k];
        double best = INFINITY;
        int32_t lab = -1;
        for (igraph_integer_t j = a.in_st[v]; j < a.in_st[v + 1]; j++) {
            igraph_integer_t ed = a.in_ix[j], u = a.in_other[ed];
            if (u >= n || in_s[u]) continue;
            double d = time_out[u] + a.w[ed];
            if (d < best) {
                best = d;
                lab = site_out[u];
            }
        }
        time_out[v] = best;
        site_out[v] = isfinite(best) ? lab : -1;
        if (isfinite(best) && hpush(&h, &nh, &caph, best, v)) goto nomem;
    }
    while (nh > 0) {
        hitem_t it = hpop(h, &nh);
        int32_t v = it.v;
        if (it.d > time_out[v]) continue;
        for (igraph_integer_t j = a.out_st[v]; j < a.out_st[v + 1]; j++) {
            igraph_integer_t ed = a.out_ix[j], x = a.out_other[ed];
            if (x >= n || !in_s[x]) continue;
            double d = it.d + a.w[ed];
            if (d < time_out[x]) {
                time_out[x] = d;
                site_out[x] = site_out[v];
                if (hpush(&h, &nh, &caph, d, (int32_t)x)) goto nomem;
            }
        }
    }
    if (n_resettled != NULL) *n_resettled = nS;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory re-settling the search tree");
done:
    free(in_s);
    free(S);
    free(h);
    return rc;
}

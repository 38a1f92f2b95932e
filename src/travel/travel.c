/* travel: shortest-path runs on the travel network (see include/travel.h).
 * The nearest-site pass is one igraph Dijkstra from the virtual source; igraph gives
 * the shortest-path tree (parents and inbound edges) but no distances along with it,
 * so distances and site labels are rebuilt from the tree in O(nodes).
 * Bounded searches are our own Dijkstra with a lazy binary heap over the graph's
 * own index vectors. Why not igraph: its cutoff search resets a dense result per
 * call (about 110 ms at 10M cells whatever the cutoff) and igraph is not thread-safe;
 * igraph_lazy_inclist would add about 90 bytes per node per thread. The igraph_t
 * struct is public in igraph_datatype.h (0.10): edge e runs from[e] -> to[e]; the
 * out-edges of v are oi[os[v] .. os[v+1]-1], the in-edges ii[is[v] .. is[v+1]-1].
 * Reading them needs no copy and no igraph call, so threads can share the graph.
 * tests/test_travel.c compares these searches with igraph_distances_dijkstra, which
 * would catch a change of that layout in a later igraph. */
#include "travel.h"

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>

void travel_result_free(travel_result_t *r)
{
    if (r == NULL) return;
    free(r->time_s);
    free(r->site);
    free(r);
}

/* Site index per node for the nodes joined to the virtual source: sorted pairs. */
typedef struct site_key {
    int64_t node;
    int32_t idx;
} site_key_t;

static int cmp_site_key(const void *a, const void *b)
{
    const site_key_t *x = a, *y = b;
    if (x->node != y->node) return (x->node > y->node) - (x->node < y->node);
    return (x->idx > y->idx) - (x->idx < y->idx);
}

static int32_t site_of(const site_key_t *keys, size_t n, int64_t node)
{
    size_t lo = 0, hi = n;
    while (lo < hi) {   /* first entry with keys[i].node >= node */
        size_t mid = lo + (hi - lo) / 2;
        if (keys[mid].node < node) lo = mid + 1;
        else hi = mid;
    }
    return lo < n && keys[lo].node == node ? keys[lo].idx : -1;
}

/* Distances and site labels from igraph's shortest-path tree. time_s starts as NaN
 * ("not yet known"); each node is finished once: walk up its parents to a finished
 * node (or a child of the root), then unwind, adding the inbound edge's weight.
 * The sums are the same as Dijkstra's own (parent's distance plus edge weight), so
 * the times equal igraph's distances exactly. */
static int rebuild_from_tree(const network_t *net, const igraph_vector_int_t *parents,
                             const igraph_vector_int_t *inbound, const site_key_t *keys,
                             size_t n_keys, travel_result_t *res, err_t *e)
{
    const igraph_vector_t *w = network_weights(net);
    int64_t virt = network_virtual_node(net), n = res->n_nodes;
    int64_t *stack = NULL;
    size_t cap = 1024, top = 0;
    int rc = ERR_OK;

    stack = malloc(cap * sizeof *stack);
    if (stack == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory rebuilding travel times");
        goto done;
    }
    for (int64_t v = 0; v < n; v++) res->time_s[v] = NAN;
    for (int64_t v = 0; v < n; v++) {
        if (!isnan(res->time_s[v])) continue;
        int64_t u = v;
        /* Climb until the parent is the root, unreachable (-2), or already known. */
        for (;;) {
            int64_t p = VECTOR(*parents)[u];
            if (p < 0 || p == virt) break;
            if (!isnan(res->time_s[p])) break;
            if (top == cap) {
                int64_t *bigger = realloc(stack, 2 * cap * sizeof *stack);
                if (bigger == NULL) {
                    rc = err_set(e, ERR_NOMEM, "out of memory rebuilding travel times");
                    goto done;
                }
                stack = bigger;
                cap *= 2;
            }
            stack[top++] = u;
            u = p;
        }
        /* u's parent is the root, unreachable, or known: finish u, then the stack. */
        for (;;) {
            int64_t p = VECTOR(*parents)[u];
            if (p < 0) {
                res->time_s[u] = INFINITY;
                res->site[u] = -1;
            } else if (p == virt) {
                res->time_s[u] = VECTOR(*w)[VECTOR(*inbound)[u]];   /* 0 */
                res->site[u] = site_of(keys, n_keys, u);
            } else {
                res->time_s[u] = res->time_s[p] + VECTOR(*w)[VECTOR(*inbound)[u]];
                /* igraph also "reaches" nodes through +inf edges (closed by a
                 * what-if variant), at infinite distance: those have no site. */
                res->site[u] = isfinite(res->time_s[u]) ? res->site[p] : -1;
            }
            if (top == 0) break;
            u = stack[--top];
        }
    }
done:
    free(stack);
    return rc;
}

int travel_nearest(network_t *net, const int64_t *site_nodes, size_t n_sites,
                   travel_result_t **out, err_t *e)
{
    travel_result_t *res = NULL;
    site_key_t *keys = NULL;
    igraph_vector_int_t parents, inbound;
    int par_ok = 0, inb_ok = 0, attached = 0, rc = ERR_OK;
    int64_t n = network_n_nodes(net);

    *out = NULL;
    if (n_sites > (size_t)INT32_MAX) {
        rc = err_set(e, ERR_INPUT, "nearest-site search: %zu sites is too many", n_sites);
        goto done;
    }
    for (size_t i = 0; i < n_sites; i++) {
        if (site_nodes[i] < 0 || site_nodes[i] >= n) {
            rc = err_set(e, ERR_INPUT, "nearest-site search: site %zu is node %ld, but the "
                         "travel network has nodes 0..%ld", i, (long)site_nodes[i], (long)n - 1);
            goto done;
        }
    }
    res = calloc(1, sizeof *res);
    keys = malloc((n_sites ? n_sites : 1) * sizeof *keys);
    if (res == NULL || keys == NULL) goto nomem;
    res->n_nodes = n;
    res->n_cells = network_n_cells(net);
    for (size_t i = 0; i < n_sites; i++) {
        keys[i].node = site_nodes[i];
        keys[i].idx = (int32_t)i;
    }
    /* Sorted by node then index, so site_of() finds the first index of a node. */
    qsort(keys, n_sites, sizeof *keys, cmp_site_key);

    if (n_sites == 0) {
        res->time_s = malloc((size_t)n * sizeof *res->time_s);
        res->site = malloc((size_t)n * sizeof *res->site);
        if (res->time_s == NULL || res->site == NULL) goto nomem;
        for (int64_t v = 0; v < n; v++) {
            res->time_s[v] = INFINITY;
            res->site[v] = -1;
        }
        goto finish;
    }

    rc = network_attach_sources(net, site_nodes, n_sites, e);
    if (rc != ERR_OK) goto done;
    attached = 1;
    if (igraph_vector_int_init(&parents, 0) != IGRAPH_SUCCESS) goto nomem;
    par_ok = 1;
    if (igraph_vector_int_init(&inbound, 0) != IGRAPH_SUCCESS) goto nomem;
    inb_ok = 1;
    {
        igraph_error_t ie = igraph_get_shortest_paths_dijkstra(
            network_graph(net), NULL, NULL, network_virtual_node(net), igraph_vss_all(),
            network_weights(net), network_search_mode(net), &parents, &inbound);
        if (ie != IGRAPH_SUCCESS) {
            rc = err_set(e, ie == IGRAPH_ENOMEM ? ERR_NOMEM : ERR_GRAPH,
                         "nearest-site search from %zu sites failed in igraph: %s", n_sites,
                         igraph_strerror(ie));
            goto done;
        }
    }
    /* The result arrays come after igraph has freed its search state. */
    res->time_s = malloc((size_t)n * sizeof *res->time_s);
    res->site = malloc((size_t)n * sizeof *res->site);
    if (res->time_s == NULL || res->site == NULL) goto nomem;
    rc = rebuild_from_tree(net, &parents, &inbound, keys, n_sites, res, e);
    if (rc != ERR_OK) goto done;

finish:
    *out = res;
    res = NULL;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory for the nearest-site search over %ld nodes",
                 (long)n);
done:
    if (attached) network_detach_sources(net);
    if (par_ok) igraph_vector_int_destroy(&parents);
    if (inb_ok) igraph_vector_int_destroy(&inbound);
    free(keys);
    travel_result_free(res);
    return rc;
}

/* ---- bounded searches ---- */

typedef struct heap_item {
    double d;        /* seconds */
    int32_t v;       /* node */
} heap_item_t;

struct travel_ws {
    int64_t n;           /* nodes covered (cells + road nodes) */
    double *dist;        /* n entries, +inf outside the current search */
    int32_t *touched;    /* nodes whose dist was written */
    size_t n_touched, cap_touched;
    heap_item_t *heap;   /* lazy binary min-heap: stale entries are skipped on pop */
    size_t n_heap, cap_heap;
};

void travel_reach_destroy(travel_reach_t *r)
{
    if (r == NULL) return;
    free(r->cell);
    free(r->time_s);
    r->cell = NULL;
    r->time_s = NULL;
    r->n = 0;
}

int travel_ws_new(const network_t *net, travel_ws_t **out, err_t *e)
{
    travel_ws_t *ws = calloc(1, sizeof *ws);
    *out = NULL;
    if (ws == NULL) goto nomem;
    ws->n = network_n_nodes(net);
    ws->dist = malloc((size_t)ws->n * sizeof *ws->dist);
    ws->cap_touched = 4096;
    ws->touched = malloc(ws->cap_touched * sizeof *ws->touched);
    ws->cap_heap = 4096;
    ws->heap = malloc(ws->cap_heap * sizeof *ws->heap);
    if (ws->dist == NULL || ws->touched == NULL || ws->heap == NULL) goto nomem;
    for (int64_t v = 0; v < ws->n; v++) ws->dist[v] = INFINITY;
    *out = ws;
    return ERR_OK;
nomem:
    travel_ws_free(ws);
    return err_set(e, ERR_NOMEM, "out of memory for a search workspace of %ld nodes",
                   (long)network_n_nodes(net));
}

void travel_ws_free(travel_ws_t *ws)
{
    if (ws == NULL) return;
    free(ws->dist);
    free(ws->touched);
    free(ws->heap);
    free(ws);
}

static int heap_push(travel_ws_t *ws, double d, int32_t v)
{
    if (ws->n_heap == ws->cap_heap) {
        heap_item_t *p = realloc(ws->heap, 2 * ws->cap_heap * sizeof *p);
        if (p == NULL) return ERR_NOMEM;
        ws->heap = p;
        ws->cap_heap *= 2;
    }
    size_t i = ws->n_heap++;
    while (i > 0) {
        size_t parent = (i - 1) / 2;
        if (ws->heap[parent].d <= d) break;
        ws->heap[i] = ws->heap[parent];
        i = parent;
    }
    ws->heap[i].d = d;
    ws->heap[i].v = v;
    return ERR_OK;
}

static heap_item_t heap_pop(travel_ws_t *ws)
{
    heap_item_t top = ws->heap[0], last = ws->heap[--ws->n_heap];
    size_t i = 0, n = ws->n_heap;
    for (;;) {
        size_t c = 2 * i + 1;
        if (c >= n) break;
        if (c + 1 < n && ws->heap[c + 1].d < ws->heap[c].d) c++;
        if (ws->heap[c].d >= last.d) break;
        ws->heap[i] = ws->heap[c];
        i = c;
    }
    if (n > 0) ws->heap[i] = last;
    return top;
}

static int touch(travel_ws_t *ws, int32_t v)
{
    if (ws->n_touched == ws->cap_touched) {
        int32_t *p = realloc(ws->touched, 2 * ws->cap_touched * sizeof *p);
        if (p == NULL) return ERR_NOMEM;
        ws->touched = p;
        ws->cap_touched *= 2;
    }
    ws->touched[ws->n_touched++] = v;
    return ERR_OK;
}

/* Append (cell, t) to the growing output arrays. */
static int reach_push(travel_reach_t *out, size_t *cap, int32_t cell, double t)
{
    if (out->n == *cap) {
        size_t nc = *cap ? 2 * *cap : 256;
        int32_t *c = realloc(out->cell, nc * sizeof *c);
        if (c == NULL) return ERR_NOMEM;
        out->cell = c;
        double *tt = realloc(out->time_s, nc * sizeof *tt);
        if (tt == NULL) return ERR_NOMEM;
        out->time_s = tt;
        *cap = nc;
    }
    out->cell[out->n] = cell;
    out->time_s[out->n] = t;
    out->n++;
    return ERR_OK;
}

int travel_bounded(const network_t *net, travel_ws_t *ws, int64_t source, double limit_s,
                   travel_reach_t *out, err_t *e)
{
    const igraph_t *g = network_graph(net);
    const double *w = VECTOR(*network_weights(net));
    const int in = network_search_mode(net) == IGRAPH_IN;
    /* IN: walk edges backwards (u -> v found among v's in-edges); OUT: forwards. */
    const igraph_integer_t *start = in ? VECTOR(g->is) : VECTOR(g->os);
    const igraph_integer_t *order = in ? VECTOR(g->ii) : VECTOR(g->oi);
    const igraph_integer_t *other = in ? VECTOR(g->from) : VECTOR(g->to);
    const int64_t n_cells = network_n_cells(net);
    size_t cap = 0;
    int rc = ERR_OK;

    memset(out, 0, sizeof *out);
    if (ws->n != network_n_nodes(net))
        return err_set(e, ERR_INTERNAL, "bounded search: workspace made for %ld nodes used on "
                       "a network of %ld", (long)ws->n, (long)network_n_nodes(net));
    if (source < 0 || source >= ws->n)
        return err_set(e, ERR_INPUT, "bounded search: source node %ld is outside 0..%ld",
                       (long)source, (long)ws->n - 1);
    if (!(limit_s >= 0.0))
        return err_set(e, ERR_INPUT, "bounded search from node %ld: time limit %g s must be "
                       ">= 0", (long)source, limit_s);

    ws->n_heap = 0;
    ws->n_touched = 0;
    ws->dist[source] = 0.0;
    if (touch(ws, (int32_t)source) != ERR_OK || heap_push(ws, 0.0, (int32_t)source) != ERR_OK)
        goto nomem;
    while (ws->n_heap > 0) {
        heap_item_t it = heap_pop(ws);
        if (it.d > ws->dist[it.v]) continue;   /* stale entry */
        if (it.v < n_cells && reach_push(out, &cap, it.v, it.d) != ERR_OK) goto nomem;
        for (igraph_integer_t j = start[it.v]; j < start[it.v + 1]; j++) {
            igraph_integer_t eid = order[j];
            int64_t u = other[eid];
            double nd = it.d + w[eid];   /* +inf for disabled virtual edges */
            if (nd > limit_s || u >= ws->n) continue;   /* u >= n: the virtual source */
            if (nd < ws->dist[u]) {
                if (ws->dist[u] == INFINITY && touch(ws, (int32_t)u) != ERR_OK) goto nomem;
                ws->dist[u] = nd;
                if (heap_push(ws, nd, (int32_t)u) != ERR_OK) goto nomem;
            }
        }
    }
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory in the bounded search from node %ld",
                 (long)source);
    travel_reach_destroy(out);
done:
    /* Sparse reset: only what this search wrote. */
    for (size_t i = 0; i < ws->n_touched; i++) ws->dist[ws->touched[i]] = INFINITY;
    ws->n_touched = 0;
    ws->n_heap = 0;
    return rc;
}

/* Shared state of travel_bounded_many's threads. */
typedef struct many_job {
    const network_t *net;
    const int64_t *sources;
    size_t n;
    double limit_s;
    travel_reach_t *out;
    atomic_size_t next;        /* next source index to take */
    atomic_int failed;         /* set once an error is recorded */
    pthread_mutex_t lock;      /* guards err */
    err_t err;
} many_job_t;

static void many_fail(many_job_t *job, const err_t *e)
{
    pthread_mutex_lock(&job->lock);
    if (!atomic_load(&job->failed)) {
        job->err = *e;
        atomic_store(&job->failed, 1);
    }
    pthread_mutex_unlock(&job->lock);
}

static void *many_worker(void *arg)
{
    many_job_t *job = arg;
    travel_ws_t *ws = NULL;
    err_t e = {0, ""};

    if (travel_ws_new(job->net, &ws, &e) != ERR_OK) {
        many_fail(job, &e);
        return NULL;
    }
    while (!atomic_load(&job->failed)) {
        size_t i = atomic_fetch_add(&job->next, 1);
        if (i >= job->n) break;
        if (travel_bounded(job->net, ws, job->sources[i], job->limit_s, &job->out[i], &e)
            != ERR_OK) {
            many_fail(job, &e);
            break;
        }
    }
    travel_ws_free(ws);
    return NULL;
}

int travel_bounded_many(const network_t *net, const int64_t *sources, size_t n,
                        double limit_s, int n_threads, travel_reach_t *out, err_t *e)
{
    many_job_t job;
    pthread_t *tid = NULL;
    int started = 0, rc = ERR_OK;

    for (size_t i = 0; i < n; i++) memset(&out[i], 0, sizeof out[i]);
    if (n == 0) return ERR_OK;
    if (n_threads < 1) n_threads = 1;
    if ((size_t)n_threads > n) n_threads = (int)n;
    memset(&job, 0, sizeof job);
    job.net = net;
    job.sources = sources;
    job.n = n;
    job.limit_s = limit_s;
    job.out = out;
    atomic_init(&job.next, 0);
    atomic_init(&job.failed, 0);
    if (pthread_mutex_init(&job.lock, NULL) != 0)
        return err_set(e, ERR_INTERNAL, "bounded searches: cannot create a mutex");

    /* The calling thread works too; if a thread cannot start, fewer do the work. */
    if (n_threads > 1) {
        tid = malloc((size_t)(n_threads - 1) * sizeof *tid);
        for (int t = 0; tid != NULL && t < n_threads - 1; t++) {
            if (pthread_create(&tid[t], NULL, many_worker, &job) != 0) break;
            started++;
        }
    }
    many_worker(&job);
    for (int t = 0; t < started; t++) pthread_join(tid[t], NULL);
    free(tid);
    pthread_mutex_destroy(&job.lock);

    if (atomic_load(&job.failed)) {
        for (size_t i = 0; i < n; i++) travel_reach_destroy(&out[i]);
        if (e != NULL) *e = job.err;
        rc = job.err.code;
    }
    return rc;
}

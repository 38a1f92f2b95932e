/* sptree: the shortest-path forest of one nearest-site search (igraph's own tree,
 * network_search_tree) with times, site labels and children lists, and its repair
 * after edits that only make edges slower or closed, or close sites: only the
 * subtrees below the changed tree edges (and below closed sites) can change, so
 * they alone are re-settled, by a Dijkstra seeded from their unchanged boundary.
 * Used by compare (variants) and links (one closed link at a time). */
#ifndef SPTREE_H
#define SPTREE_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"
#include "network.h"

typedef struct sptree {
    int64_t n;           /* nodes (cells and road nodes) */
    double *time_s;      /* n: seconds to the nearest site; INFINITY unreachable */
    int32_t *site;       /* n: index into the site list; -1 unreachable */
    int64_t *inbound;    /* n: edge that settles the node; -1 a site, -2 unreachable */
    int64_t *ch_start;   /* n + 1: children of v are ch[ch_start[v] .. ch_start[v+1]) */
    int32_t *ch;
} sptree_t;

/* The tree of a search from site_nodes[0..n_sites) on the current weights. Times
 * are summed down the tree as the search summed them. Caller destroys with
 * sptree_destroy. Errors: those of network_search_tree, NOMEM. */
int sptree_build(network_t *net, const int64_t *site_nodes, size_t n_sites, sptree_t *t,
                 err_t *e);
void sptree_destroy(sptree_t *t);   /* NULL-safe */

/* Times and labels on the network's current weights, given that since the tree
 * was built only the edges changed[0..n_changed) changed, each to a weight no lower
 * than before, and that the sites flagged in site_closed (per site index; may be
 * NULL) were closed. time_out and site_out (n entries each) receive the result.
 * *n_resettled (may be NULL) counts the nodes searched again. Only reads the graph
 * (no igraph call). Errors: NOMEM. */
int sptree_resettle(const sptree_t *t, const network_t *net, const int64_t *changed,
                    size_t n_changed, const uint8_t *site_closed, size_t n_sites,
                    double *time_out, int32_t *site_out, size_t *n_resettled, err_t *e);

#endif

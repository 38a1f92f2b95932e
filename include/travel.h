/* travel: shortest-path runs on the travel network.
 * travel_nearest: one multi-source Dijkstra (igraph) from all open sites at once,
 *   giving every node its time to (or from) the nearest site and which site that is.
 * travel_bounded / travel_bounded_many: searches from one site up to a time limit
 *   that cost in proportion to what they reach; several can run on threads at once.
 * Times are seconds; INFINITY means unreachable. The scenario's direction decides
 * whether times are from people to the site (to_site) or from the site to people. */
#ifndef TRAVEL_H
#define TRAVEL_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"
#include "network.h"

/* Result of travel_nearest, one entry per network node (cells first, so entry
 * 'cell' is the cell row*nx+col; road nodes follow). */
typedef struct travel_result {
    int64_t n_nodes;     /* network_n_nodes() */
    int64_t n_cells;     /* network_n_cells() */
    double *time_s;      /* seconds to the nearest site; INFINITY when unreachable */
    int32_t *site;       /* index into the caller's site list; -1 when unreachable */
} travel_result_t;

/* Time from every node to its nearest site among site_nodes[0..n_sites) (network
 * node ids; a node listed twice counts under its first index). One igraph Dijkstra
 * from the network's virtual source; distances are rebuilt from the shortest-path
 * tree. Ties: when two sites reach a node in exactly the same time, the one whose
 * path igraph's Dijkstra found first keeps it (igraph replaces a label only on a
 * strict improvement), which depends on its heap order: treat exact ties as either.
 * On success *out is new (caller frees with travel_result_free). Errors: a site node
 * out of range, out of memory, igraph failure. Not for use while other threads run
 * travel_bounded on the same network (it adds edges to the graph). */
int travel_nearest(network_t *net, const int64_t *site_nodes, size_t n_sites,
                   travel_result_t **out, err_t *e);
void travel_result_free(travel_result_t *r);   /* NULL-safe */

/* Cells reached by one bounded search, in order of time. */
typedef struct travel_reach {
    int32_t *cell;       /* cell ids (row*nx+col) */
    double *time_s;      /* seconds, <= the limit */
    size_t n;
} travel_reach_t;
void travel_reach_destroy(travel_reach_t *r);  /* frees the arrays; NULL-safe */

/* Reusable search state for one thread: a distance per node (kept at +inf between
 * searches and reset only where a search wrote), a heap and a touched list. */
typedef struct travel_ws travel_ws_t;
int travel_ws_new(const network_t *net, travel_ws_t **out, err_t *e);
void travel_ws_free(travel_ws_t *ws);          /* NULL-safe */

/* Every cell whose travel time to (to_site) or from (from_site) node 'source' is at
 * most limit_s seconds. Fills *out (caller frees with travel_reach_destroy). Uses
 * no igraph call, only reads the graph, so several threads may run it at once on
 * the same network, each with its own workspace. Errors: bad source or limit, NOMEM. */
int travel_bounded(const network_t *net, travel_ws_t *ws, int64_t source, double limit_s,
                   travel_reach_t *out, err_t *e);

/* travel_bounded for sources[0..n) on n_threads threads (0 or 1 = this thread only).
 * out[i] receives the result for sources[i] (caller destroys each). On error every
 * out[i] is left empty and 'e' names the first failing source. */
int travel_bounded_many(const network_t *net, const int64_t *sources, size_t n,
                        double limit_s, int n_threads, travel_reach_t *out, err_t *e);

#endif

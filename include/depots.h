/* depots: travel times and distances from depots to sites (and back) on the
 * VEHICLE road network, for the shipment plan. Roads only: a directed igraph_t
 * over the road nodes of roads_t, one edge per direction a vehicle may drive
 * (one-ways honoured; classes with vehicle speed 0 are closed), weight = seconds
 * at the class's vehicle speed. Each point joins the nearest point of the
 * nearest segment open to vehicles (splitting it there) by a straight access
 * leg driven at 'access_mps' (a slow, walking-pace stretch; docs/plan.md), up
 * to 'max_access_m'. Times are seconds, lengths metres; INFINITY where no road
 * joins the two. Wraps igraph. */
#ifndef DEPOTS_H
#define DEPOTS_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"
#include "roads.h"

typedef struct depots_travel {
    size_t n_from, n_to;
    double *out_s;          /* [f * n_to + t] seconds from point f to point t */
    double *back_s;         /* [f * n_to + t] seconds from point t back to point f */
    double *out_m, *back_m; /* the same in metres (access legs included) */
    int64_t *from_seg;      /* [f] road segment joined, -1 when none within max_access_m */
    int64_t *to_seg;        /* [t] likewise */
    double *from_access_m;  /* [f] straight access leg to that segment, metres (INFINITY: none) */
    double *to_access_m;    /* [t] likewise */
} depots_travel_t;

/* Travel between n_from points (fx, fy) and n_to points (tx, ty), all in the
 * CRS of the roads (lon/lat degrees when 'geographic' is 1: the access legs are
 * then geodesic). 'r' may be NULL or hold no vehicle road: every time is then
 * INFINITY. One igraph Dijkstra per from-point and direction; lengths are summed
 * along the same shortest-time paths. Fills *out (caller destroys with
 * depots_travel_destroy). Errors: access_mps not > 0, max_access_m < 0 (ERR_INPUT),
 * a segment naming a node or class that does not exist (ERR_INPUT), igraph
 * failure (ERR_GRAPH), out of memory. */
int depots_travel(const roads_t *r, int geographic, const double *fx, const double *fy,
                  size_t n_from, const double *tx, const double *ty, size_t n_to,
                  double access_mps, double max_access_m, depots_travel_t *out, err_t *e);
void depots_travel_destroy(depots_travel_t *t);   /* NULL-safe */

#endif

/* links: critical road links. A link is a chain of road segments between
 * junctions (nodes where features meet, line ends, or nodes joining other than
 * two segments); bridges are links of their own since each is its own feature.
 * Each link is scored by the harm of closing it alone, all else as in the base:
 * people pushed beyond the coverage limit, people cut off, and added
 * person-hours. Only links carrying an edge of the base shortest-path tree can
 * change any time ("tree rule"); the others are skipped. For the rest, only the
 * subtrees hanging below the closed tree edges change: their nodes are re-settled
 * by a Dijkstra seeded from the unchanged nodes on their boundary. The searches
 * run on threads that only read the graph arrays (no igraph call in a thread). */
#ifndef LINKS_H
#define LINKS_H

#include <stddef.h>
#include <stdint.h>

#include <cJSON.h>

#include "err.h"
#include "inputs.h"
#include "network.h"
#include "points.h"
#include "roads.h"

typedef struct link {
    size_t seg0, n_segs;     /* segments seg_list[seg0 .. seg0+n_segs) of the links_t */
    int32_t node_a, node_b;  /* road nodes at its ends (equal for a loop) */
    int bridge;              /* 1 when any of its segments is a bridge */
    int32_t cls;             /* class of its first segment */
    double length_m;
    int on_tree;             /* 0: skipped by the tree rule (closing it changes nothing) */
    double pushed_beyond;    /* people within the limit in the base, beyond it when closed */
    double cut_off;          /* people reachable in the base, unreachable when closed */
    double added_person_h;   /* sum of people x added time (hours) over people still reached */
    size_t nodes_resettled;  /* size of the re-settled subtrees */
} link_t;

typedef struct links {
    link_t *l;
    size_t n;
    int32_t *seg_list;       /* segment indices, grouped by link, in chain order */
    size_t *rank;            /* n indices into l, most harmful first */
    size_t n_on_tree;        /* links scored; n - n_on_tree were skipped */
    double seconds_base, seconds_scores;
} links_t;

/* Split the road network into links (no scores yet). Caller frees with links_free. */
int links_build(const roads_t *r, links_t **out, err_t *e);
void links_free(links_t *L);   /* NULL-safe */

/* Score every link of L for the open 'sites' on 'net' (built from the same roads),
 * with the coverage limit in seconds and people per cell; n_threads 0 = all cores.
 * Then rank. Errors: no site, igraph failure in the base search, NOMEM. */
int links_score(links_t *L, network_t *net, const double *people, const points_t *sites,
                int nx, double limit_s, int n_threads, err_t *e);

/* Brute force for tests: the harm of closing link k, by a full nearest-site search on
 * the network with the link's edges closed. Same figures as links_score. */
int links_score_one_full(const links_t *L, size_t k, network_t *net, const double *people,
                         const points_t *sites, int nx, double limit_s, link_t *out, err_t *e);

/* Write links.csv (ranked) and links.gpkg (one line per link with the same
 * columns) into outdir and add a "links" section to 'summary'. */
int links_write(const char *outdir, const inputs_t *in, const links_t *L, cJSON *summary,
                err_t *e);
/* The human summary: counts and the 'top' most harmful links, on stdout. */
void links_print(const inputs_t *in, const links_t *L, size_t top);

#endif

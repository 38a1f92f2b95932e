/* network: the travel graph, one directed igraph_t whose edge weights are seconds.
 * Node numbering (owned here, used by every later stage):
 *   0 .. n_cells-1            cell nodes, node = row * nx + col (every cell has a
 *                             node; barrier and factor-0 cells simply have no edges)
 *   n_cells .. +n_road_orig-1 the road nodes of roads_t, in their order
 *   .. +n_road_extra-1        extra road nodes added where a segment crosses cells
 *   last                      one reserved virtual source for multi-source searches
 * Walking edges join neighbouring cells (8 or 16 neighbours), road edges join road
 * nodes, connector edges join a road node and the cell it lies in. Wraps igraph. */
#ifndef NETWORK_H
#define NETWORK_H

#include <stddef.h>
#include <stdint.h>

#include <igraph.h>

#include "err.h"
#include "grid.h"
#include "roads.h"
#include "scenario.h"

typedef struct network network_t;

/* Counts for the check report and for tests. */
typedef struct network_stats {
    size_t n_cells;          /* nx * ny */
    size_t n_cells_blocked;  /* barrier or land-cover factor 0: no edges */
    size_t n_road_orig;      /* road nodes from roads_t */
    size_t n_road_extra;     /* road nodes added by densifying segments */
    size_t n_walk_edges;     /* directed cell-to-cell edges */
    size_t n_road_edges;     /* directed road edges (after mode and one-way) */
    size_t n_connector_edges;/* directed road-node <-> cell edges */
    size_t n_road_off_grid;  /* road nodes outside the grid: no connector */
} network_stats_t;

/* Build the travel network for s->mode and s->direction from grid 'g' and roads 'r'
 * (r may be NULL: walking surface only). On success *out is a new network that
 * borrows nothing (caller frees with network_free). Errors: empty grid, missing
 * per-row cell sizes, s->neighbours not 8 or 16, bad speeds, road segments naming
 * nodes or classes that do not exist, too many nodes, igraph failures. */
int network_build(const grid_t *g, const roads_t *r, const scen_t *s, network_t **out,
                  err_t *e);
void network_free(network_t *net);  /* NULL-safe */

void network_get_stats(const network_t *net, network_stats_t *st);

/* Nodes that carry results: cells and road nodes (the virtual source excluded). */
int64_t network_n_nodes(const network_t *net);
int64_t network_n_cells(const network_t *net);
int network_nx(const network_t *net);
int network_ny(const network_t *net);

/* Cell (col,row) -> node; -1 when outside the grid. */
int64_t network_cell_node(const network_t *net, int col, int row);
/* 1 when 'node' is a cell node (and sets col,row if not NULL), else 0. */
int network_node_cell(const network_t *net, int64_t node, int *col, int *row);
/* Road node index of roads_t -> node; -1 when out of range. */
int64_t network_road_node(const network_t *net, int64_t road_node);
/* 1 when 'node' is a road node; *road_node (if not NULL) is its roads_t index,
 * or -1 for an extra node added by densification. */
int network_node_road(const network_t *net, int64_t node, int64_t *road_node);
int network_node_is_cell(const network_t *net, int64_t node);
/* Position of a node in the grid CRS (cell centre for cells); 0 when no such node. */
int network_node_xy(const network_t *net, int64_t node, double *x, double *y);

/* The graph and its weights (seconds per edge) for read-only use by travel.
 * Valid until the next network_attach_sources or network_free. */
const igraph_t *network_graph(const network_t *net);
const igraph_vector_t *network_weights(const network_t *net);
int64_t network_virtual_node(const network_t *net);
/* igraph neighbour mode that follows travel in the scenario's direction when searching
 * outward from a site: IGRAPH_IN for to_site (people travel to the site: we walk the
 * edges backwards from the site), IGRAPH_OUT for from_site. */
igraph_neimode_t network_search_mode(const network_t *net);
int network_direction(const network_t *net);  /* SCEN_TO_SITE or SCEN_FROM_SITE */

/* Join the virtual source to each of 'nodes' by a zero-weight edge (site -> virtual
 * for to_site, virtual -> site for from_site); every other virtual edge is disabled.
 * Edges made by earlier calls are reused (their weight goes back to 0); only nodes
 * never attached before cost a re-index of the whole graph (O(edges), about 24 bytes
 * per edge of temporaries), so a caller that will try many site sets should attach
 * all candidate nodes once up front. Errors: a node out of range, NOMEM, igraph. */
int network_attach_sources(network_t *net, const int64_t *nodes, size_t n, err_t *e);
/* Disable every virtual edge (weight +infinity, which igraph's Dijkstra ignores). */
void network_detach_sources(network_t *net);

/* The shortest-path tree of one nearest-site search from site_nodes[0..n) (as
 * travel_nearest runs it, in the network's search direction): inbound[v] (n_nodes
 * entries) is the id of the edge through which node v is settled, -1 for a site
 * itself and -2 when v cannot be reached. Zero-weight connectors make "any tight
 * edge" ambiguous (a node and its cell can be each other's tight neighbour), hence
 * igraph's own tree. Errors: a node out of range, NOMEM, igraph failure. */
int network_search_tree(network_t *net, const int64_t *site_nodes, size_t n_sites,
                        int64_t *inbound, err_t *e);

/* ---- What-if edits (src/whatif): a variant changes edge weights in place and
 * undoes them afterwards, so nothing is rebuilt. Edge ids 0..network_n_edges()-1
 * are the built edges (walking, road, connector); virtual edges come after and
 * are never edited. */
int64_t network_n_edges(const network_t *net);
/* Road segments of the roads_t the network was built from (0 without roads). */
size_t network_n_segs(const network_t *net);
/* The road edges of segment 'seg' are ids [*first, *first + *n), both directions of
 * every piece; *n is 0 when the segment carries no edges in this mode (footpaths by
 * vehicle). Returns 0 when seg is out of range. */
int network_seg_edges(const network_t *net, size_t seg, int64_t *first, int64_t *n);
/* Current weight of edge eid (seconds; +inf when closed). */
double network_edge_weight(const network_t *net, int64_t eid);
/* Set edge eid's weight (seconds, +inf closes it), remembering the old value for
 * network_edit_reset. Errors: eid not a built edge, NOMEM. */
int network_edit_edge(network_t *net, int64_t eid, double w, err_t *e);
/* Every edge touching a cell with mask[cell] != 0 (walking edges and connectors):
 * factor 0 closes them; a factor in (0, 1] divides their speed (multiplies the time by
 * 1/factor once per edge, also when both ends are masked). *n_edges (may be NULL)
 * counts the edges changed. Errors: factor < 0, NOMEM. */
int network_edit_cells(network_t *net, const uint8_t *mask, double factor, size_t *n_edges,
                       err_t *e);
/* Undo every edit since the last reset (in reverse order); cannot fail. */
void network_edit_reset(network_t *net);
/* Edits recorded since the last reset (an edge edited twice counts twice). */
size_t network_n_edits(const network_t *net);
/* Edit i (0 = oldest): the edge and its weight before that edit. */
void network_edit_get(const network_t *net, size_t i, int64_t *eid, double *old_w);

#endif

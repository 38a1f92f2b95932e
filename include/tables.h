/* tables: plain CSV inputs for the site-selection models, no GDAL needed.
 * Either a network edge list (from,to,cost) whose shortest paths (igraph
 * Dijkstra from each site) give the costs, or a cost matrix
 * (demand_id,site_id,cost); plus a demand table (id,weight) and a site table
 * (id[,capacity][,fixed_cost][,state]). Formats: docs/tables.md. */
#ifndef TABLES_H
#define TABLES_H

#include "location.h"

/* Build a problem from an edge list, a demand table and a site table. Demand and
 * site ids are node ids of the edge list. 'directed': 1 = each edge runs from ->
 * to only, and costs are for travel from the unit to the site; 0 = both ways.
 * Only pairs with cost <= 'limit' are kept (INFINITY = all reachable pairs).
 * Caller frees *out with loc_free. The igraph error handler must not abort
 * (set once in main). */
int tables_load_network(const char *edges_csv, int directed, const char *demand_csv,
                        const char *sites_csv, double limit, loc_problem_t **out, err_t *e);

/* Build a problem from a cost matrix, a demand table and a site table. Pairs not
 * listed in the matrix do not exist (unit cannot use that site). */
int tables_load_matrix(const char *matrix_csv, const char *demand_csv, const char *sites_csv,
                       loc_problem_t **out, err_t *e);

#endif

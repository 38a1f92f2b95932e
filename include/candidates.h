/* candidates: candidate sites generated from the road network when no (or not
 * enough) candidate layer is given: road junctions in or near populated cells,
 * or points at a regular spacing along the roads; both thinned to a minimum
 * spacing, most people nearby first. Plain arithmetic on grid_t and roads_t. */
#ifndef CANDIDATES_H
#define CANDIDATES_H

#include "err.h"
#include "grid.h"
#include "points.h"
#include "roads.h"

enum { CAND_JUNCTIONS = 1, CAND_ALONG_ROADS = 2 };   /* same values as SCEN_GEN_* */

typedef struct cand_opts {
    int generate;          /* CAND_JUNCTIONS or CAND_ALONG_ROADS */
    double spacing_m;      /* along roads: metres between points, > 0 */
    double min_spacing_m;  /* no two kept points (nor a kept point and an 'avoid' point)
                            * closer than this, metres */
    double near_m;         /* people counted in cells within this distance, metres */
    double min_people;     /* keep a point only with at least this many people near it */
    size_t max;            /* keep at most this many points */
    double capacity;       /* persons per generated site; INFINITY = none */
    double fixed_cost;     /* fixed cost per generated site */
} cand_opts_t;

/* Generate candidates on grid 'g' from roads 'r'. Points outside the grid or on
 * barrier cells are skipped; 'avoid' (may be NULL) are sites already there.
 * Ids are "G0001", "G0002", ... in order of people nearby (most first); names
 * say how each was made. *out is new (caller frees with points_free), possibly
 * with n = 0. Errors: no roads, bad options, out of memory. */
int candidates_generate(const grid_t *g, const roads_t *r, const points_t *avoid,
                        const cand_opts_t *o, points_t **out, err_t *e);

#endif

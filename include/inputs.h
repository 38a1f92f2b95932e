/* inputs: everything a scenario names, loaded and validated in one call: the
 * scenario, the population grid with its optional layers, roads and point layers,
 * plus the warnings gathered on the way. Commands start here. */
#ifndef INPUTS_H
#define INPUTS_H

#include <cJSON.h>

#include "err.h"
#include "grid.h"
#include "points.h"
#include "roads.h"
#include "scenario.h"

typedef struct inputs {
    scen_t *scen;
    grid_t *grid;
    roads_t *roads;          /* NULL when the scenario names no roads */
    points_t *existing;      /* NULL when not given */
    points_t *candidates;    /* NULL when not given */
    points_t *depots;        /* NULL when not given */
    size_t road_components;  /* connected components of the road network */
    size_t road_largest;     /* nodes in the largest one */
    size_t road_islands;     /* components other than the largest */
    double island_people;    /* people in cells that only island roads pass through */
    warn_list_t warnings;
    double seconds;          /* time spent loading */
} inputs_t;

/* Load and validate everything 'scenario_path' names. Caller frees with inputs_free. */
int inputs_load(const char *scenario_path, int quiet, inputs_t **out, err_t *e);
/* The check report as a new cJSON object (caller frees with cJSON_Delete). */
int inputs_report(const inputs_t *in, cJSON **out, err_t *e);
void inputs_free(inputs_t *in);  /* NULL-safe */

#endif

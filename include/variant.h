/* variant: one what-if variant of the scenario (scen_variants.h) applied to a
 * built travel network by editing edge weights in place (network_edit_*), with
 * the variant's own list of open sites. Nothing is rebuilt: the grid, the graph
 * and the untouched edges stay; network_edit_reset undoes the variant. */
#ifndef VARIANT_H
#define VARIANT_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"
#include "inputs.h"
#include "network.h"
#include "points.h"
#include "scen_variants.h"

/* What a variant changed, for reports. */
typedef struct variant_applied {
    size_t segs_closed;      /* road segments closed by id or attribute */
    size_t features_closed;  /* road features matched by close_roads */
    size_t segs_slowed;      /* road segments given a speed factor */
    size_t segs_flooded;     /* road segments cut by the flood extent */
    size_t cells_flooded;    /* cells whose centre lies in the flood extent */
    double people_flooded;   /* people living in those cells */
    size_t edges_changed;    /* edge weights edited in all */
    points_t sites;          /* the variant's open sites: arrays owned, id and name
                                strings borrowed from the inputs */
    size_t sites_closed, sites_opened;
} variant_applied_t;

/* Check a variant against the loaded inputs without changing anything: every road
 * id, site id and capacity id exists; a filter on a road field the roads did not
 * keep is an internal error. Messages name the variant and the id. */
int variant_validate(const inputs_t *in, const scen_variant_t *v, err_t *e);

/* Apply variant 'v' to 'net' (which must have no pending edits) and fill 'out'
 * (caller destroys with variant_applied_destroy, and undoes the edits with
 * network_edit_reset(net) when done with the variant). On error the edits made
 * so far are undone. Errors: those of variant_validate, a flood layer that cannot
 * be read, NOMEM. */
int variant_apply(network_t *net, const inputs_t *in, const scen_variant_t *v,
                  variant_applied_t *out, err_t *e);
void variant_applied_destroy(variant_applied_t *a);   /* NULL-safe */

/* A file-name-safe form of a variant name ("bridge down" -> "bridge_down"), into buf. */
void variant_slug(const char *name, char *buf, size_t n);

#endif

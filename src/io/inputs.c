/* inputs: load and validate all inputs of a scenario (see include/inputs.h). */
#include "inputs.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "progress.h"
#include "scen_supply.h"

static int load_points(const scen_layer_t *l, const char *what, const grid_t *g,
                       points_t **out, err_t *e)
{
    *out = NULL;
    if (l->path == NULL) return ERR_OK;
    return points_load(l, what, g, out, e);
}

/* The supply section's depot ids against the depots layer, so that 'check'
 * refuses what 'supply' and 'plan' would refuse, before anything is written. */
static int supply_depots(const inputs_t *in, err_t *e)
{
    const scen_t *s = in->scen;
    const struct scen_supply *x = s->supply;

    if (x == NULL) return ERR_OK;
    if (in->depots == NULL || in->depots->n == 0)
        return err_set(e, ERR_INPUT, "%s: supply needs depots, but %s; give a point "
                       "layer of depots in sites.depots", s->file,
                       in->depots == NULL ? "sites.depots is not given"
                                          : "the sites.depots layer has no points");
    for (size_t i = 0; i < x->n_depots; i++) {
        size_t d = 0;
        while (d < in->depots->n && strcmp(in->depots->id[d], x->depots[i].depot_id) != 0) d++;
        if (d == in->depots->n)
            return err_set(e, ERR_INPUT, "%s: supply.depot_stock names depot '%s', which is not "
                           "in sites.depots ('%s', %zu depots, first id '%s'); use an id of "
                           "that layer", s->file, x->depots[i].depot_id, s->depots.path,
                           in->depots->n, in->depots->id[0]);
    }
    return ERR_OK;
}

/* A layer the scenario names but that holds nothing is worth a word. */
static void warn_empty(inputs_t *in, const points_t *p, const scen_layer_t *l, const char *what)
{
    if (p != NULL && p->n == 0)
        warn_add(&in->warnings, "%s layer%s%s%s in '%s' has no points", what,
                 l->layer ? " '" : "", l->layer ? l->layer : "", l->layer ? "'" : "", l->path);
}

/* Road components apart from the largest are islands: the people in the cells
 * they pass through are reported, since their roads lead nowhere else. */
static int road_islands(inputs_t *in, err_t *e)
{
    const roads_t *r = in->roads;
    const grid_t *g = in->grid;
    int32_t *memb = malloc((r->n_nodes ? r->n_nodes : 1) * sizeof *memb);
    size_t *size = NULL, big = 0;
    unsigned char *seen = NULL;
    int rc;

    if (memb == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    rc = roads_components(r, &in->road_components, &in->road_largest, memb, e);
    if (rc != ERR_OK || in->road_components < 2) goto done;
    size = calloc(in->road_components, sizeof *size);
    seen = calloc((size_t)g->nx * (size_t)g->ny, 1);
    if (size == NULL || seen == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    for (size_t i = 0; i < r->n_nodes; i++) size[memb[i]]++;
    for (size_t c = 1; c < in->road_components; c++)
        if (size[c] > size[big]) big = c;
    in->road_islands = in->road_components - 1;
    for (size_t i = 0; i < r->n_nodes; i++) {
        int col, row;
        if ((size_t)memb[i] == big || !grid_locate(g, r->x[i], r->y[i], &col, &row)) continue;
        seen[(size_t)row * g->nx + col] = 1;
    }
    /* A cell the main network also passes through is not cut off. */
    for (size_t i = 0; i < r->n_nodes; i++) {
        int col, row;
        if ((size_t)memb[i] != big || !grid_locate(g, r->x[i], r->y[i], &col, &row)) continue;
        seen[(size_t)row * g->nx + col] = 0;
    }
    for (size_t c = 0; c < (size_t)g->nx * (size_t)g->ny; c++)
        if (seen[c]) in->island_people += g->people[c];
    warn_add(&in->warnings,
             "%zu road islands are not joined to the main road network; %.0f people live in cells holding only their nodes",
             in->road_islands, in->island_people);
done:
    free(memb);
    free(size);
    free(seen);
    return rc;
}

int inputs_load(const char *scenario_path, int quiet, inputs_t **out, err_t *e)
{
    inputs_t *in = calloc(1, sizeof *in);
    progress_t pr;
    double t0 = progress_now();
    int rc = ERR_OK;

    *out = NULL;
    if (in == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    warn_init(&in->warnings);
    progress_init(&pr, quiet);

    rc = scen_load(scenario_path, &in->scen, e);
    if (rc != ERR_OK) goto done;
    /* Table scenarios (inputs.tables) have no grid: only 'site' reads them. */
    if (in->scen->population == NULL) {
        rc = err_set(e, ERR_INPUT, "%s: this scenario gives CSV tables (inputs.tables), not a "
                     "population grid; this command needs a grid in 'inputs.population' "
                     "('sitereach site' reads tables)", in->scen->file);
        goto done;
    }
    progress_start(&pr, "reading population grid");
    rc = grid_load(in->scen->population, &in->grid, e);
    if (rc == ERR_OK && in->scen->landcover != NULL)
        rc = grid_load_landcover(in->grid, in->scen->landcover, e);
    if (rc == ERR_OK && in->scen->elevation != NULL)
        rc = grid_load_elevation(in->grid, in->scen->elevation, e);
    if (rc == ERR_OK && in->scen->barriers != NULL)
        rc = grid_load_barriers(in->grid, in->scen->barriers, e);
    progress_end(&pr);
    if (rc != ERR_OK) goto done;
    if (in->grid->n_nodata > 0 || in->grid->n_nan > 0)
        warn_add(&in->warnings, "%zu nodata and %zu NaN cells in '%s' counted as 0 people",
                 in->grid->n_nodata, in->grid->n_nan, in->scen->population);
    /* Some projections (e.g. world equal-area ones) stretch distances by
     * 10% or more away from their centre; 3% is our own threshold, common
     * practice with no source. */
    if (in->grid->scale_error > 0.03)
        warn_add(&in->warnings,
                 "the grid's CRS '%s' distorts distances by up to %.0f%% here, so travel times will be off by as much; reproject the inputs to a local UTM zone with gdalwarp",
                 in->grid->crs_name, 100.0 * in->grid->scale_error);
    /* Optional rasters that leave cells without a value (nodata, or not reaching
     * that far) change travel there quietly otherwise. */
    if (in->grid->n_landcover_missing > 0)
        warn_add(&in->warnings,
                 "land-cover raster '%s' gives no class for %zu of %zu grid cells (nodata or "
                 "beyond its extent); they use travel.landcover_default (%g)",
                 in->scen->landcover, in->grid->n_landcover_missing,
                 (size_t)in->grid->nx * (size_t)in->grid->ny, in->scen->cover_default_factor);
    if (in->grid->n_elevation_missing > 0 && in->scen->use_slope)
        warn_add(&in->warnings,
                 "elevation raster '%s' gives no height for %zu of %zu grid cells (nodata or "
                 "beyond its extent); walking there ignores slope",
                 in->scen->elevation, in->grid->n_elevation_missing,
                 (size_t)in->grid->nx * (size_t)in->grid->ny);
    if (in->grid->n_barrier_missing > 0)
        warn_add(&in->warnings,
                 "barrier raster '%s' gives no value for %zu of %zu grid cells (nodata or "
                 "beyond its extent); they are passable",
                 in->scen->barriers, in->grid->n_barrier_missing,
                 (size_t)in->grid->nx * (size_t)in->grid->ny);
    if (in->grid->total_people <= 0)
        warn_add(&in->warnings, "population grid '%s' holds no people", in->scen->population);
    if (in->grid->people_on_barrier > 0)
        warn_add(&in->warnings, "%.0f people live on barrier cells; they cannot reach any site",
                 in->grid->people_on_barrier);

    if (in->scen->roads.path != NULL) {
        progress_start(&pr, "reading roads");
        rc = roads_load(in->scen, in->grid, &in->roads, &in->warnings, e);
        progress_end(&pr);
        if (rc != ERR_OK) goto done;
        rc = road_islands(in, e);
        if (rc != ERR_OK) goto done;
    }
    if (in->scen->mode == SCEN_MODE_VEHICLE) {
        /* Vehicle mode drives roads only; without any open to vehicles everyone
         * walks, and the outputs would still say "by vehicle". */
        int any_open = 0;
        if (in->roads != NULL)
            for (size_t k = 0; k < in->roads->n_classes; k++)
                if (in->roads->classes[k].n_features > 0 && in->roads->classes[k].vehicle_mps > 0)
                    any_open = 1;
        if (!any_open)
            warn_add(&in->warnings, "travel.mode is \"vehicle\" but %s, so all travel is on "
                     "foot at the walking speed; give inputs.roads with vehicle speeds, or use "
                     "\"walk\"", in->roads == NULL ? "the scenario has no roads"
                                                   : "no road class is open to vehicles");
    }
    rc = load_points(&in->scen->existing, "existing sites", in->grid, &in->existing, e);
    if (rc == ERR_OK)
        rc = load_points(&in->scen->candidates, "candidate sites", in->grid, &in->candidates, e);
    if (rc == ERR_OK) rc = load_points(&in->scen->depots, "depots", in->grid, &in->depots, e);
    if (rc == ERR_OK) rc = supply_depots(in, e);
    if (rc != ERR_OK) goto done;
    warn_empty(in, in->existing, &in->scen->existing, "existing sites");
    warn_empty(in, in->candidates, &in->scen->candidates, "candidate sites");
    warn_empty(in, in->depots, &in->scen->depots, "depots");
    in->seconds = progress_now() - t0;
    *out = in;
    in = NULL;
done:
    inputs_free(in);
    return rc;
}

void inputs_free(inputs_t *in)
{
    if (in == NULL) return;
    points_free(in->existing);
    points_free(in->candidates);
    points_free(in->depots);
    roads_free(in->roads);
    grid_free(in->grid);
    scen_free(in->scen);
    warn_destroy(&in->warnings);
    free(in);
}

/* Distance from (x, y) to the nearest road (any point of any segment), metres:
 * planar in a projected grid; for a lon/lat grid the closest point is found
 * with longitudes scaled by cos(latitude) and the distance measured on the
 * ellipsoid. INFINITY when there are no roads. */
static double nearest_road_m(const inputs_t *in, double x, double y)
{
    const roads_t *r = in->roads;
    double best = INFINITY, bx = x, by = y;
    double k = in->grid->geographic ? cos(y * M_PI / 180.0) : 1.0;

    if (r == NULL || r->n_segs == 0) return INFINITY;
    for (size_t i = 0; i < r->n_segs; i++) {
        double ax = r->x[r->segs[i].a], ay = r->y[r->segs[i].a];
        double cx = r->x[r->segs[i].b], cy = r->y[r->segs[i].b];
        double ux = (cx - ax) * k, uy = cy - ay, px = (x - ax) * k, py = y - ay;
        double len2 = ux * ux + uy * uy, t = len2 > 0 ? (px * ux + py * uy) / len2 : 0;
        double qx, qy, d2;
        t = t < 0 ? 0 : t > 1 ? 1 : t;
        qx = ux * t - px;
        qy = uy * t - py;
        d2 = qx * qx + qy * qy;
        if (d2 < best) {
            best = d2;
            bx = ax + (cx - ax) * t;
            by = ay + (cy - ay) * t;
        }
    }
    if (in->grid->geographic) return grid_geodesic_m(x, y, bx, by);
    return sqrt(best);
}

static cJSON *points_json(const inputs_t *in, const points_t *p, const char *what)
{
    cJSON *o = cJSON_CreateObject();
    double worst = 0;

    for (size_t i = 0; i < p->n; i++) {
        double d = nearest_road_m(in, p->x[i], p->y[i]);
        if (isfinite(d) && d > worst) worst = d;
    }
    cJSON_AddStringToObject(o, "layer", what);
    cJSON_AddNumberToObject(o, "count", (double)p->n);
    /* null when there is nothing to measure: no points, or no roads to measure to */
    if (p->n == 0 || in->roads == NULL || in->roads->n_segs == 0)
        cJSON_AddNullToObject(o, "max_road_distance_m");
    else
        cJSON_AddNumberToObject(o, "max_road_distance_m", worst);
    return o;
}

int inputs_report(const inputs_t *in, cJSON **out, err_t *e)
{
    const grid_t *g = in->grid;
    cJSON *r = cJSON_CreateObject(), *gj, *pts, *w;

    *out = NULL;
    if (r == NULL) return err_set(e, ERR_NOMEM, "out of memory building the report");
    cJSON_AddStringToObject(r, "scenario", in->scen->file);
    cJSON_AddStringToObject(r, "name", in->scen->name);
    gj = cJSON_AddObjectToObject(r, "grid");
    cJSON_AddStringToObject(gj, "path", in->scen->population);
    cJSON_AddStringToObject(gj, "crs", g->crs_name);
    cJSON_AddBoolToObject(gj, "geographic", g->geographic);
    cJSON_AddNumberToObject(gj, "columns", g->nx);
    cJSON_AddNumberToObject(gj, "rows", g->ny);
    cJSON_AddNumberToObject(gj, "cell_width_min_m", g->min_dx_m);
    cJSON_AddNumberToObject(gj, "cell_width_max_m", g->max_dx_m);
    cJSON_AddNumberToObject(gj, "cell_height_min_m", g->min_dy_m);
    cJSON_AddNumberToObject(gj, "cell_height_max_m", g->max_dy_m);
    cJSON_AddNumberToObject(gj, "people", g->total_people);
    cJSON_AddNumberToObject(gj, "populated_cells", (double)g->n_populated);
    cJSON_AddNumberToObject(gj, "nodata_cells", (double)g->n_nodata);
    cJSON_AddNumberToObject(gj, "nan_cells", (double)g->n_nan);
    cJSON_AddNumberToObject(gj, "people_on_barriers", g->people_on_barrier);
    cJSON_AddBoolToObject(gj, "landcover", g->landcover != NULL);
    cJSON_AddBoolToObject(gj, "elevation", g->elevation != NULL);
    cJSON_AddBoolToObject(gj, "barriers", g->barrier != NULL);
    if (in->roads != NULL) {
        const roads_t *rd = in->roads;
        cJSON *rj = cJSON_AddObjectToObject(r, "roads"), *cls;
        cJSON_AddStringToObject(rj, "path", in->scen->roads.path);
        cJSON_AddNumberToObject(rj, "features_read", (double)rd->n_features_read);
        cJSON_AddNumberToObject(rj, "features", (double)rd->n_features);
        cJSON_AddNumberToObject(rj, "features_clipped", (double)rd->n_features_clipped);
        cJSON_AddNumberToObject(rj, "features_skipped", (double)rd->n_features_skipped);
        cJSON_AddNumberToObject(rj, "length_km", rd->total_length_m / 1000.0);
        cJSON_AddNumberToObject(rj, "nodes", (double)rd->n_nodes);
        cJSON_AddNumberToObject(rj, "segments", (double)rd->n_segs);
        cJSON_AddNumberToObject(rj, "junctions", (double)rd->n_junctions);
        cJSON_AddNumberToObject(rj, "components", (double)in->road_components);
        cJSON_AddNumberToObject(rj, "largest_component_nodes", (double)in->road_largest);
        cJSON_AddNumberToObject(rj, "islands", (double)in->road_islands);
        cJSON_AddNumberToObject(rj, "island_people", in->island_people);
        cls = cJSON_AddArrayToObject(rj, "classes");
        for (size_t i = 0; i < rd->n_classes; i++) {
            const road_class_count_t *c = &rd->classes[i];
            cJSON *cj = cJSON_CreateObject();
            cJSON_AddStringToObject(cj, "class", c->name);
            cJSON_AddNumberToObject(cj, "features", (double)c->n_features);
            cJSON_AddNumberToObject(cj, "length_km", c->length_m / 1000.0);
            cJSON_AddNumberToObject(cj, "walk_kmh", c->walk_mps * 3.6);
            cJSON_AddNumberToObject(cj, "vehicle_kmh", c->vehicle_mps * 3.6);
            cJSON_AddBoolToObject(cj, "known", c->known);
            cJSON_AddItemToArray(cls, cj);
        }
    }
    pts = cJSON_AddArrayToObject(r, "points");
    if (in->existing) cJSON_AddItemToArray(pts, points_json(in, in->existing, "existing sites"));
    if (in->candidates) cJSON_AddItemToArray(pts, points_json(in, in->candidates, "candidate sites"));
    if (in->depots) cJSON_AddItemToArray(pts, points_json(in, in->depots, "depots"));
    w = cJSON_AddArrayToObject(r, "warnings");
    for (size_t i = 0; i < in->warnings.n; i++)
        cJSON_AddItemToArray(w, cJSON_CreateString(in->warnings.items[i]));
    *out = r;
    return ERR_OK;
}

/* variant: apply a what-if variant to the travel network (see include/variant.h).
 * Road closures and speed factors edit the weights of the road edges of the
 * matching segments (network_seg_edges); a flood closes the road segments whose
 * line intersects its polygons (GEOS through roads_segments_in_polygons) and
 * closes or slows every edge touching a cell whose centre lies inside (the
 * polygons burnt onto the grid like districts). Closed edges get +INFINITY, which
 * the searches skip. */
#include "variant.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "districts.h"

void variant_applied_destroy(variant_applied_t *a)
{
    if (a == NULL) return;
    free(a->sites.id);
    free(a->sites.name);
    free(a->sites.x);
    free(a->sites.y);
    free(a->sites.cell);
    free(a->sites.capacity);
    free(a->sites.cost);
    free(a->sites.storage_m3);
    memset(a, 0, sizeof *a);
}

void variant_slug(const char *name, char *buf, size_t n)
{
    size_t k = 0;
    int under = 0;
    if (n == 0) return;
    for (const char *p = name; *p != '\0' && k + 1 < n; p++) {
        char c = *p;
        int ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                 c == '-';
        if (ok) {
            buf[k++] = (c >= 'A' && c <= 'Z') ? (char)(c - 'A' + 'a') : c;
            under = 0;
        } else if (!under && k > 0) {
            buf[k++] = '_';
            under = 1;
        }
    }
    while (k > 0 && buf[k - 1] == '_') k--;
    if (k == 0 && n > 8) k = (size_t)snprintf(buf, n, "variant");
    buf[k] = '\0';
}

static long find_id(const points_t *p, const char *id)
{
    if (p == NULL) return -1;
    for (size_t i = 0; i < p->n; i++)
        if (strcmp(p->id[i], id) == 0) return (long)i;
    return -1;
}

static long find_road(const roads_t *r, const char *id)
{
    if (r == NULL) return -1;
    for (size_t i = 0; i < r->n_features; i++)
        if (strcmp(r->feature_ids[i], id) == 0) return (long)i;
    return -1;
}

/* The value of road field 'field' on segment i: its class for the class field,
 * else the kept attribute; NULL when the field was not kept. */
static const char *seg_value(const inputs_t *in, size_t i, const char *field)
{
    const roads_t *r = in->roads;
    const char *cls = in->scen->road_class_field ? in->scen->road_class_field : "highway";
    if (strcmp(field, cls) == 0) return r->classes[r->segs[i].cls].name;
    return roads_attr(r, (size_t)r->segs[i].feature, field);
}

int variant_validate(const inputs_t *in, const scen_variant_t *v, err_t *e)
{
    const roads_t *r = in->roads;

    for (size_t i = 0; i < v->n_close_road_ids; i++)
        if (find_road(r, v->close_road_ids[i]) < 0)
            return err_set(e, ERR_INPUT, "variant '%s': road '%s' is not in the road layer '%s' "
                           "(or lies wholly outside the population grid)", v->name,
                           v->close_road_ids[i], in->scen->roads.path ? in->scen->roads.path
                                                                      : "(none)");
    for (size_t k = 0; r != NULL && r->n_features > 0 && k < v->n_close_where + v->n_speed;
         k++) {
        const char *f = k < v->n_close_where ? v->close_where[k].field
                                             : v->speed[k - v->n_close_where].field;
        if (r->n_segs > 0 && seg_value(in, 0, f) == NULL)
            return err_set(e, ERR_INTERNAL, "variant '%s': road field '%s' was not kept when "
                           "the roads were read", v->name, f);
    }
    for (size_t i = 0; i < v->n_close_sites; i++)
        if (find_id(in->existing, v->close_sites[i]) < 0)
            return err_set(e, ERR_INPUT, "variant '%s': site '%s' in close_sites is not an "
                           "existing site (sites.existing)", v->name, v->close_sites[i]);
    for (size_t i = 0; i < v->n_open_sites; i++) {
        if (find_id(in->candidates, v->open_sites[i]) < 0)
            return err_set(e, ERR_INPUT, "variant '%s': site '%s' in open_sites is not a "
                           "candidate site (sites.candidates)", v->name, v->open_sites[i]);
        if (find_id(in->existing, v->open_sites[i]) >= 0)
            return err_set(e, ERR_INPUT, "variant '%s': site '%s' in open_sites is also an "
                           "existing site; ids must be told apart", v->name, v->open_sites[i]);
    }
    for (size_t i = 0; i < v->n_capacity; i++) {
        const char *id = v->capacity_ids[i];
        int opened = 0, closed = 0;
        for (size_t j = 0; j < v->n_open_sites; j++) opened |= strcmp(v->open_sites[j], id) == 0;
        for (size_t j = 0; j < v->n_close_sites; j++) closed |= strcmp(v->close_sites[j], id) == 0;
        if ((find_id(in->existing, id) < 0 && !opened) || closed)
            return err_set(e, ERR_INPUT, "variant '%s': site '%s' in capacity is not open in "
                           "this variant (existing and not closed, or in open_sites)", v->name,
                           id);
    }
    return ERR_OK;
}

/* The variant's open sites: existing minus closed, plus opened candidates, with
 * capacities overridden. */
static int build_sites(const inputs_t *in, const scen_variant_t *v, variant_applied_t *a,
                       err_t *e)
{
    size_t n_ex = in->existing ? in->existing->n : 0, cap = n_ex + v->n_open_sites, k = 0;
    points_t *s = &a->sites;
    size_t m = cap ? cap : 1;

    s->id = calloc(m, sizeof *s->id);
    s->name = calloc(m, sizeof *s->name);
    s->x = calloc(m, sizeof *s->x);
    s->y = calloc(m, sizeof *s->y);
    s->cell = calloc(m, sizeof *s->cell);
    s->capacity = calloc(m, sizeof *s->capacity);
    s->cost = calloc(m, sizeof *s->cost);
    s->storage_m3 = calloc(m, sizeof *s->storage_m3);
    if (!s->id || !s->name || !s->x || !s->y || !s->cell || !s->capacity || !s->cost ||
        !s->storage_m3)
        return err_set(e, ERR_NOMEM, "out of memory for the sites of variant '%s'", v->name);
    for (size_t pass = 0; pass < 2; pass++) {
        const points_t *p = pass == 0 ? in->existing : in->candidates;
        size_t n = p ? p->n : 0;
        for (size_t i = 0; i < n; i++) {
            int take = 1;
            if (pass == 0) {
                for (size_t j = 0; j < v->n_close_sites; j++)
                    if (strcmp(v->close_sites[j], p->id[i]) == 0) take = 0;
                if (!take) a->sites_closed++;
            } else {
                take = 0;
                for (size_t j = 0; j < v->n_open_sites; j++)
                    if (strcmp(v->open_sites[j], p->id[i]) == 0) take = 1;
                if (take) a->sites_opened++;
            }
            if (!take) continue;
            s->id[k] = p->id[i];
            s->name[k] = p->name[i];
            s->x[k] = p->x[i];
            s->y[k] = p->y[i];
            s->cell[k] = p->cell[i];
            s->capacity[k] = p->capacity[i];
            s->cost[k] = p->cost[i];
            s->storage_m3[k] = p->storage_m3[i];
            for (size_t j = 0; j < v->n_capacity; j++)
                if (strcmp(v->capacity_ids[j], p->id[i]) == 0) s->capacity[k] = v->capacity[j];
            k++;
        }
    }
    s->n = k;
    return ERR_OK;
}

/* Close (factor 0) or slow the road edges of segment i, once. */
static int edit_seg(network_t *net, size_t i, double factor, err_t *e)
{
    int64_t first, n;
    int rc;
    if (!network_seg_edges(net, i, &first, &n)) return ERR_OK;
    for (int64_t k = first; k < first + n; k++) {
        double w = network_edge_weight(net, k);
        if (!isfinite(w)) continue;
        if ((rc = network_edit_edge(net, k, factor > 0 ? w / factor : INFINITY, e)) != ERR_OK)
            return rc;
    }
    return ERR_OK;
}

int variant_apply(network_t *net, const inputs_t *in, const scen_variant_t *v,
                  variant_applied_t *out, err_t *e)
{
    const roads_t *r = in->roads;
    size_t n_segs = r ? r->n_segs : 0;
    double *seg_factor = NULL;   /* per segment: 0 closed, else the speed factor */
    uint8_t *feat_hit = NULL, *flood_hit = NULL, *mask = NULL;
    districts_t *fl = NULL;
    size_t n_cells = (size_t)in->grid->nx * (size_t)in->grid->ny;
    int rc;

    memset(out, 0, sizeof *out);
    if ((rc = variant_validate(in, v, e)) != ERR_OK) goto done;
    if ((rc = build_sites(in, v, out, e)) != ERR_OK) goto done;
    seg_factor = malloc((n_segs ? n_segs : 1) * sizeof *seg_factor);
    feat_hit = calloc(r && r->n_features ? r->n_features : 1, 1);
    flood_hit = calloc(n_segs ? n_segs : 1, 1);
    if (seg_factor == NULL || feat_hit == NULL || flood_hit == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory applying variant '%s'", v->name);
        goto done;
    }
    for (size_t i = 0; i < n_segs; i++) seg_factor[i] = 1.0;

    /* Speed factors multiply when several match a segment. */
    for (size_t i = 0; i < n_segs; i++) {
        int slowed = 0;
        for (size_t k = 0; k < v->n_speed; k++) {
            const char *val = seg_value(in, i, v->speed[k].field);
            if (val != NULL && strcmp(val, v->speed[k].value) == 0) {
                seg_factor[i] *= v->speed[k].factor;
                slowed = 1;
            }
        }
        out->segs_slowed += slowed;
    }
    /* Closures by id and by attribute. */
    for (size_t k = 0; k < v->n_close_road_ids; k++)
        feat_hit[find_road(r, v->close_road_ids[k])] = 1;   /* validated above */
    for (size_t i = 0; i < n_segs; i++) {
        int32_t f = r->segs[i].feature;
        int closed = feat_hit[f];
        for (size_t k = 0; k < v->n_close_where && !closed; k++) {
            const char *val = seg_value(in, i, v->close_where[k].field);
            for (size_t j = 0; val != NULL && j < v->close_where[k].n_values; j++)
                if (strcmp(val, v->close_where[k].values[j]) == 0) closed = 1;
        }
        if (closed) {
            feat_hit[f] = 1;
            seg_factor[i] = 0.0;
            out->segs_closed++;
        }
    }
    for (size_t f = 0; r != NULL && f < r->n_features; f++) out->features_closed += feat_hit[f];

    if (v->flood.path != NULL) {
        size_t n_hit = 0, n_poly = 0;
        if (v->flood_cut_roads && n_segs > 0) {
            rc = roads_segments_in_polygons(r, in->grid, &v->flood, flood_hit, &n_hit, &n_poly, e);
            if (rc != ERR_OK) {
                err_prefix(e, "variant '%s': ", v->name);
                goto done;
            }
            for (size_t i = 0; i < n_segs; i++)
                if (flood_hit[i]) seg_factor[i] = 0.0;
            out->segs_flooded = n_hit;
        }
        rc = districts_load(&v->flood, in->grid, &fl, e);
        if (rc != ERR_OK) {
            err_prefix(e, "variant '%s': flood extent: ", v->name);
            goto done;
        }
        mask = calloc(n_cells, 1);
        if (mask == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory applying variant '%s'", v->name);
            goto done;
        }
        for (size_t c = 0; c < n_cells; c++)
            if (fl->cell[c] >= 0) {
                mask[c] = 1;
                out->cells_flooded++;
                out->people_flooded += in->grid->people[c];
            }
    }

    for (size_t i = 0; i < n_segs; i++)
        if (seg_factor[i] != 1.0 && (rc = edit_seg(net, i, seg_factor[i], e)) != ERR_OK)
            goto done;
    if (mask != NULL && (rc = network_edit_cells(net, mask, v->flood_cell_factor, NULL, e)) !=
        ERR_OK)
        goto done;
    out->edges_changed = network_n_edits(net);
done:
    if (rc != ERR_OK) {
        network_edit_reset(net);
        variant_applied_destroy(out);
    }
    free(seg_factor);
    free(feat_hit);
    free(flood_hit);
    free(mask);
    districts_free(fl);
    return rc;
}

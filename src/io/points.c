/* points: facility, candidate and depot point layers (see include/points.h).
 * Reads any OGR point layer (one point per feature; a MultiPoint holding one
 * point is accepted), reprojects it onto the grid's CRS and places each point
 * in its cell with the grid's own numbering, cell = row * nx + col, where
 * col = floor((x - gt[0]) / gt[1]) and row = floor((y - gt[3]) / gt[5]).
 * Every problem with a site is an error naming the site, because a plan built
 * on a misplaced or misread site is wrong without saying so. Wraps GDAL/OGR. */
#include "points.h"

#include <cpl_conv.h>
#include <cpl_string.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "ogr_util.h"

#define ATTR_MAX 256
/* How many ids an error message lists before "and N more". */
#define LIST_MAX 10

void points_free(points_t *p)
{
    if (p == NULL) return;
    for (size_t i = 0; i < p->n; i++) {
        free(p->id[i]);
        free(p->name[i]);
    }
    free(p->id);
    free(p->name);
    free(p->x);
    free(p->y);
    free(p->cell);
    free(p->capacity);
    free(p->cost);
    free(p->storage_m3);
    free(p);
}

/* Make room for n+1 points; the arrays are reallocated together. */
static int points_reserve(points_t *p, size_t *cap)
{
    size_t nc;

    if (p->n < *cap) return 0;
    nc = *cap ? 2 * *cap : 16;
#define GROW(field)                                                 \
    do {                                                            \
        void *q_ = realloc(p->field, nc * sizeof *p->field);        \
        if (q_ == NULL) return -1;                                  \
        p->field = q_;                                              \
    } while (0)
    GROW(id);
    GROW(name);
    GROW(x);
    GROW(y);
    GROW(cell);
    GROW(capacity);
    GROW(cost);
    GROW(storage_m3);
#undef GROW
    *cap = nc;
    return 0;
}

/* Append ", id" to a list of at most LIST_MAX ids; *count counts them all. */
static void list_add(char *buf, size_t n, size_t *count, const char *id)
{
    size_t used = strlen(buf);
    if (*count < LIST_MAX && used < n)
        snprintf(buf + used, n - used, "%s%s", *count ? ", " : "", id);
    (*count)++;
}

/* Finish a list: " and N more" when it was cut. */
static void list_end(char *buf, size_t n, size_t count)
{
    size_t used = strlen(buf);
    if (count > LIST_MAX && used < n)
        snprintf(buf + used, n - used, " and %zu more", count - LIST_MAX);
}

/* Read a numeric attribute of site 'id' into *v. A field that is not named
 * leaves *v = dflt. An empty value, text that is not a number, NaN or a
 * negative number is an error; +inf is allowed only when inf_ok. */
static int read_number(const ogr_util_attr_t *a, OGRFeatureH f, double dflt, int inf_ok,
                       const char *what, const char *path, const char *id, const char *role,
                       double *v, err_t *e)
{
    char s[ATTR_MAX], *end = NULL;

    *v = dflt;
    if (a->key == NULL) return ERR_OK;
    ogr_util_attr_get(a, f, s, sizeof s);
    if (s[0] == '\0')
        return err_set(e, ERR_INPUT, "%s '%s' in '%s' has no value in %s field '%s'", what, id,
                       path, role, a->key);
    errno = 0;
    *v = strtod(s, &end);
    while (end && (*end == ' ' || *end == '\t')) end++;
    if (end == s || *end != '\0' || isnan(*v))
        return err_set(e, ERR_INPUT, "%s '%s' in '%s': %s field '%s' holds '%s', not a number",
                       what, id, path, role, a->key, s);
    if (*v < 0.0)
        return err_set(e, ERR_INPUT, "%s '%s' in '%s' has a negative %s (%s) in field '%s'",
                       what, id, path, role, s, a->key);
    if (isinf(*v) && !inf_ok)
        return err_set(e, ERR_INPUT, "%s '%s' in '%s' has an infinite %s in field '%s'", what,
                       id, path, role, a->key);
    return ERR_OK;
}

static int cmp_str(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

int points_load(const scen_layer_t *l, const char *what, const grid_t *g,
                points_t **out, err_t *e)
{
    GDALDatasetH ds = NULL;
    OGRLayerH lay = NULL;
    OGRFeatureH f = NULL;
    ogr_util_crs_t crs;
    int have_crs = 0, rc = ERR_OK;
    points_t *p = NULL;
    size_t cap = 0;
    char **sorted = NULL;
    const char *path = l->path, *lname;
    ogr_util_attr_t a_id, a_name, a_cap, a_cost, a_stor;

    *out = NULL;
    if ((rc = ogr_util_open(path, what, &ds, e)) != ERR_OK) goto done;
    if ((rc = ogr_util_layer(ds, path, l->layer, "points", &lay, e)) != ERR_OK) goto done;
    lname = OGR_L_GetName(lay);
    {
        OGRwkbGeometryType t = wkbFlatten(OGR_L_GetGeomType(lay));
        if (t != wkbUnknown && t != wkbPoint && t != wkbMultiPoint) {
            rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has %s geometries; %s must be points",
                         path, lname, t == wkbNone ? "no" : OGRGeometryTypeToName(t), what);
            goto done;
        }
    }
    /* Named fields must exist (in their own column or, for OSM, in other_tags). */
    {
        const char *names[5] = {l->id_field, l->name_field, l->capacity_field, l->cost_field,
                                l->storage_field};
        ogr_util_attr_t *as[5] = {&a_id, &a_name, &a_cap, &a_cost, &a_stor};
        for (int k = 0; k < 5; k++) {
            if (names[k] == NULL) {
                as[k]->key = NULL;
                as[k]->field = as[k]->tags = -1;
                continue;
            }
            if (!ogr_util_attr_init(as[k], lay, names[k])) {
                char fl[300];
                ogr_util_field_list(lay, fl, sizeof fl);
                rc = err_set(e, ERR_INPUT, "%s: '%s' layer '%s' has no field '%s'; fields "
                             "present: %s", what, path, lname, names[k], fl);
                goto done;
            }
        }
    }
    if ((rc = ogr_util_crs_init(&crs, lay, path, g->wkt, e)) != ERR_OK) goto done;
    have_crs = 1;
    p = calloc(1, sizeof *p);
    if (p == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading %s", what);
        goto done;
    }

    OGR_L_ResetReading(lay);
    while ((f = OGR_L_GetNextFeature(lay)) != NULL) {
        char id[ATTR_MAX], nm[ATTR_MAX];
        OGRGeometryH geom = OGR_F_GetGeometryRef(f);
        OGRwkbGeometryType t;
        size_t i = p->n;

        if (a_id.key != NULL) ogr_util_attr_get(&a_id, f, id, sizeof id);
        else snprintf(id, sizeof id, "%lld", (long long)OGR_F_GetFID(f));
        if (id[0] == '\0') {
            rc = err_set(e, ERR_INPUT, "%s: feature %lld in '%s' has no value in id field '%s'",
                         what, (long long)OGR_F_GetFID(f), path, a_id.key);
            goto done;
        }
        if (geom == NULL || OGR_G_IsEmpty(geom)) {
            rc = err_set(e, ERR_INPUT, "%s '%s' in '%s' has no geometry", what, id, path);
            goto done;
        }
        t = wkbFlatten(OGR_G_GetGeometryType(geom));
        if (t == wkbMultiPoint) {
            int np = OGR_G_GetGeometryCount(geom);
            if (np != 1) {
                rc = err_set(e, ERR_INPUT, "%s '%s' in '%s' is a MultiPoint of %d points; give "
                             "one point per site", what, id, path, np);
                goto done;
            }
            geom = OGR_G_GetGeometryRef(geom, 0);
        } else if (t != wkbPoint) {
            rc = err_set(e, ERR_INPUT, "%s '%s' in '%s' is a %s; %s must be points", what, id,
                         path, OGRGeometryTypeToName(t), what);
            goto done;
        }
        if (points_reserve(p, &cap)) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading %s", what);
            goto done;
        }
        p->id[i] = NULL;
        p->name[i] = NULL;
        p->x[i] = OGR_G_GetX(geom, 0);
        p->y[i] = OGR_G_GetY(geom, 0);
        if (ogr_util_crs_apply(&crs, 1, &p->x[i], &p->y[i]) > 0) {
            rc = err_set(e, ERR_INPUT, "%s '%s' in '%s' cannot be reprojected onto the "
                         "population grid's CRS", what, id, path);
            goto done;
        }
        if ((rc = read_number(&a_cap, f, INFINITY, 1, what, path, id, "capacity",
                              &p->capacity[i], e)) != ERR_OK ||
            (rc = read_number(&a_cost, f, 0.0, 0, what, path, id, "cost", &p->cost[i], e)) !=
                ERR_OK ||
            (rc = read_number(&a_stor, f, INFINITY, 1, what, path, id, "storage",
                              &p->storage_m3[i], e)) != ERR_OK)
            goto done;
        nm[0] = '\0';
        if (a_name.key != NULL) ogr_util_attr_get(&a_name, f, nm, sizeof nm);
        /* Names end up in JSON and HTML, which must be UTF-8: a layer in another
         * encoding keeps its ASCII letters and shows '?' for the rest. */
        if (!CPLIsUTF8(nm, -1)) {
            char *a = CPLForceToASCII(nm, -1, '?');
            snprintf(nm, sizeof nm, "%s", a);
            CPLFree(a);
        }
        p->id[i] = strdup(id);
        p->name[i] = strdup(nm);
        p->n++;   /* counted now so points_free releases the strings */
        if (p->id[i] == NULL || p->name[i] == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading %s", what);
            goto done;
        }
        OGR_F_Destroy(f);
        f = NULL;
    }

    /* Duplicate ids: sort a copy of the pointers and compare neighbours. */
    if (p->n > 1) {
        sorted = malloc(p->n * sizeof *sorted);
        if (sorted == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading %s", what);
            goto done;
        }
        memcpy(sorted, p->id, p->n * sizeof *sorted);
        qsort(sorted, p->n, sizeof *sorted, cmp_str);
        for (size_t i = 1; i < p->n; i++) {
            if (strcmp(sorted[i - 1], sorted[i]) == 0) {
                rc = err_set(e, ERR_INPUT, "%s: id '%s' appears more than once in '%s'; ids "
                             "must be unique", what, sorted[i], path);
                goto done;
            }
        }
    }

    /* Cells; points outside the grid, then points on barriers, are errors. */
    {
        char out_ids[300] = "", bar_ids[300] = "";
        size_t n_out = 0, n_bar = 0;
        for (size_t i = 0; i < p->n; i++) {
            double c = floor((p->x[i] - g->gt[0]) / g->gt[1]);
            double r = floor((p->y[i] - g->gt[3]) / g->gt[5]);
            if (!(c >= 0 && c < g->nx && r >= 0 && r < g->ny)) {
                p->cell[i] = -1;
                list_add(out_ids, sizeof out_ids, &n_out, p->id[i]);
                continue;
            }
            p->cell[i] = (int64_t)r * g->nx + (int64_t)c;
            if (g->barrier != NULL && g->barrier[p->cell[i]])
                list_add(bar_ids, sizeof bar_ids, &n_bar, p->id[i]);
        }
        list_end(out_ids, sizeof out_ids, n_out);
        list_end(bar_ids, sizeof bar_ids, n_bar);
        if (n_out > 0) {
            rc = err_set(e, ERR_INPUT, "%s: %zu point%s in '%s' lie%s outside the population "
                         "grid: %s", what, n_out, n_out == 1 ? "" : "s", path,
                         n_out == 1 ? "s" : "", out_ids);
            goto done;
        }
        if (n_bar > 0) {
            rc = err_set(e, ERR_INPUT, "%s: %zu point%s in '%s' lie%s on barrier cells "
                         "(impassable): %s; move %s onto passable ground", what, n_bar,
                         n_bar == 1 ? "" : "s", path, n_bar == 1 ? "s" : "", bar_ids,
                         n_bar == 1 ? "it" : "them");
            goto done;
        }
    }
    *out = p;
    p = NULL;
done:
    if (f != NULL) OGR_F_Destroy(f);
    if (have_crs) ogr_util_crs_destroy(&crs);
    if (ds != NULL) GDALClose(ds);
    free(sorted);
    points_free(p);
    return rc;
}

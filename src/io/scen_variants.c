/* scen_variants: reader of the scenario's "variants" section (see
 * include/scen_variants.h and docs/whatif.md). Strict like the rest of the
 * scenario: unknown keys, empty or duplicate names, speed factors <= 0 and an
 * empty variant are errors naming the key path. Ids of roads and sites are
 * checked later against the loaded layers (src/whatif/variant.c). */
#include "scen_variants.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "scen_sections.h"

static const char *const VARIANT_KEYS[] = {"name", "close_roads", "road_speed_factors", "flood",
                                           "close_sites", "open_sites", "capacity", NULL};
static const char *const CLOSE_KEYS[] = {"ids", "where", NULL};
static const char *const FLOOD_KEYS[] = {"path", "layer", "cells", "cut_roads", NULL};

#define MAX_VARIANTS 64

static void variant_free(scen_variant_t *v)
{
    for (size_t i = 0; i < v->n_close_road_ids; i++) free(v->close_road_ids[i]);
    free(v->close_road_ids);
    for (size_t i = 0; i < v->n_close_where; i++) {
        free(v->close_where[i].field);
        for (size_t j = 0; j < v->close_where[i].n_values; j++) free(v->close_where[i].values[j]);
        free(v->close_where[i].values);
    }
    free(v->close_where);
    for (size_t i = 0; i < v->n_speed; i++) {
        free(v->speed[i].field);
        free(v->speed[i].value);
    }
    free(v->speed);
    free(v->flood.path);
    free(v->flood.layer);
    for (size_t i = 0; i < v->n_close_sites; i++) free(v->close_sites[i]);
    free(v->close_sites);
    for (size_t i = 0; i < v->n_open_sites; i++) free(v->open_sites[i]);
    free(v->open_sites);
    for (size_t i = 0; i < v->n_capacity; i++) free(v->capacity_ids[i]);
    free(v->capacity_ids);
    free(v->capacity);
    free(v->name);
}

void scen_variants_free(struct scen_variants *x)
{
    if (x == NULL) return;
    for (size_t i = 0; i < x->n; i++) variant_free(&x->v[i]);
    free(x->v);
    for (size_t i = 0; i < x->n_road_fields; i++) free(x->road_fields[i]);
    free(x->road_fields);
    free(x);
}

/* A non-empty array of non-empty, distinct strings under obj[key] into *out. */
static int string_list(const jsonv_node_t *obj, const char *key, char ***out, size_t *n,
                       err_t *e)
{
    jsonv_node_t arr, it;
    size_t m = 0, i = 0;
    const cJSON *c;
    int rc;

    *out = NULL;
    *n = 0;
    if ((rc = jsonv_array(obj, key, 0, 1, 100000, &arr, &m, e)) != ERR_OK || m == 0) return rc;
    *out = calloc(m, sizeof **out);
    if (*out == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", obj->file);
    cJSON_ArrayForEach(c, arr.json) {
        jsonv_member(&arr, c, i, &it);
        if ((rc = jsonv_as_string(&it, 0, &(*out)[i], e)) != ERR_OK) return rc;
        *n = ++i;
        for (size_t j = 0; j + 1 < i; j++)
            if (strcmp((*out)[j], (*out)[i - 1]) == 0)
                return err_set(e, ERR_INPUT, "%s: key '%s' lists '%s' twice", obj->file,
                               arr.path, (*out)[j]);
    }
    return ERR_OK;
}

/* Remember a road attribute field the variants test (the class field excepted). */
static int note_field(struct scen_variants *x, const scen_t *s, const char *field,
                      const char *file, err_t *e)
{
    const char *cls = s->road_class_field ? s->road_class_field : "highway";
    char **p;

    if (strcmp(field, cls) == 0) return ERR_OK;
    for (size_t i = 0; i < x->n_road_fields; i++)
        if (strcmp(x->road_fields[i], field) == 0) return ERR_OK;
    p = realloc(x->road_fields, (x->n_road_fields + 1) * sizeof *p);
    if (p == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", file);
    x->road_fields = p;
    if ((p[x->n_road_fields] = strdup(field)) == NULL)
        return err_set(e, ERR_NOMEM, "%s: out of memory", file);
    x->n_road_fields++;
    return ERR_OK;
}

/* "close_roads": {"ids": [...], "where": {"field": ["value", ...], ...}}. */
static int read_close(const jsonv_node_t *vn, struct scen_variants *x, const scen_t *s,
                      scen_variant_t *v, err_t *e)
{
    jsonv_node_t cr, wh, m;
    size_t i = 0;
    int rc;

    if ((rc = jsonv_object(vn, "close_roads", 0, CLOSE_KEYS, &cr, e)) != ERR_OK ||
        cr.json == NULL)
        return rc;
    if ((rc = string_list(&cr, "ids", &v->close_road_ids, &v->n_close_road_ids, e)) != ERR_OK ||
        (rc = jsonv_object(&cr, "where", 0, NULL, &wh, e)) != ERR_OK)
        return rc;
    if (wh.json != NULL) {
        size_t n = (size_t)cJSON_GetArraySize(wh.json);
        v->close_where = calloc(n ? n : 1, sizeof *v->close_where);
        if (v->close_where == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
        for (const cJSON *c = wh.json->child; c != NULL; c = c->next, i++) {
            scen_road_match_t *rm = &v->close_where[i];
            jsonv_member(&wh, c, i, &m);
            v->n_close_where = i + 1;
            if (c->string[0] == '\0')
                return err_set(e, ERR_INPUT, "%s: key '%s' has an empty field name", vn->file,
                               wh.path);
            if ((rm->field = strdup(c->string)) == NULL)
                return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
            if ((rc = string_list(&wh, c->string, &rm->values, &rm->n_values, e)) != ERR_OK)
                return rc;
            if (rm->n_values == 0)
                return err_set(e, ERR_INPUT, "%s: key '%s' must list at least one value",
                               vn->file, m.path);
            if ((rc = note_field(x, s, rm->field, vn->file, e)) != ERR_OK) return rc;
        }
    }
    if (v->n_close_road_ids == 0 && v->n_close_where == 0)
        return err_set(e, ERR_INPUT, "%s: key '%s' needs 'ids' or 'where'", vn->file, cr.path);
    return ERR_OK;
}

/* "road_speed_factors": {"field": {"value": factor, ...}, ...}. */
static int read_speed(const jsonv_node_t *vn, struct scen_variants *x, const scen_t *s,
                      scen_variant_t *v, err_t *e)
{
    jsonv_node_t sf, fo, m;
    size_t n = 0, i = 0, k = 0;
    int rc;

    if ((rc = jsonv_object(vn, "road_speed_factors", 0, NULL, &sf, e)) != ERR_OK ||
        sf.json == NULL)
        return rc;
    for (const cJSON *c = sf.json->child; c != NULL; c = c->next)
        n += (size_t)cJSON_GetArraySize(c);
    if (n == 0)
        return err_set(e, ERR_INPUT, "%s: key '%s' must give at least one factor", vn->file,
                       sf.path);
    v->speed = calloc(n, sizeof *v->speed);
    if (v->speed == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
    for (const cJSON *c = sf.json->child; c != NULL; c = c->next, i++) {
        if ((rc = jsonv_object(&sf, c->string, 0, NULL, &fo, e)) != ERR_OK) return rc;
        if (c->string[0] == '\0')
            return err_set(e, ERR_INPUT, "%s: key '%s' has an empty field name", vn->file,
                           sf.path);
        if ((rc = note_field(x, s, c->string, vn->file, e)) != ERR_OK) return rc;
        size_t j = 0;
        for (const cJSON *d = fo.json->child; d != NULL; d = d->next, j++) {
            scen_road_factor_t *rf = &v->speed[k];
            jsonv_member(&fo, d, j, &m);
            rf->field = strdup(c->string);
            rf->value = strdup(d->string);
            v->n_speed = ++k;
            if (rf->field == NULL || rf->value == NULL)
                return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
            /* A factor of 0 would close the roads: say so with close_roads instead. */
            if ((rc = jsonv_as_number(&m, JSONV_OPEN_CLOSED(0, 10), &rf->factor, e)) != ERR_OK)
                return rc;
        }
    }
    return ERR_OK;
}

static int read_flood(const jsonv_node_t *vn, const scen_t *s, scen_variant_t *v, err_t *e)
{
    jsonv_node_t fl, cells;
    int rc;

    v->flood_cut_roads = 1;
    if ((rc = jsonv_object(vn, "flood", 0, FLOOD_KEYS, &fl, e)) != ERR_OK || fl.json == NULL)
        return rc;
    if ((rc = jsonv_string(&fl, "path", JSONV_REQUIRED, NULL, &v->flood.path, e)) != ERR_OK ||
        (rc = jsonv_string(&fl, "layer", JSONV_NULLABLE, NULL, &v->flood.layer, e)) != ERR_OK ||
        (rc = jsonv_bool(&fl, "cut_roads", 0, 1, &v->flood_cut_roads, e)) != ERR_OK)
        return rc;
    /* Relative paths are relative to the scenario file's folder. */
    if (v->flood.path[0] != '/' && strcmp(s->dir, ".") != 0) {
        size_t n = strlen(s->dir) + strlen(v->flood.path) + 2;
        char *p = malloc(n);
        if (p == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
        snprintf(p, n, "%s/%s", s->dir, v->flood.path);
        free(v->flood.path);
        v->flood.path = p;
    }
    jsonv_child(&fl, "cells", &cells);
    v->flood_cell_factor = 0.0;
    if (cells.json != NULL && cJSON_IsString(cells.json)) {
        if (strcmp(cells.json->valuestring, "impassable") != 0)
            return err_set(e, ERR_INPUT, "%s: key '%s' is \"%s\"; use \"impassable\" or a "
                           "walking-speed factor in (0, 1]", vn->file, cells.path,
                           cells.json->valuestring);
    } else if (cells.json != NULL) {
        if ((rc = jsonv_as_number(&cells, JSONV_OPEN_CLOSED(0, 1), &v->flood_cell_factor, e)) !=
            ERR_OK)
            return rc;
    }
    return ERR_OK;
}

/* "capacity": {"site id": persons, ...}. */
static int read_capacity(const jsonv_node_t *vn, scen_variant_t *v, err_t *e)
{
    jsonv_node_t co, m;
    size_t n, i = 0;
    int rc;

    if ((rc = jsonv_object(vn, "capacity", 0, NULL, &co, e)) != ERR_OK || co.json == NULL)
        return rc;
    n = (size_t)cJSON_GetArraySize(co.json);
    if (n == 0)
        return err_set(e, ERR_INPUT, "%s: key '%s' must give at least one site", vn->file,
                       co.path);
    v->capacity_ids = calloc(n, sizeof *v->capacity_ids);
    v->capacity = calloc(n, sizeof *v->capacity);
    if (v->capacity_ids == NULL || v->capacity == NULL)
        return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
    for (const cJSON *c = co.json->child; c != NULL; c = c->next, i++) {
        jsonv_member(&co, c, i, &m);
        if ((v->capacity_ids[i] = strdup(c->string)) == NULL)
            return err_set(e, ERR_NOMEM, "%s: out of memory", vn->file);
        v->n_capacity = i + 1;
        if ((rc = jsonv_as_number(&m, JSONV_CLOSED(0, 1e12), &v->capacity[i], e)) != ERR_OK)
            return rc;
    }
    return ERR_OK;
}

int scen_variants_read(const jsonv_node_t *root, const scen_t *s, struct scen_variants **out,
                       err_t *e)
{
    struct scen_variants *x = NULL;
    jsonv_node_t arr, vn;
    size_t n = 0, i = 0;
    const cJSON *c;
    int rc;

    *out = NULL;
    if ((rc = jsonv_array(root, "variants", 0, 1, MAX_VARIANTS, &arr, &n, e)) != ERR_OK ||
        arr.json == NULL)
        return rc;
    x = calloc(1, sizeof *x);
    if (x == NULL || (x->v = calloc(n, sizeof *x->v)) == NULL) {
        rc = err_set(e, ERR_NOMEM, "%s: out of memory", root->file);
        goto done;
    }
    x->present = 1;
    cJSON_ArrayForEach(c, arr.json) {
        scen_variant_t *v = &x->v[i];
        jsonv_member(&arr, c, i, &vn);
        x->n = ++i;
        v->flood_cut_roads = 1;
        if ((rc = jsonv_as_object(&vn, VARIANT_KEYS, e)) != ERR_OK ||
            (rc = jsonv_string(&vn, "name", JSONV_REQUIRED, NULL, &v->name, e)) != ERR_OK ||
            (rc = read_close(&vn, x, s, v, e)) != ERR_OK ||
            (rc = read_speed(&vn, x, s, v, e)) != ERR_OK ||
            (rc = read_flood(&vn, s, v, e)) != ERR_OK ||
            (rc = string_list(&vn, "close_sites", &v->close_sites, &v->n_close_sites, e)) !=
                ERR_OK ||
            (rc = string_list(&vn, "open_sites", &v->open_sites, &v->n_open_sites, e)) !=
                ERR_OK ||
            (rc = read_capacity(&vn, v, e)) != ERR_OK)
            goto done;
        for (size_t j = 0; j + 1 < i; j++)
            if (strcmp(x->v[j].name, v->name) == 0) {
                rc = err_set(e, ERR_INPUT, "%s: variants[%zu] and variants[%zu] are both named "
                             "'%s'; names must differ", root->file, j, i - 1, v->name);
                goto done;
            }
        if (strcmp(v->name, "base") == 0) {
            rc = err_set(e, ERR_INPUT, "%s: '%s.name' is 'base', which names the scenario "
                         "without changes; pick another name", root->file, vn.path);
            goto done;
        }
        if (v->n_close_road_ids + v->n_close_where + v->n_speed + v->n_close_sites +
            v->n_open_sites + v->n_capacity == 0 && v->flood.path == NULL) {
            rc = err_set(e, ERR_INPUT, "%s: '%s' (%s) changes nothing; give close_roads, "
                         "road_speed_factors, flood, close_sites, open_sites or capacity",
                         root->file, vn.path, v->name);
            goto done;
        }
    }
    *out = x;
    x = NULL;
done:
    scen_variants_free(x);
    return rc;
}

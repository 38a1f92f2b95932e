/* scenario: read one planning case from a JSON file (see include/scenario.h
 * and docs/scenario.md). Strictness comes from jsonv: every object's keys are
 * checked, every value typed and ranged, and every message names the file and
 * the full key path. File units (km/h, minutes) become SI here and nowhere else.
 * Later sections (siting, supply, variants, output) are added by their modules:
 * each adds its key to TOP_KEYS and a reader called from scen_parse. */
#include "scenario.h"

#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "jsonv.h"
#include "scen_sections.h"

#define KMH 3.6  /* km/h per m/s */
#define MIN 60.0 /* seconds per minute */

/* Scenario files are a few kB; anything this big is the wrong file. */
#define SCEN_MAX_BYTES (16L * 1024 * 1024)

/* Default speeds per OSM highway class, km/h. Common practice, no source:
 * round figures for a mixed, partly unpaved network; see docs/scenario.md. */
static const struct {
    const char *name;
    double walk_kmh, vehicle_kmh;
} DEFAULT_SPEEDS[] = {
    {"motorway", 5, 100},      {"motorway_link", 5, 60}, {"trunk", 5, 80},
    {"trunk_link", 5, 50},     {"primary", 5, 60},       {"primary_link", 5, 40},
    {"secondary", 5, 50},      {"secondary_link", 5, 40}, {"tertiary", 5, 40},
    {"tertiary_link", 5, 30},  {"unclassified", 5, 30},  {"residential", 5, 25},
    {"living_street", 5, 10},  {"service", 5, 15},       {"road", 5, 25},
    {"track", 4.5, 15},        {"pedestrian", 5, 0},     {"footway", 5, 0},
    {"cycleway", 5, 0},        {"path", 4, 0},           {"bridleway", 4, 0},
    {"steps", 2, 0},
};

static const char *const TOP_KEYS[] = {"name", "inputs", "sites", "travel", "coverage",
                                       "population_groups", "siting", "supply", "variants",
                                       NULL};
static const char *const INPUT_KEYS[] = {"population", "landcover", "elevation", "barriers",
                                         "roads", "districts", "tables", NULL};
static const char *const TABLE_KEYS[] = {"edges", "matrix", "directed", "demand", "sites", NULL};
static const char *const ROAD_KEYS[] = {"path", "layer", "id_field", "class_field",
                                        "bridge_field", "tunnel_field", "oneway_field",
                                        "access_field", NULL};
static const char *const DISTRICT_KEYS[] = {"path", "layer", "name_field", NULL};
static const char *const SITES_KEYS[] = {"existing", "candidates", "depots", NULL};
static const char *const SITE_LAYER_KEYS[] = {"path", "layer", "id_field", "name_field",
                                              "capacity_field", "cost_field", "storage_field",
                                              NULL};
static const char *const TRAVEL_KEYS[] = {"mode", "direction", "neighbours", "walk",
                                          "snap_tolerance_m", "road_speeds", "unknown_class",
                                          "landcover_factors", "landcover_default", NULL};
static const char *const WALK_KEYS[] = {"speed_kmh", "slope", NULL};
static const char *const SPEED_KEYS[] = {"walk_kmh", "vehicle_kmh", NULL};
static const char *const COVERAGE_KEYS[] = {"limit_min", "bands_min", NULL};
static const char *const MODES[] = {"walk", "vehicle", NULL};          /* SCEN_MODE_* order */
static const char *const DIRECTIONS[] = {"to_site", "from_site", NULL}; /* SCEN_* order */

/* Ranges of docs/scenario.md, in file units. */
#define WALK_KMH_RANGE JSONV_OPEN_CLOSED(0, 20)
#define VEHICLE_KMH_RANGE JSONV_CLOSED(0, 200)
#define FACTOR_RANGE JSONV_CLOSED(0, 2)
#define MINUTES_RANGE JSONV_OPEN_CLOSED(0, 1440)

static void layer_free(scen_layer_t *l)
{
    free(l->path);
    free(l->layer);
    free(l->id_field);
    free(l->name_field);
    free(l->capacity_field);
    free(l->cost_field);
    free(l->storage_field);
}

/* Free a scenario and every string it owns; NULL is fine. */
void scen_free(scen_t *s)
{
    if (s == NULL) return;
    free(s->file);
    free(s->dir);
    free(s->name);
    free(s->population);
    free(s->landcover);
    free(s->elevation);
    free(s->barriers);
    layer_free(&s->roads);
    free(s->road_class_field);
    free(s->road_bridge_field);
    free(s->road_tunnel_field);
    free(s->road_oneway_field);
    free(s->road_access_field);
    layer_free(&s->districts);
    free(s->table_edges);
    free(s->table_matrix);
    free(s->table_demand);
    free(s->table_sites);
    layer_free(&s->existing);
    layer_free(&s->candidates);
    layer_free(&s->depots);
    for (size_t i = 0; i < s->n_road_classes; i++) free(s->road_classes[i].name);
    free(s->road_classes);
    free(s->cover_factors);
    for (size_t i = 0; i < s->n_groups; i++) {
        free(s->groups[i].name);
        free(s->groups[i].raster);
    }
    free(s->groups);
    scen_siting_free(s->siting);
    scen_supply_free(s->supply);
    scen_variants_free(s->variants);
    free(s);
}

/* Folder of 'path' ("." when it has none) and its base name without ".json". */
static int split_path(const char *path, char **dir, char **base, err_t *e)
{
    const char *slash = strrchr(path, '/');
    const char *b = slash != NULL ? slash + 1 : path;
    size_t bl = strlen(b);

    if (slash == NULL) *dir = strdup(".");
    else if (slash == path) *dir = strdup("/");
    else *dir = strndup(path, (size_t)(slash - path));
    if (bl > 5 && strcmp(b + bl - 5, ".json") == 0) bl -= 5;
    *base = strndup(b, bl);
    if (*dir == NULL || *base == NULL)
        return err_set(e, ERR_NOMEM, "%s: out of memory", path);
    return ERR_OK;
}

/* Replace *p (owned) by its path relative to 'dir'; absolute paths stay. */
static int resolve(const char *dir, char **p, const char *file, err_t *e)
{
    char *r;
    size_t dl = strlen(dir);

    if (*p == NULL || (*p)[0] == '/' || strcmp(dir, ".") == 0) return ERR_OK;
    r = malloc(dl + strlen(*p) + 2);
    if (r == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", file);
    sprintf(r, "%s%s%s", dir, dir[dl - 1] == '/' ? "" : "/", *p);
    free(*p);
    *p = r;
    return ERR_OK;
}

/* A field name: optional, null = none, 'dflt' when absent. */
static int field(const jsonv_node_t *o, const char *key, const char *dflt, char **out, err_t *e)
{
    return jsonv_string(o, key, JSONV_NULLABLE, dflt, out, e);
}

/* An OGR layer reference under parent[key] with keys 'allowed'; *obj is the
 * object (json NULL when absent) so callers can read their own extra keys. */
static int read_layer(const jsonv_node_t *parent, const char *key, const char *const *allowed,
                      const char *dir, scen_layer_t *l, jsonv_node_t *obj, err_t *e)
{
    int rc;

    if ((rc = jsonv_object(parent, key, JSONV_OPTIONAL, allowed, obj, e)) != ERR_OK) return rc;
    if (obj->json == NULL) return ERR_OK;
    if ((rc = jsonv_string(obj, "path", JSONV_REQUIRED, NULL, &l->path, e)) != ERR_OK ||
        (rc = resolve(dir, &l->path, obj->file, e)) != ERR_OK ||
        (rc = field(obj, "layer", NULL, &l->layer, e)) != ERR_OK ||
        (rc = field(obj, "id_field", NULL, &l->id_field, e)) != ERR_OK ||
        (rc = field(obj, "name_field", NULL, &l->name_field, e)) != ERR_OK ||
        (rc = field(obj, "capacity_field", NULL, &l->capacity_field, e)) != ERR_OK ||
        (rc = field(obj, "cost_field", NULL, &l->cost_field, e)) != ERR_OK ||
        (rc = field(obj, "storage_field", NULL, &l->storage_field, e)) != ERR_OK)
        return rc;
    return ERR_OK;
}

/* A raster path under inputs[key], resolved. */
static int raster(const jsonv_node_t *in, const char *key, int flags, const char *dir,
                  char **out, err_t *e)
{
    int rc = jsonv_string(in, key, flags, NULL, out, e);
    if (rc != ERR_OK) return rc;
    return resolve(dir, out, in->file, e);
}

/* "inputs.tables": CSV tables for the site-selection models, no grid. Exactly
 * one of 'edges' and 'matrix', plus 'demand' and 'sites'. */
static int read_tables(const jsonv_node_t *in, scen_t *s, err_t *e)
{
    jsonv_node_t t;
    int rc;

    if ((rc = jsonv_object(in, "tables", JSONV_OPTIONAL, TABLE_KEYS, &t, e)) != ERR_OK ||
        t.json == NULL)
        return rc;
    if ((rc = raster(&t, "edges", 0, s->dir, &s->table_edges, e)) != ERR_OK ||
        (rc = raster(&t, "matrix", 0, s->dir, &s->table_matrix, e)) != ERR_OK ||
        (rc = raster(&t, "demand", JSONV_REQUIRED, s->dir, &s->table_demand, e)) != ERR_OK ||
        (rc = raster(&t, "sites", JSONV_REQUIRED, s->dir, &s->table_sites, e)) != ERR_OK ||
        (rc = jsonv_bool(&t, "directed", 0, 0, &s->table_directed, e)) != ERR_OK)
        return rc;
    if ((s->table_edges == NULL) == (s->table_matrix == NULL))
        return err_set(e, ERR_INPUT, "%s: key 'inputs.tables' needs exactly one of 'edges' "
                       "(from,to,cost) and 'matrix' (demand_id,site_id,cost)", s->file);
    if (s->table_matrix != NULL && cJSON_GetObjectItemCaseSensitive(t.json, "directed") != NULL)
        return err_set(e, ERR_INPUT, "%s: key 'inputs.tables.directed' applies to 'edges' only",
                       s->file);
    return ERR_OK;
}

static int read_inputs(const jsonv_node_t *root, scen_t *s, err_t *e)
{
    jsonv_node_t in, roads, districts, tables;
    int rc;

    if ((rc = jsonv_object(root, "inputs", JSONV_REQUIRED, INPUT_KEYS, &in, e)) != ERR_OK ||
        (rc = read_tables(&in, s, e)) != ERR_OK)
        return rc;
    /* A grid or tables: the population raster is required unless tables are given. */
    jsonv_child(&in, "tables", &tables);
    if (tables.json != NULL) {
        jsonv_node_t pop;
        jsonv_child(&in, "population", &pop);
        if (pop.json != NULL)
            return err_set(e, ERR_INPUT, "%s: give either 'inputs.population' (a grid) or "
                           "'inputs.tables' (CSV tables), not both", s->file);
    }
    if ((rc = raster(&in, "population", tables.json != NULL ? 0 : JSONV_REQUIRED, s->dir,
                     &s->population, e)) != ERR_OK ||
        (rc = raster(&in, "landcover", JSONV_NULLABLE, s->dir, &s->landcover, e)) != ERR_OK ||
        (rc = raster(&in, "elevation", JSONV_NULLABLE, s->dir, &s->elevation, e)) != ERR_OK ||
        (rc = raster(&in, "barriers", JSONV_NULLABLE, s->dir, &s->barriers, e)) != ERR_OK ||
        (rc = read_layer(&in, "roads", ROAD_KEYS, s->dir, &s->roads, &roads, e)) != ERR_OK ||
        (rc = field(&roads, "class_field", "highway", &s->road_class_field, e)) != ERR_OK ||
        (rc = field(&roads, "bridge_field", "bridge", &s->road_bridge_field, e)) != ERR_OK ||
        (rc = field(&roads, "tunnel_field", "tunnel", &s->road_tunnel_field, e)) != ERR_OK ||
        (rc = field(&roads, "oneway_field", "oneway", &s->road_oneway_field, e)) != ERR_OK ||
        (rc = field(&roads, "access_field", NULL, &s->road_access_field, e)) != ERR_OK ||
        (rc = read_layer(&in, "districts", DISTRICT_KEYS, s->dir, &s->districts, &districts,
                         e)) != ERR_OK)
        return rc;
    return ERR_OK;
}

static int read_sites(const jsonv_node_t *root, scen_t *s, err_t *e)
{
    jsonv_node_t sites, l;
    int rc;

    if ((rc = jsonv_object(root, "sites", JSONV_OPTIONAL, SITES_KEYS, &sites, e)) != ERR_OK ||
        (rc = read_layer(&sites, "existing", SITE_LAYER_KEYS, s->dir, &s->existing, &l, e)) !=
            ERR_OK ||
        (rc = read_layer(&sites, "candidates", SITE_LAYER_KEYS, s->dir, &s->candidates, &l,
                         e)) != ERR_OK ||
        (rc = read_layer(&sites, "depots", SITE_LAYER_KEYS, s->dir, &s->depots, &l, e)) !=
            ERR_OK)
        return rc;
    return ERR_OK;
}

static int cmp_class(const void *a, const void *b)
{
    return strcmp(((const scen_road_class_t *)a)->name, ((const scen_road_class_t *)b)->name);
}

/* bsearch comparator: a class name against a table entry. */
static int cmp_name_class(const void *name, const void *b)
{
    return strcmp((const char *)name, ((const scen_road_class_t *)b)->name);
}

static int cmp_cover(const void *a, const void *b)
{
    int x = ((const scen_cover_factor_t *)a)->value, y = ((const scen_cover_factor_t *)b)->value;
    return (x > y) - (x < y);
}

/* The built-in speed table, used when "travel.road_speeds" is absent. */
static int default_speeds(scen_t *s, err_t *e)
{
    size_t n = sizeof DEFAULT_SPEEDS / sizeof DEFAULT_SPEEDS[0];

    s->road_classes = calloc(n, sizeof *s->road_classes);
    if (s->road_classes == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", s->file);
    for (size_t i = 0; i < n; i++) {
        s->road_classes[i].name = strdup(DEFAULT_SPEEDS[i].name);
        if (s->road_classes[i].name == NULL)
            return err_set(e, ERR_NOMEM, "%s: out of memory", s->file);
        s->n_road_classes = i + 1;
        s->road_classes[i].walk_mps = DEFAULT_SPEEDS[i].walk_kmh / KMH;
        s->road_classes[i].vehicle_mps = DEFAULT_SPEEDS[i].vehicle_kmh / KMH;
    }
    return ERR_OK;
}

/* "travel.road_speeds": { CLASS: { "walk_kmh": W, "vehicle_kmh": V }, ... };
 * replaces the whole default table. */
static int read_road_speeds(const jsonv_node_t *travel, scen_t *s, err_t *e)
{
    jsonv_node_t rs, m;
    size_t n, i = 0;
    double w, v;
    int rc;

    /* Any class name is allowed (NULL list); duplicates are still refused. */
    if ((rc = jsonv_object(travel, "road_speeds", JSONV_OPTIONAL, NULL, &rs, e)) != ERR_OK)
        return rc;
    if (rs.json == NULL) return default_speeds(s, e);
    n = (size_t)cJSON_GetArraySize(rs.json);
    if (n == 0)
        return err_set(e, ERR_INPUT, "%s: key '%s' must list at least one road class "
                       "(leave it out to use the built-in table)", s->file, rs.path);
    s->road_classes = calloc(n, sizeof *s->road_classes);
    if (s->road_classes == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", s->file);
    for (const cJSON *c = rs.json->child; c != NULL; c = c->next, i++) {
        jsonv_member(&rs, c, i, &m);
        if (c->string[0] == '\0')
            return err_set(e, ERR_INPUT, "%s: key '%s' has an empty road class name", s->file,
                           rs.path);
        if ((rc = jsonv_as_object(&m, SPEED_KEYS, e)) != ERR_OK ||
            (rc = jsonv_number(&m, "walk_kmh", JSONV_REQUIRED, WALK_KMH_RANGE, 0, &w, e)) !=
                ERR_OK ||
            (rc = jsonv_number(&m, "vehicle_kmh", JSONV_REQUIRED, VEHICLE_KMH_RANGE, 0, &v, e)) !=
                ERR_OK)
            return rc;
        s->road_classes[i].name = strdup(c->string);
        if (s->road_classes[i].name == NULL)
            return err_set(e, ERR_NOMEM, "%s: out of memory", s->file);
        s->n_road_classes = i + 1;
        s->road_classes[i].walk_mps = w / KMH;
        s->road_classes[i].vehicle_mps = v / KMH;
    }
    return ERR_OK;
}

/* "travel.landcover_factors": { "CLASS VALUE": factor, ... }. */
static int read_cover(const jsonv_node_t *travel, scen_t *s, err_t *e)
{
    jsonv_node_t lf, m;
    size_t n, i = 0;
    long value;
    int rc;

    if ((rc = jsonv_object(travel, "landcover_factors", JSONV_OPTIONAL, NULL, &lf, e)) != ERR_OK)
        return rc;
    if (lf.json == NULL || (n = (size_t)cJSON_GetArraySize(lf.json)) == 0) return ERR_OK;
    s->cover_factors = calloc(n, sizeof *s->cover_factors);
    if (s->cover_factors == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", s->file);
    for (const cJSON *c = lf.json->child; c != NULL; c = c->next, i++) {
        jsonv_member(&lf, c, i, &m);
        if ((rc = jsonv_key_int(&m, INT_MIN, INT_MAX, &value, e)) != ERR_OK ||
            (rc = jsonv_as_number(&m, FACTOR_RANGE, &s->cover_factors[i].factor, e)) != ERR_OK)
            return rc;
        s->cover_factors[i].value = (int)value;
        s->n_cover_factors = i + 1;
    }
    qsort(s->cover_factors, n, sizeof *s->cover_factors, cmp_cover);
    /* "10" and "010" are different keys to JSON but the same class to us. */
    for (i = 1; i < n; i++) {
        if (s->cover_factors[i].value == s->cover_factors[i - 1].value)
            return err_set(e, ERR_INPUT, "%s: key '%s' gives land-cover class %d twice",
                           s->file, lf.path, s->cover_factors[i].value);
    }
    return ERR_OK;
}

static int read_travel(const jsonv_node_t *root, scen_t *s, err_t *e)
{
    static const int NEIGHBOURS[] = {8, 16};
    jsonv_node_t travel, walk, unknown;
    double kmh, uw, uv;
    int rc;

    if ((rc = jsonv_object(root, "travel", JSONV_OPTIONAL, TRAVEL_KEYS, &travel, e)) != ERR_OK ||
        (rc = jsonv_enum(&travel, "mode", 0, MODES, SCEN_MODE_WALK, &s->mode, e)) != ERR_OK ||
        (rc = jsonv_enum(&travel, "direction", 0, DIRECTIONS, SCEN_TO_SITE, &s->direction, e)) !=
            ERR_OK ||
        (rc = jsonv_int_choice(&travel, "neighbours", 0, NEIGHBOURS, 2, 8, &s->neighbours, e)) !=
            ERR_OK ||
        (rc = jsonv_object(&travel, "walk", 0, WALK_KEYS, &walk, e)) != ERR_OK ||
        (rc = jsonv_number(&walk, "speed_kmh", 0, WALK_KMH_RANGE, 5.0, &kmh, e)) != ERR_OK ||
        (rc = jsonv_bool(&walk, "slope", 0, 1, &s->use_slope, e)) != ERR_OK ||
        (rc = jsonv_number(&travel, "snap_tolerance_m", 0, JSONV_CLOSED(0, 1000), 1.0,
                           &s->snap_tolerance_m, e)) != ERR_OK ||
        (rc = read_road_speeds(&travel, s, e)) != ERR_OK ||
        (rc = jsonv_object(&travel, "unknown_class", 0, SPEED_KEYS, &unknown, e)) != ERR_OK ||
        (rc = jsonv_number(&unknown, "walk_kmh", 0, WALK_KMH_RANGE, 4.0, &uw, e)) != ERR_OK ||
        (rc = jsonv_number(&unknown, "vehicle_kmh", 0, VEHICLE_KMH_RANGE, 20.0, &uv, e)) !=
            ERR_OK ||
        (rc = read_cover(&travel, s, e)) != ERR_OK ||
        (rc = jsonv_number(&travel, "landcover_default", 0, FACTOR_RANGE, 1.0,
                           &s->cover_default_factor, e)) != ERR_OK)
        return rc;
    s->walk_mps = kmh / KMH;
    s->unknown_walk_mps = uw / KMH;
    s->unknown_vehicle_mps = uv / KMH;
    qsort(s->road_classes, s->n_road_classes, sizeof *s->road_classes, cmp_class);
    return ERR_OK;
}

static int read_coverage(const jsonv_node_t *root, scen_t *s, err_t *e)
{
    static const double BANDS[] = {30, 60, 120};
    jsonv_node_t cov;
    double limit, bands[SCEN_MAX_BANDS];
    int rc;

    if ((rc = jsonv_object(root, "coverage", 0, COVERAGE_KEYS, &cov, e)) != ERR_OK ||
        (rc = jsonv_number(&cov, "limit_min", 0, MINUTES_RANGE, 60.0, &limit, e)) != ERR_OK ||
        (rc = jsonv_numbers(&cov, "bands_min", JSONV_INCREASING, MINUTES_RANGE, 1, SCEN_MAX_BANDS,
                            BANDS, 3, bands, &s->n_bands, e)) != ERR_OK)
        return rc;
    s->limit_s = limit * MIN;
    for (size_t i = 0; i < s->n_bands; i++) s->bands_s[i] = bands[i] * MIN;
    return ERR_OK;
}

/* "population_groups": [{"name": ..., "share": 0.16} or {"name": ..., "raster": ...}]. */
static int read_groups(const jsonv_node_t *root, scen_t *s, err_t *e)
{
    static const char *const KEYS[] = {"name", "share", "raster", NULL};
    jsonv_node_t arr, g;
    size_t n = 0, i = 0;
    const cJSON *it;
    int rc;

    if ((rc = jsonv_array(root, "population_groups", 0, 1, 16, &arr, &n, e)) != ERR_OK ||
        n == 0)
        return rc;
    s->groups = calloc(n, sizeof *s->groups);
    if (s->groups == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", s->file);
    cJSON_ArrayForEach(it, arr.json) {
        scen_group_t *gr = &s->groups[i];
        jsonv_node_t sh;
        jsonv_member(&arr, it, i, &g);
        s->n_groups = ++i;
        gr->share = NAN;
        if ((rc = jsonv_as_object(&g, KEYS, e)) != ERR_OK ||
            (rc = jsonv_string(&g, "name", JSONV_REQUIRED, NULL, &gr->name, e)) != ERR_OK ||
            (rc = jsonv_number(&g, "share", 0, JSONV_OPEN_CLOSED(0, 1), NAN, &gr->share, e)) !=
                ERR_OK ||
            (rc = raster(&g, "raster", 0, s->dir, &gr->raster, e)) != ERR_OK)
            return rc;
        jsonv_child(&g, "share", &sh);
        if ((sh.json == NULL) == (gr->raster == NULL))
            return err_set(e, ERR_INPUT, "%s: key '%s' needs exactly one of 'share' or 'raster'",
                           s->file, g.path);
    }
    return ERR_OK;
}

/* Parse and validate; see the header. 'path' names the file in messages and
 * gives the folder that relative paths are resolved against. */
int scen_parse(const char *json, const char *path, scen_t **out, err_t *e)
{
    cJSON *doc = NULL;
    scen_t *s = NULL;
    jsonv_node_t root;
    char *base = NULL;
    int rc;

    *out = NULL;
    if (path == NULL) path = "(scenario)";
    if (json == NULL) {
        rc = err_set(e, ERR_INTERNAL, "%s: no scenario text given", path);
        goto done;
    }
    s = calloc(1, sizeof *s);
    if (s == NULL || (s->file = strdup(path)) == NULL) {
        rc = err_set(e, ERR_NOMEM, "%s: out of memory", path);
        goto done;
    }
    if ((rc = split_path(path, &s->dir, &base, e)) != ERR_OK ||
        (rc = jsonv_parse(json, path, &doc, e)) != ERR_OK ||
        (rc = jsonv_root(doc, path, &root, e)) != ERR_OK ||
        (rc = jsonv_check_keys(&root, TOP_KEYS, e)) != ERR_OK ||
        (rc = jsonv_string(&root, "name", 0, base, &s->name, e)) != ERR_OK ||
        (rc = read_inputs(&root, s, e)) != ERR_OK || (rc = read_sites(&root, s, e)) != ERR_OK ||
        (rc = read_travel(&root, s, e)) != ERR_OK || (rc = read_coverage(&root, s, e)) != ERR_OK ||
        (rc = read_groups(&root, s, e)) != ERR_OK ||
        (rc = scen_siting_read(&root, s, &s->siting, e)) != ERR_OK ||
        (rc = scen_supply_read(&root, s, &s->supply, e)) != ERR_OK ||
        (rc = scen_variants_read(&root, s, &s->variants, e)) != ERR_OK)
        goto done;
    *out = s;
    s = NULL;
done:
    scen_free(s);
    free(base);
    cJSON_Delete(doc);
    return rc;
}

/* Read the file at 'path' whole (a pipe such as /dev/stdin works too), then
 * scen_parse it. */
int scen_load(const char *path, scen_t **out, err_t *e)
{
    FILE *f = NULL;
    char *text = NULL, *grown;
    size_t len = 0, cap = 0, got;
    struct stat st;
    int rc;

    *out = NULL;
    f = fopen(path, "rb");
    if (f == NULL) {
        rc = err_set(e, ERR_IO, "cannot read scenario '%s': %s", path, strerror(errno));
        goto done;
    }
    /* fopen succeeds on a folder; say so rather than fail oddly on the read. */
    if (fstat(fileno(f), &st) == 0 && S_ISDIR(st.st_mode)) {
        rc = err_set(e, ERR_IO, "cannot read scenario '%s': %s", path, strerror(EISDIR));
        goto done;
    }
    do {
        if (cap - len < 4096) {
            cap = cap ? 2 * cap : 16384;
            grown = realloc(text, cap);
            if (grown == NULL) {
                rc = err_set(e, ERR_NOMEM, "%s: out of memory", path);
                goto done;
            }
            text = grown;
        }
        got = fread(text + len, 1, cap - len - 1, f);
        len += got;
        if (len > SCEN_MAX_BYTES) {
            rc = err_set(e, ERR_INPUT, "%s: is larger than %ld bytes, too big for a scenario "
                         "file; is it the right file?", path, SCEN_MAX_BYTES);
            goto done;
        }
    } while (got > 0);
    if (ferror(f)) {
        rc = err_set(e, ERR_IO, "cannot read scenario '%s': %s", path, strerror(errno));
        goto done;
    }
    text[len] = '\0';
    if (strlen(text) != len) {
        int line, col;
        jsonv_line_col(text, strlen(text), &line, &col);
        rc = err_set(e, ERR_INPUT, "%s: contains a NUL byte at line %d, column %d; "
                     "is it a text file?", path, line, col);
        goto done;
    }
    rc = scen_parse(text, path, out, e);
done:
    free(text);
    if (f != NULL) fclose(f);
    return rc;
}

/* Walking and vehicle speeds (m/s) of road class 'cls' by binary search in
 * the sorted table; the unknown-class speeds and 0 when it is not there. */
int scen_road_speed(const scen_t *s, const char *cls, double *walk_mps, double *vehicle_mps)
{
    const scen_road_class_t *hit = NULL;

    if (cls != NULL && s->n_road_classes > 0)
        hit = bsearch(cls, s->road_classes, s->n_road_classes, sizeof *hit, cmp_name_class);
    *walk_mps = hit != NULL ? hit->walk_mps : s->unknown_walk_mps;
    *vehicle_mps = hit != NULL ? hit->vehicle_mps : s->unknown_vehicle_mps;
    return hit != NULL;
}

/* Walking-speed factor of land-cover class 'value'; the default when unlisted. */
double scen_cover_factor(const scen_t *s, int value)
{
    scen_cover_factor_t key = {value, 0};
    const scen_cover_factor_t *hit = NULL;

    if (s->n_cover_factors > 0)
        hit = bsearch(&key, s->cover_factors, s->n_cover_factors, sizeof key, cmp_cover);
    return hit != NULL ? hit->factor : s->cover_default_factor;
}

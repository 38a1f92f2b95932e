/* summary: shared parts of summary.json (see include/summary.h). */
#include "summary.h"

#include <stdlib.h>
#include <time.h>

#include "output.h"

const char summary_caution_text[] =
    "These results are a planning aid computed from the population surface, road data and "
    "speeds assumed in the scenario. Check them on the ground and against the guidance of "
    "local authorities before acting on them.";

static void add_file(cJSON *arr, const char *role, const char *path)
{
    cJSON *f;
    char hex[65];
    long long size = 0;
    err_t e;

    if (path == NULL) return;
    f = cJSON_CreateObject();
    cJSON_AddStringToObject(f, "role", role);
    /* Absolute, so that the report and later tools find the inputs from any folder. */
    {
        char *abs = realpath(path, NULL);
        cJSON_AddStringToObject(f, "path", abs != NULL ? abs : path);
        free(abs);
    }
    if (out_sha256_file(path, hex, &size, &e) == ERR_OK) {
        cJSON_AddNumberToObject(f, "bytes", (double)size);
        cJSON_AddStringToObject(f, "sha256", hex);
    } else {
        /* OSM and other sources may be folders or virtual; say so, don't fail. */
        cJSON_AddStringToObject(f, "sha256", "unavailable");
    }
    cJSON_AddItemToArray(arr, f);
}

int summary_new(const char *command, const inputs_t *in, cJSON **out, err_t *e)
{
    const scen_t *s = in->scen;
    cJSON *j = cJSON_CreateObject(), *inp, *par, *w;
    char when[32];
    time_t now = time(NULL);
    struct tm tmv;

    *out = NULL;
    if (j == NULL) return err_set(e, ERR_NOMEM, "out of memory building the summary");
    gmtime_r(&now, &tmv);
    strftime(when, sizeof when, "%Y-%m-%dT%H:%M:%SZ", &tmv);
    cJSON_AddStringToObject(j, "software", "sitereach " SITEREACH_VERSION);
    cJSON_AddStringToObject(j, "command", command);
    cJSON_AddStringToObject(j, "run_at", when);
    cJSON_AddStringToObject(j, "scenario", s->file);
    cJSON_AddStringToObject(j, "name", s->name);
    inp = cJSON_AddArrayToObject(j, "inputs");
    add_file(inp, "scenario", s->file);
    add_file(inp, "population", s->population);
    add_file(inp, "landcover", s->landcover);
    add_file(inp, "elevation", s->elevation);
    add_file(inp, "barriers", s->barriers);
    add_file(inp, "roads", s->roads.path);
    add_file(inp, "districts", s->districts.path);
    add_file(inp, "existing sites", s->existing.path);
    add_file(inp, "candidate sites", s->candidates.path);
    add_file(inp, "depots", s->depots.path);
    add_file(inp, "edge table", s->table_edges);
    add_file(inp, "cost matrix", s->table_matrix);
    add_file(inp, "demand table", s->table_demand);
    add_file(inp, "site table", s->table_sites);
    /* Table scenarios have no grid. */
    if (in->grid != NULL) {
        cJSON *gj = cJSON_AddObjectToObject(j, "grid");
        cJSON_AddNumberToObject(gj, "columns", in->grid->nx);
        cJSON_AddNumberToObject(gj, "rows", in->grid->ny);
        cJSON_AddStringToObject(gj, "crs", in->grid->crs_name);
        cJSON_AddNumberToObject(gj, "people", in->grid->total_people);
    }
    par = cJSON_AddObjectToObject(j, "parameters");
    cJSON_AddStringToObject(par, "mode", s->mode == SCEN_MODE_WALK ? "walk" : "vehicle");
    cJSON_AddStringToObject(par, "direction", s->direction == SCEN_TO_SITE ? "to_site" : "from_site");
    cJSON_AddNumberToObject(par, "neighbours", s->neighbours);
    cJSON_AddNumberToObject(par, "walk_speed_kmh", s->walk_mps * 3.6);
    cJSON_AddBoolToObject(par, "slope", s->use_slope);
    cJSON_AddNumberToObject(par, "limit_min", s->limit_s / 60.0);
    {
        cJSON *b = cJSON_AddArrayToObject(par, "bands_min");
        for (size_t k = 0; k < s->n_bands; k++)
            cJSON_AddItemToArray(b, cJSON_CreateNumber(s->bands_s[k] / 60.0));
    }
    if (in->roads != NULL) {
        cJSON *rs = cJSON_AddArrayToObject(par, "road_speeds");
        for (size_t i = 0; i < in->roads->n_classes; i++) {
            const road_class_count_t *c = &in->roads->classes[i];
            cJSON *o = cJSON_CreateObject();
            cJSON_AddStringToObject(o, "class", c->name);
            cJSON_AddNumberToObject(o, "walk_kmh", c->walk_mps * 3.6);
            cJSON_AddNumberToObject(o, "vehicle_kmh", c->vehicle_mps * 3.6);
            cJSON_AddItemToArray(rs, o);
        }
    }
    w = cJSON_AddArrayToObject(j, "warnings");
    for (size_t i = 0; i < in->warnings.n; i++)
        cJSON_AddItemToArray(w, cJSON_CreateString(in->warnings.items[i]));
    cJSON_AddObjectToObject(j, "seconds");
    summary_time(j, "load_inputs", in->seconds);
    *out = j;
    return ERR_OK;
}

void summary_time(cJSON *summary, const char *stage, double seconds)
{
    cJSON *t = cJSON_GetObjectItem(summary, "seconds");
    if (t != NULL) cJSON_AddNumberToObject(t, stage, seconds);
}

void summary_caution(cJSON *summary)
{
    if (cJSON_GetObjectItem(summary, "caution") == NULL)
        cJSON_AddStringToObject(summary, "caution", summary_caution_text);
}

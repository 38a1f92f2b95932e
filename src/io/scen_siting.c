/* scen_siting: reader of the scenario's "siting" section (see include/scen_siting.h
 * and docs/siting.md). Strict like the rest of the scenario: unknown keys are
 * errors, values are typed and ranged, and a model missing what it needs (p for
 * p_median, p or budget for max_cover) is named here, before any input is read. */
#include "scen_siting.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "scen_sections.h"

static const char *const KEYS[] = {"model", "p", "budget", "limit_min", "limit", "target_share",
                                   "minimise", "assignment", "assignment_cost_rate",
                                   "penalty_per_person", "existing", "aggregate_cells",
                                   "curve_max_p", "time_limit_s", "gap", "candidates", "robust", NULL};
static const char *const GEN_KEYS[] = {"generate", "spacing_m", "min_spacing_m", "near_m",
                                       "min_people", "capacity", "fixed_cost", "max", NULL};
static const char *const ROBUST_KEYS[] = {"objective", "weights", "base_weight", NULL};
static const char *const OBJECTIVES[] = {"worst", "expected", NULL};
static const char *const MODELS[] = {"max_cover", "set_cover", "p_median", "capacitated", NULL};
static const char *const MINIMISE[] = {"sites", "fixed_cost", NULL};
static const char *const ASSIGNMENT[] = {"split", "single", NULL};
static const char *const EXISTING[] = {"keep", "may_close", NULL};
static const char *const GENERATE[] = {"none", "junctions", "along_roads", NULL};

static int read_candidates(const jsonv_node_t *o, struct scen_siting *x, err_t *e)
{
    jsonv_node_t c;
    long mx;
    int rc;

    if ((rc = jsonv_object(o, "candidates", JSONV_OPTIONAL, GEN_KEYS, &c, e)) != ERR_OK ||
        (rc = jsonv_enum(&c, "generate", JSONV_REQUIRED, GENERATE, SCEN_GEN_NONE, &x->generate,
                         e)) != ERR_OK ||
        (rc = jsonv_number(&c, "spacing_m", 0, JSONV_CLOSED(10, 1e6), 1000, &x->spacing_m, e)) !=
            ERR_OK ||
        (rc = jsonv_number(&c, "min_spacing_m", 0, JSONV_CLOSED(0, 1e6), 500, &x->min_spacing_m,
                           e)) != ERR_OK ||
        (rc = jsonv_number(&c, "near_m", 0, JSONV_CLOSED(0, 1e5), 500, &x->near_m, e)) != ERR_OK ||
        (rc = jsonv_number(&c, "min_people", 0, JSONV_CLOSED(0, 1e9), 1, &x->min_people, e)) !=
            ERR_OK ||
        (rc = jsonv_number(&c, "capacity", 0, JSONV_OPEN_CLOSED(0, 1e12), INFINITY,
                           &x->gen_capacity, e)) != ERR_OK ||
        (rc = jsonv_number(&c, "fixed_cost", 0, JSONV_CLOSED(0, 1e15), 0, &x->gen_fixed_cost,
                           e)) != ERR_OK ||
        (rc = jsonv_int(&c, "max", 0, 1, 100000, 2000, &mx, e)) != ERR_OK)
        return rc;
    x->gen_max = (int)mx;
    return ERR_OK;
}

/* Is 'name' the name of an element of the top-level "variants" array? Elements
 * that are not objects with a string name are left to the variants reader. */
static int variant_named(const jsonv_node_t *root, const char *name, size_t *n_variants)
{
    jsonv_node_t arr;
    const cJSON *c;
    int found = 0;

    *n_variants = 0;
    jsonv_child(root, "variants", &arr);
    if (arr.json == NULL || !cJSON_IsArray(arr.json)) return 0;
    cJSON_ArrayForEach(c, arr.json) {
        const cJSON *nm = cJSON_GetObjectItemCaseSensitive(c, "name");
        (*n_variants)++;
        if (cJSON_IsString(nm) && strcmp(nm->valuestring, name) == 0) found = 1;
    }
    return found;
}

/* "siting.robust": objective, per-variant weights, base weight. */
static int read_robust(const jsonv_node_t *root, const jsonv_node_t *o, struct scen_siting *x,
                       err_t *e)
{
    jsonv_node_t r, w, m;
    size_t n_var = 0, n, i = 0;
    double total;
    int rc;

    if ((rc = jsonv_object(o, "robust", JSONV_OPTIONAL, ROBUST_KEYS, &r, e)) != ERR_OK ||
        r.json == NULL)
        return rc;
    x->robust = 1;
    if ((rc = jsonv_enum(&r, "objective", 0, OBJECTIVES, 0, &x->robust_objective, e)) != ERR_OK ||
        (rc = jsonv_number(&r, "base_weight", 0, JSONV_CLOSED(0, 1e12), 1,
                           &x->robust_base_weight, e)) != ERR_OK ||
        (rc = jsonv_object(&r, "weights", 0, NULL, &w, e)) != ERR_OK)
        return rc;
    (void)variant_named(root, "", &n_var);
    if (n_var == 0)
        return err_set(e, ERR_INPUT, "%s: key '%s' compares the base with what-if variants, but "
                       "the scenario has no 'variants' section; add one or remove the key",
                       root->file, r.path);
    if (x->model != SCEN_SITE_MAX_COVER)
        return err_set(e, ERR_INPUT, "%s: key '%s' works with model 'max_cover' only (got '%s')",
                       root->file, r.path, MODELS[x->model]);
    if (x->robust_objective == 0 &&
        (w.json != NULL || cJSON_GetObjectItemCaseSensitive(r.json, "base_weight") != NULL))
        return err_set(e, ERR_INPUT, "%s: keys 'weights' and 'base_weight' in '%s' apply to "
                       "objective 'expected' only; the worst case weighs nothing", root->file,
                       r.path);
    total = x->robust_base_weight;
    n = w.json != NULL ? (size_t)cJSON_GetArraySize(w.json) : 0;
    if (n > 0) {
        x->robust_names = calloc(n, sizeof *x->robust_names);
        x->robust_weights = calloc(n, sizeof *x->robust_weights);
        if (x->robust_names == NULL || x->robust_weights == NULL)
            return err_set(e, ERR_NOMEM, "%s: out of memory", root->file);
    }
    for (const cJSON *c = w.json != NULL ? w.json->child : NULL; c != NULL; c = c->next, i++) {
        jsonv_member(&w, c, i, &m);
        if (!variant_named(root, c->string, &n_var))
            return err_set(e, ERR_INPUT, "%s: key '%s' names no variant; weights are given by "
                           "the 'name' of an entry in 'variants' (the base has 'base_weight')",
                           root->file, m.path);
        if ((x->robust_names[i] = strdup(c->string)) == NULL)
            return err_set(e, ERR_NOMEM, "%s: out of memory", root->file);
        x->n_robust_weights = i + 1;
        if ((rc = jsonv_as_number(&m, JSONV_CLOSED(0, 1e12), &x->robust_weights[i], e)) != ERR_OK)
            return rc;
        total += x->robust_weights[i];
    }
    total += (double)(n_var - x->n_robust_weights);   /* variants not named weigh 1 */
    if (x->robust_objective == 1 && !(total > 0))
        return err_set(e, ERR_INPUT, "%s: every weight in '%s' is 0; give the base or a variant "
                       "a positive weight", root->file, r.path);
    return ERR_OK;
}

double scen_siting_robust_weight(const struct scen_siting *x, const char *name)
{
    for (size_t i = 0; i < x->n_robust_weights; i++)
        if (strcmp(x->robust_names[i], name) == 0) return x->robust_weights[i];
    return 1.0;
}

int scen_siting_read(const jsonv_node_t *root, const scen_t *s, struct scen_siting **out,
                     err_t *e)
{
    struct scen_siting *x = NULL;
    jsonv_node_t o;
    long p, agg, curve;
    double limit_min;
    int rc;

    (void)s;
    *out = NULL;
    if ((rc = jsonv_object(root, "siting", 0, KEYS, &o, e)) != ERR_OK || o.json == NULL)
        return rc;
    x = calloc(1, sizeof *x);
    if (x == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", root->file);
    x->present = 1;
    if ((rc = jsonv_enum(&o, "model", 0, MODELS, SCEN_SITE_MAX_COVER, &x->model, e)) != ERR_OK ||
        (rc = jsonv_int(&o, "p", 0, 1, 1000000, -1, &p, e)) != ERR_OK ||
        (rc = jsonv_number(&o, "budget", 0, JSONV_CLOSED(0, INFINITY), INFINITY, &x->budget,
                           e)) != ERR_OK ||
        (rc = jsonv_number(&o, "limit_min", 0, JSONV_OPEN_CLOSED(0, 1440), NAN, &limit_min, e)) !=
            ERR_OK ||
        (rc = jsonv_number(&o, "limit", 0, JSONV_OPEN(0, INFINITY), NAN, &x->limit_cost, e)) !=
            ERR_OK ||
        (rc = jsonv_number(&o, "target_share", 0, JSONV_OPEN_CLOSED(0, 1), 1, &x->target_share,
                           e)) != ERR_OK ||
        (rc = jsonv_enum(&o, "minimise", 0, MINIMISE, 0, &x->min_fixed_cost, e)) != ERR_OK ||
        (rc = jsonv_enum(&o, "assignment", 0, ASSIGNMENT, 0, &x->single_source, e)) != ERR_OK ||
        (rc = jsonv_number(&o, "assignment_cost_rate", 0, JSONV_OPEN_CLOSED(0, 1e9), 1, &x->cost_rate,
                           e)) != ERR_OK ||
        (rc = jsonv_number(&o, "penalty_per_person", 0, JSONV_CLOSED(0, 1e15), 0, &x->penalty,
                           e)) != ERR_OK ||
        (rc = jsonv_enum(&o, "existing", 0, EXISTING, SCEN_EXISTING_KEEP, &x->existing, e)) !=
            ERR_OK ||
        (rc = jsonv_int(&o, "aggregate_cells", 0, 1, 64, 1, &agg, e)) != ERR_OK ||
        (rc = jsonv_int(&o, "curve_max_p", 0, 0, 1000, -1, &curve, e)) != ERR_OK ||
        (rc = jsonv_number(&o, "time_limit_s", 0, JSONV_OPEN_CLOSED(0, 86400), 600,
                           &x->time_limit_s, e)) != ERR_OK ||
        (rc = jsonv_number(&o, "gap", 0, JSONV_CLOSED(0, 0.5), 0, &x->gap, e)) != ERR_OK ||
        (rc = read_candidates(&o, x, e)) != ERR_OK ||
        (rc = read_robust(root, &o, x, e)) != ERR_OK)
        goto done;
    x->p = (int)p;
    x->limit_s = limit_min * 60.0;   /* NAN stays NAN: the stage uses coverage.limit_min */
    x->aggregate_cells = (int)agg;
    x->curve_max_p = (int)curve;
    if (x->model == SCEN_SITE_P_MEDIAN && x->p < 0) {
        rc = err_set(e, ERR_INPUT, "%s: key 'siting.p' is required for model 'p_median' "
                     "(the number of sites to open)", root->file);
        goto done;
    }
    if (x->model == SCEN_SITE_MAX_COVER && x->p < 0 && isinf(x->budget)) {
        rc = err_set(e, ERR_INPUT, "%s: model 'max_cover' needs 'siting.p' (sites to open) "
                     "or 'siting.budget' (fixed cost allowed)", root->file);
        goto done;
    }
    if (x->aggregate_cells > 1 &&
        (x->model == SCEN_SITE_MAX_COVER || x->model == SCEN_SITE_SET_COVER)) {
        rc = err_set(e, ERR_INPUT, "%s: key 'siting.aggregate_cells' applies to 'p_median' and "
                     "'capacitated' only (covering models merge identical cells exactly)",
                     root->file);
        goto done;
    }
    *out = x;
    x = NULL;
done:
    scen_siting_free(x);
    return rc;
}

void scen_siting_free(struct scen_siting *x)
{
    if (x == NULL) return;
    for (size_t i = 0; i < x->n_robust_weights; i++) free(x->robust_names[i]);
    free(x->robust_names);
    free(x->robust_weights);
    free(x);
}

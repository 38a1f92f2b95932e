/* site_robust: the "siting.robust" part of the site stage on grids. Builds a
 * robust covering problem over the base network and every what-if variant (one
 * set of bounded searches per variant, with the variant's edits applied and
 * undone), chooses the sites that do best in the worst (or weighted) case, and
 * reports each scenario's coverage under that plan and under the plan chosen
 * for the base alone (the ordinary site result). Choices:
 * - units and sites are those of the base problem (site_data_t);
 * - an existing site a variant closes covers nothing in that variant;
 * - a candidate a variant opens stays a candidate (it is not forced open): the
 *   plan decides, and it counts against p like any other. */
#ifndef SITE_ROBUST_H
#define SITE_ROBUST_H

#include <cJSON.h>

#include "err.h"
#include "inputs.h"
#include "network.h"
#include "robust.h"
#include "scenario.h"
#include "site.h"

typedef struct site_robust {
    robust_problem_t *prob;   /* scenario 0 = base, 1.. = the variants in order; owned */
    const char **scen_name;   /* "base", then variant names (borrowed from the scenario) */
    size_t *sites_closed;     /* per scenario: existing sites closed */
    robust_result_t plan;     /* the robust plan */
    double *base_plan_cov;    /* per scenario: people covered by the base-only plan */
    double seconds_searches, seconds_model;
} site_robust_t;

/* Build the problem from the base data 'd' and the scenario's variants, applied
 * one by one to 'net' (left with no edits). Errors: no variants, those of
 * variant_apply and of the searches, NOMEM. */
int site_robust_prepare(const inputs_t *in, network_t *net, const site_data_t *d, int n_threads,
                        int quiet, site_robust_t *r, err_t *e);
/* Solve and evaluate the base-only plan 'base' (site_run's result). */
int site_robust_solve(const scen_t *s, const site_data_t *d, const site_result_t *base,
                      site_robust_t *r, err_t *e);
/* robust.csv (per scenario, robust and base-only plan), robust_sites.csv (the
 * robust plan's open sites) and "site.robust" in 'summary'. */
int site_robust_write(const char *outdir, const scen_t *s, const site_data_t *d,
                      const site_robust_t *r, cJSON *summary, err_t *e);
void site_robust_print(const scen_t *s, const site_data_t *d, const site_robust_t *r);
void site_robust_destroy(site_robust_t *r);   /* NULL-safe */

#endif

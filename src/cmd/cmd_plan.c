/* plan: the main job in one command, as a short script of stages:
 *   check (inputs) -> reach (existing sites) -> site (new points) -> supply -> report.
 * Every stage writes into the one OUTDIR, its files named by stage (reach's files
 * as the reach command writes them, supply_*.csv, ...), and summary.json links
 * them under one "plan" section. cmd_supply runs the same script without the site
 * step and the report (plan_job below). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cJSON.h>

#include "cli.h"
#include "job.h"
#include "districts.h"
#include "inputs.h"
#include "network.h"
#include "output.h"
#include "points.h"
#include "progress.h"
#include "reach.h"
#include "report.h"
#include "site.h"
#include "summary.h"
#include "supply_stage.h"

const char cmd_plan_usage[] =
    "usage: sitereach plan SCENARIO.json -o OUTDIR [--json] [--quiet] [--threads N]\n"
    "\n"
    "The whole job: checks the inputs, finds travel times to the existing sites\n"
    "(sites.existing), selects new sites when the scenario has a 'siting' section, then\n"
    "sizes the stock of every site and plans the truck trips from the depots when it has\n"
    "a 'supply' section (docs/plan.md). Writes into OUTDIR:\n"
    "  travel_time.tif, nearest_site.tif, sites.csv, bands.csv, catchments.gpkg\n"
    "                       travel times and catchments of the existing sites (as 'reach')\n"
    "  supply_stock.csv     stock per site and commodity: needed, delivered, short, packs,\n"
    "                       weight, volume\n"
    "  supply_shipments.csv truck trips per depot and site, load per trip, travel time\n"
    "  supply_unmet.csv     what is short where, why, and what to do about it\n"
    "  supply_depots.csv    stock on hand, shipped and left per depot\n"
    "  supply_travel.csv    depot -> site times and distances on the vehicle roads\n"
    "  summary.json         all of the above linked, with assumptions, solver status and gap\n"
    "  report.html, maps/   the HTML report (travel times, catchments, loads) and its maps\n"
    "\n"
    "  --json        print summary.json on stdout instead of the human summary\n"
    "  --quiet       no progress lines and no human summary\n"
    "  --threads N   threads for the bounded searches (default: all cores)\n";

/* Open sites after the site step and the people each serves (borrowed or owned). */
typedef struct plan_sites {
    const points_t *sites;  /* open sites (existing, plus new ones once site selection runs) */
    double *persons;        /* [n] people assigned to each (owned) */
    int assignment;         /* SUPPLY_STAGE_* */
    size_t opened;          /* new sites opened by the site step */
    double covered_after;   /* people within the limit of an open site after the step */
    int ran;                /* 1 when a site stage ran */
    points_t *owned;        /* the open sites when the site stage made them */
} plan_sites_t;

/* ---- site selection ------------------------------------------------------------
 * With a 'siting' section the site stage (include/site.h) chooses the new sites;
 * its files go into OUTDIR/site (its sites.csv differs from reach's) and its
 * figures into the "site" section of summary.json. The open sites (existing
 * kept plus new) and the people each serves within the limit feed supply. */

/* Copy one site of the site stage into slot k of 'out'. Existing and
 * candidate-layer sites keep their storage capacity; generated ones have none
 * given (unlimited). */
static int copy_site(const inputs_t *in, const site_data_t *sd, size_t i, points_t *out,
                     size_t k)
{
    const loc_problem_t *p = sd->prob;
    double storage = INFINITY;

    if (sd->origin[i] == SITE_EXISTING && in->existing != NULL && i < in->existing->n)
        storage = in->existing->storage_m3[i];
    else if (sd->origin[i] == SITE_LAYER && in->candidates != NULL &&
             i - sd->n_existing < in->candidates->n)
        storage = in->candidates->storage_m3[i - sd->n_existing];
    out->id[k] = strdup(p->site_id[i] ? p->site_id[i] : "");
    out->name[k] = strdup(sd->site_name[i] ? sd->site_name[i] : "");
    if (out->id[k] == NULL || out->name[k] == NULL) return ERR_NOMEM;
    out->x[k] = sd->site_x[i];
    out->y[k] = sd->site_y[i];
    out->cell[k] = sd->site_cell[i];
    out->capacity[k] = p->capacity[i];
    out->cost[k] = p->fixed_cost[i];
    out->storage_m3[k] = storage;
    return ERR_OK;
}

static int plan_site_step(const inputs_t *in, network_t *net, const cli_options_t *o,
                          cJSON *summary, plan_sites_t *ps, err_t *e)
{
    site_data_t sd = {0};
    site_result_t sr = {0};
    points_t *open = NULL;
    const loc_result_t *pl;
    char *dir = NULL;
    int rc;

    if (in->scen->siting == NULL) return ERR_OK;
    rc = site_prepare_grid(in, net, o->threads, o->quiet, &sd, e);
    if (rc == ERR_OK) rc = site_run(in->scen, &sd, o->quiet, &sr, e);
    if (rc != ERR_OK) goto done;
    dir = out_join(o->outdir, "site");
    if (dir == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    rc = out_mkdir(dir, e);
    if (rc == ERR_OK) rc = site_write(dir, in->scen, &sd, &sr, summary, e);
    if (rc != ERR_OK) goto done;
    {
        cJSON *sj = cJSON_GetObjectItem(summary, "site");
        if (sj != NULL) cJSON_AddStringToObject(sj, "folder", "site");
    }
    if (!o->quiet && !o->json) site_print(in->scen, &sd, &sr);

    pl = &sr.plan;
    open = calloc(1, sizeof *open);
    if (open == NULL) goto nomem;
    open->n = pl->n_open;
    open->id = calloc(pl->n_open + 1, sizeof *open->id);
    open->name = calloc(pl->n_open + 1, sizeof *open->name);
    open->x = malloc((pl->n_open + 1) * sizeof *open->x);
    open->y = malloc((pl->n_open + 1) * sizeof *open->y);
    open->cell = malloc((pl->n_open + 1) * sizeof *open->cell);
    open->capacity = malloc((pl->n_open + 1) * sizeof *open->capacity);
    open->cost = malloc((pl->n_open + 1) * sizeof *open->cost);
    open->storage_m3 = malloc((pl->n_open + 1) * sizeof *open->storage_m3);
    free(ps->persons);
    ps->persons = calloc(pl->n_open + 1, sizeof *ps->persons);
    if (!open->id || !open->name || !open->x || !open->y || !open->cell || !open->capacity ||
        !open->cost || !open->storage_m3 || !ps->persons)
        goto nomem;
    {
        /* Site index -> slot among the open sites. */
        long *slot = malloc((sd.prob->n_sites + 1) * sizeof *slot);
        if (slot == NULL) goto nomem;
        for (size_t i = 0; i < sd.prob->n_sites; i++) slot[i] = -1;
        for (size_t k = 0; k < pl->n_open; k++) {
            slot[pl->open[k]] = (long)k;
            if (copy_site(in, &sd, (size_t)pl->open[k], open, k) != ERR_OK) {
                free(slot);
                goto nomem;
            }
            if (!sd.existing[pl->open[k]]) ps->opened++;
        }
        /* People each open site serves within the limit: the exact split of a
         * capacitated plan when there is one, else each unit's serving site. */
        if (sr.flow != NULL) {
            for (size_t q = 0; q < sd.prob->n_pairs; q++)
                if (sr.flow[q] > 0 && slot[sd.prob->pair_site[q]] >= 0)
                    ps->persons[slot[sd.prob->pair_site[q]]] += sr.flow[q];
        } else {
            for (size_t u = 0; u < sd.prob->n_units; u++)
                if (pl->assign[u] >= 0 && slot[pl->assign[u]] >= 0)
                    ps->persons[slot[pl->assign[u]]] += pl->served[u];
        }
        free(slot);
    }
    ps->owned = open;
    ps->sites = open;
    open = NULL;
    ps->assignment = SUPPLY_STAGE_GIVEN;
    ps->covered_after = pl->served_weight;
    ps->ran = 1;
    goto done;
nomem:
    rc = err_set(e, ERR_NOMEM, "out of memory collecting the open sites");
done:
    points_free(open);
    free(dir);
    site_result_destroy(&sr);
    site_data_destroy(&sd);
    return rc;
}
/* ---- end of site selection ------------------------------------------------------ */

static void print_plan(const inputs_t *in, const districts_t *d, const plan_sites_t *ps,
                       const reach_result_t *before, const supply_stage_t *sup, const warn_list_t *notes, int full,
                       const char *outdir)
{
    double total = in->grid->total_people;
    double b = before != NULL ? before->people_within_limit : 0;
    double lim = in->scen->limit_s / 60.0;

    for (size_t i = 0; i < in->warnings.n; i++) printf("warning: %s\n", in->warnings.items[i]);
    for (size_t i = 0; i < notes->n; i++) printf("note: %s\n", notes->items[i]);
    printf("%s: %.0f people, %zu existing sites, %zu depots\n", in->scen->name, total,
           in->existing ? in->existing->n : 0, in->depots ? in->depots->n : 0);
    printf("people within %g min of a site: before %.0f (%.1f%%)", lim, b,
           total > 0 ? 100 * b / total : 0.0);
    if (full)
        printf(", after %.0f (%.1f%%); sites opened: %zu%s\n", ps->covered_after,
               total > 0 ? 100 * ps->covered_after / total : 0.0, ps->opened,
               ps->ran ? "" : " (no site selection)");
    else
        printf("\n");
    if (before != NULL) reach_print(in, in->existing, d, before);
    if (sup != NULL) supply_stage_print(in, ps->sites, sup);
    else printf("stock and shipments: skipped (the scenario has no 'supply' section)\n");
    printf("outputs in %s\n%s\n", outdir, summary_caution_text);
}

int cmd_plan_job(const cli_options_t *o, int full, err_t *e)
{
    inputs_t *in = NULL;
    districts_t *d = NULL;
    network_t *net = NULL;
    reach_result_t before = {0};
    int have_before = 0;
    supply_stage_t sup = {0};
    int have_sup = 0;
    plan_sites_t ps = {0};
    report_result_t report = {0};
    warn_list_t notes;
    cJSON *sum = NULL, *pj, *links, *rep = NULL;
    progress_t pr;
    int rc;

    warn_init(&notes);
    progress_init(&pr, o->quiet);
    /* check: every input loaded and validated before any work starts. */
    rc = inputs_load(o->scenario, o->quiet, &in, e);
    if (rc != ERR_OK) goto done;
    if (!full && in->scen->supply == NULL) {
        rc = err_set(e, ERR_INPUT, "scenario '%s' has no 'supply' section: add commodities, "
                     "fleet and depot_stock (docs/plan.md)", in->scen->file);
        goto done;
    }
    rc = out_mkdir(o->outdir, e);
    if (rc != ERR_OK) goto done;
    /* Outputs are about to change: drop the old run's summary and report first,
     * so a failure below leaves no index over a mix of old and new files. */
    rc = out_forget_run(o->outdir, e);
    if (rc != ERR_OK) goto done;
    if (in->scen->districts.path != NULL) {
        rc = districts_load(&in->scen->districts, in->grid, &d, e);
        if (rc != ERR_OK) goto done;
    }
    rc = summary_new(full ? "plan" : "supply", in, &sum, e);
    if (rc != ERR_OK) goto done;
    rc = inputs_report(in, &rep, e);
    if (rc != ERR_OK) goto done;
    cJSON_AddItemToObject(sum, "check", rep);

    /* reach: the existing sites (skipped when there are none and new sites will be
     * chosen; otherwise reach_run names the missing layer). */
    progress_start(&pr, "building travel network");
    rc = network_build(in->grid, in->roads, in->scen, &net, e);
    summary_time(sum, "build_network", progress_end(&pr));
    if (rc != ERR_OK) goto done;
    if ((in->existing != NULL && in->existing->n > 0) || !full || in->scen->siting == NULL) {
        rc = reach_run(in, net, in->existing, d, o->threads, o->quiet, &before, e);
        if (rc != ERR_OK) goto done;
        have_before = 1;
        summary_time(sum, "nearest_site_pass", before.seconds_nearest);
        summary_time(sum, "capacity_searches", before.seconds_capacity);
        progress_start(&pr, "writing travel-time outputs");
        rc = reach_write(o->outdir, in, in->existing, d, &before, sum, e);
        summary_time(sum, "write_reach", progress_end(&pr));
        if (rc != ERR_OK) goto done;
    }

    /* site: new points when the scenario has a 'siting' section; without one,
     * supply serves the existing sites with the people reach assigned to them. */
    ps.sites = in->existing;
    if (have_before) {
        ps.persons = malloc((before.n_sites + 1) * sizeof *ps.persons);
        if (ps.persons == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory for people per site");
            goto done;
        }
        ps.assignment = supply_stage_persons_from_reach(&before, ps.persons);
    }
    if (full) {
        ps.covered_after = have_before ? before.people_within_limit : 0;
        rc = plan_site_step(in, net, o, sum, &ps, e);
        if (rc != ERR_OK) goto done;
    }

    /* supply: stock and truck trips for the open sites. */
    if (in->scen->supply != NULL) {
        progress_start(&pr, "stock and shipments");
        have_sup = 1;
        rc = supply_stage_run(in, ps.sites, ps.persons, ps.assignment, &sup, e);
        summary_time(sum, "supply", progress_end(&pr));
        if (rc != ERR_OK) goto done;
        rc = supply_stage_write(o->outdir, in, ps.sites, &sup, sum, e);
        if (rc != ERR_OK) goto done;
    }

    pj = cJSON_AddObjectToObject(sum, "plan");
    cJSON_AddNumberToObject(pj, "people_total", in->grid->total_people);
    cJSON_AddNumberToObject(pj, "limit_min", in->scen->limit_s / 60.0);
    cJSON_AddNumberToObject(pj, "people_within_limit_before",
                            have_before ? before.people_within_limit : 0);
    cJSON_AddNumberToObject(pj, "people_within_limit_after", ps.covered_after);
    cJSON_AddNumberToObject(pj, "sites_existing", in->existing ? (double)in->existing->n : 0);
    cJSON_AddNumberToObject(pj, "sites_opened", (double)ps.opened);
    cJSON_AddBoolToObject(pj, "site_selection_ran", ps.ran);
    {
        cJSON *nj = cJSON_AddArrayToObject(pj, "notes");
        for (size_t i = 0; i < notes.n; i++)
            cJSON_AddItemToArray(nj, cJSON_CreateString(notes.items[i]));
    }
    /* Each stage's section of this file, or null when the stage did not run. */
    links = cJSON_AddObjectToObject(pj, "sections");
    cJSON_AddStringToObject(links, "check", "check");
    if (have_before) cJSON_AddStringToObject(links, "reach", "reach");
    else cJSON_AddNullToObject(links, "reach");
    if (ps.ran) cJSON_AddStringToObject(links, "site", "site");
    else cJSON_AddNullToObject(links, "site");
    if (have_sup) cJSON_AddStringToObject(links, "supply", "supply");
    else cJSON_AddNullToObject(links, "supply");
    rc = cli_summary_save(o, sum, e);
    if (rc != ERR_OK) goto done;

    /* plan ends with the HTML report of everything it wrote. */
    if (full) {
        rc = report_write(o->outdir, &report, e);
        if (rc != ERR_OK) goto done;
        /* Link the report from summary.json too (written again, atomically). */
        cJSON_AddStringToObject(links, "report", "report.html");
        rc = cli_summary_save(o, sum, e);
        if (rc != ERR_OK) goto done;
    }

    /* print_plan prints the warnings itself, with the plan's notes. */
    if (cli_summary_show(o, sum, NULL)) {
        print_plan(in, d, &ps, have_before ? &before : NULL, have_sup ? &sup : NULL, &notes, full,
                   o->outdir);
        /* Last, so a coordinator finds it at the bottom of the output. */
        if (report.html != NULL) printf("report: %s\n", report.html);
    }
done:
    report_result_destroy(&report);
    free(ps.persons);
    points_free(ps.owned);
    cJSON_Delete(sum);
    supply_stage_destroy(&sup);
    reach_result_destroy(&before);
    network_free(net);
    districts_free(d);
    inputs_free(in);
    warn_destroy(&notes);
    return rc;
}

int cmd_plan(const cli_options_t *o, err_t *e)
{
    return cmd_plan_job(o, 1, e);
}

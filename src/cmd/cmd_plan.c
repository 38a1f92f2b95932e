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
#include "districts.h"
#include "inputs.h"
#include "network.h"
#include "output.h"
#include "points.h"
#include "progress.h"
#include "reach.h"
#include "report.h"
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
} plan_sites_t;

/* ---- WIRING POINT: site selection --------------------------------------------
 * The site stage (include/site.h, src/stages/site.c) is not in this build yet.
 * When it lands, replace the body below by, in order:
 *   site_run(in, net, reach_before, ..., &site_res, e);       choose the new sites
 *   site_write(outdir, in, &site_res, summary, e);            its files + "site" section
 *   ps->sites = <existing + opened sites as a points_t>;     (owned by site_res)
 *   ps->persons[s] = <people site_res assigns to site s>;    ps->assignment = GIVEN;
 *   ps->opened = <number of new sites>; ps->covered_after = <people within the limit>;
 *   ps->ran = 1;
 * and print its summary in print_plan. Nothing else in this file needs to change. */
static int plan_site_step(const inputs_t *in, network_t *net, const reach_result_t *before,
                          const char *outdir, cJSON *summary, plan_sites_t *ps,
                          warn_list_t *notes, err_t *e)
{
    (void)net;
    (void)outdir;
    (void)summary;
    (void)e;
    if (in->scen->siting != NULL)
        warn_add(notes, "the scenario has a 'siting' section, but this build has no site "
                 "selection stage yet: no new sites were opened");
    ps->covered_after = before != NULL ? before->people_within_limit : 0;
    return ERR_OK;
}
/* ---- end of the wiring point ------------------------------------------------- */

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
    char *path = NULL;
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

    /* site: new points (stubbed until the site stage is merged). Until then
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
        rc = plan_site_step(in, net, have_before ? &before : NULL, o->outdir, sum, &ps, &notes,
                            e);
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
    summary_caution(sum);
    path = out_join(o->outdir, "summary.json");
    rc = out_write_json(path, sum, e);
    if (rc != ERR_OK) goto done;

    /* plan ends with the HTML report of everything it wrote. */
    if (full) {
        rc = report_write(o->outdir, &report, e);
        if (rc != ERR_OK) goto done;
    }

    if (o->json) {
        char *text = cJSON_Print(sum);
        if (text != NULL) puts(text);
        cJSON_free(text);
    } else if (!o->quiet) {
        print_plan(in, d, &ps, have_before ? &before : NULL, have_sup ? &sup : NULL, &notes, full,
                   o->outdir);
        /* Last, so a coordinator finds it at the bottom of the output. */
        if (report.html != NULL) printf("report: %s\n", report.html);
    }
done:
    report_result_destroy(&report);
    free(path);
    free(ps.persons);
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

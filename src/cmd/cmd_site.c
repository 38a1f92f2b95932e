/* site: choose sites with the model of the scenario's "siting" section, on the
 * grid (inputs -> network -> coverage lists -> model) or on CSV tables
 * (inputs.tables -> model). A short script of stages. */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
#include "job.h"
#include "inputs.h"
#include "network.h"
#include "output.h"
#include "progress.h"
#include "scen_siting.h"
#include "site.h"
#include "site_robust.h"
#include "summary.h"

const char cmd_site_usage[] =
    "usage: sitereach site SCENARIO.json -o OUTDIR [--json] [--quiet] [--threads N]\n"
    "\n"
    "Chooses sites with the model named in the scenario's \"siting\" section\n"
    "(max_cover, set_cover, p_median or capacitated; see docs/siting.md), on the\n"
    "grid or on CSV tables (inputs.tables), and reports coverage before (existing\n"
    "sites only) and after. Writes into OUTDIR:\n"
    "  sites.csv           open sites (kept/new) and closed existing ones: people\n"
    "                      served, load against capacity, mean and max time\n"
    "  sites.gpkg          the same as points (grids)\n"
    "  assignment.tif      row in sites.csv of each cell's site (grids; -1 = none)\n"
    "  assignment.csv      each demand row's site, people served, cost (tables)\n"
    "  unserved.csv        demand left out, with the reason\n"
    "  unserved.tif        people left out per cell (grids)\n"
    "  coverage_curve.csv  best coverage for p = 1..P (when asked or for max_cover)\n"
    "  robust.csv          with siting.robust: people covered under the base and each\n"
    "                      variant by the robust plan and by the base-only plan\n"
    "  robust_sites.csv    with siting.robust: the robust plan's open sites\n"
    "  summary.json        model, status, objective, bound, gap, open sites, people\n"
    "                      covered and unserved, solver time, inputs with checksums\n"
    "\n"
    "  --json        print summary.json on stdout instead of the human summary\n"
    "  --quiet       no progress lines and no human summary\n"
    "  --threads N   threads for the bounded searches (default: all cores)\n";

/* The grid path: everything inputs_load reads, the network, then the stage. */
static int run_grid(const cli_options_t *o, inputs_t **inp, site_data_t *d, site_robust_t *rob,
                    cJSON **sum, err_t *e)
{
    network_t *net = NULL;
    progress_t pr;
    int rc;

    progress_init(&pr, o->quiet);
    rc = inputs_load(o->scenario, o->quiet, inp, e);
    if (rc != ERR_OK) return rc;
    if ((*inp)->scen->siting == NULL)
        return err_set(e, ERR_INPUT, "%s: has no 'siting' section; add one naming the model "
                       "(see docs/siting.md)", (*inp)->scen->file);
    rc = summary_new("site", *inp, sum, e);
    if (rc != ERR_OK) return rc;
    progress_start(&pr, "building travel network");
    rc = network_build((*inp)->grid, (*inp)->roads, (*inp)->scen, &net, e);
    summary_time(*sum, "build_network", progress_end(&pr));
    if (rc == ERR_OK) rc = site_prepare_grid(*inp, net, o->threads, o->quiet, d, e);
    /* Robust siting needs the network once more: each variant's searches. */
    if (rc == ERR_OK && (*inp)->scen->siting->robust)
        rc = site_robust_prepare(*inp, net, d, o->threads, o->quiet, rob, e);
    network_free(net);
    if (rc != ERR_OK) return rc;
    if ((*inp)->scen->siting->robust) summary_time(*sum, "robust_searches", rob->seconds_searches);
    summary_time(*sum, "coverage_searches", d->seconds_searches);
    summary_time(*sum, "build_problem", d->seconds_build);
    return ERR_OK;
}

int cmd_site(const cli_options_t *o, err_t *e)
{
    inputs_t *in = NULL;
    scen_t *scen = NULL;
    site_data_t d = {0};
    site_result_t r = {0};
    site_robust_t rob = {0};
    cJSON *sum = NULL;
    progress_t pr;
    int rc;

    progress_init(&pr, o->quiet);
    /* Read the scenario once to see whether it names a grid or tables. */
    rc = scen_load(o->scenario, &scen, e);
    if (rc != ERR_OK) goto done;
    if (scen->population != NULL) {
        scen_free(scen);
        scen = NULL;
        rc = run_grid(o, &in, &d, &rob, &sum, e);
        if (rc != ERR_OK) goto done;
    } else {
        inputs_t tin = {0};
        tin.scen = scen;
        if (scen->siting != NULL && scen->siting->robust) {
            rc = err_set(e, ERR_INPUT, "%s: key 'siting.robust' works on grids only (variants "
                         "edit the road network); remove it for table inputs", scen->file);
            goto done;
        }
        rc = site_prepare_tables(scen, &d, e);
        if (rc == ERR_OK) rc = summary_new("site", &tin, &sum, e);
        if (rc != ERR_OK) goto done;
        summary_time(sum, "load_tables", d.seconds_build);
    }
    rc = out_mkdir(o->outdir, e);
    if (rc != ERR_OK) goto done;
    /* Files are about to change: drop the old run's index first (see output.h). */
    rc = out_forget_run(o->outdir, e);
    if (rc != ERR_OK) goto done;
    {
        const scen_t *s = in != NULL ? in->scen : scen;
        rc = site_run(s, &d, o->quiet, &r, e);
        if (rc != ERR_OK) goto done;
        summary_time(sum, "model", r.seconds_model);
        summary_time(sum, "coverage_curve", r.seconds_curve);
        if (rob.prob != NULL) {
            rc = site_robust_solve(s, &d, &r, &rob, e);
            if (rc != ERR_OK) goto done;
            summary_time(sum, "robust_model", rob.seconds_model);
        }
        progress_start(&pr, "writing outputs");
        rc = site_write(o->outdir, s, &d, &r, sum, e);
        if (rc == ERR_OK && rob.prob != NULL)
            rc = site_robust_write(o->outdir, s, &d, &rob, sum, e);
        summary_time(sum, "write_outputs", progress_end(&pr));
        if (rc != ERR_OK) goto done;
        rc = cli_summary_save(o, sum, e);
        if (rc != ERR_OK) goto done;
        if (cli_summary_show(o, sum, in != NULL ? &in->warnings : NULL)) {
            site_print(s, &d, &r);
            if (rob.prob != NULL) site_robust_print(s, &d, &rob);
            cli_job_footer(o);
        }
    }
done:
    cJSON_Delete(sum);
    site_result_destroy(&r);
    site_robust_destroy(&rob);
    site_data_destroy(&d);
    inputs_free(in);
    scen_free(scen);
    return rc;
}

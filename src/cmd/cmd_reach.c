/* reach: travel times to the nearest existing site, catchments, people by
 * time band, site loads. A short script of stages: inputs -> network -> reach. */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
#include "job.h"
#include "reach.h"
#include "summary.h"

const char cmd_reach_usage[] =
    "usage: sitereach reach SCENARIO.json -o OUTDIR [--json] [--quiet] [--threads N]\n"
    "\n"
    "Travel time from every cell to the nearest existing site (sites.existing), the\n"
    "catchment of each site, people by time band (coverage.bands_min) overall and per\n"
    "district, and each site's load against its capacity. Writes into OUTDIR:\n"
    "  travel_time.tif    minutes to the nearest site (float32; -1 = unreachable)\n"
    "  nearest_site.tif   index of the nearest site (int32; -1 = unreachable)\n"
    "  sites.csv          per site: people, capacity, load, people beyond the limit, times\n"
    "  bands.csv          people by time band, overall and per district\n"
    "  catchments.gpkg    one polygon per site with its figures\n"
    "  groups.csv         people by time band per population group (with population_groups)\n"
    "  summary.json       inputs with checksums, parameters, counts and timings\n"
    "\n"
    "  --json        print summary.json on stdout instead of the human summary\n"
    "  --quiet       no progress lines and no human summary\n"
    "  --threads N   threads for the bounded searches (default: all cores)\n";

int cmd_reach(const cli_options_t *o, err_t *e)
{
    cli_job_t j;
    reach_result_t res = {0};
    int rc, human;

    rc = cli_job_open(o, "reach", NULL, &j, e);
    if (rc != ERR_OK) goto done;
    rc = reach_run(j.in, j.net, j.in->existing, j.districts, o->threads, o->quiet, &res, e);
    if (rc != ERR_OK) goto done;
    summary_time(j.summary, "nearest_site_pass", res.seconds_nearest);
    summary_time(j.summary, "capacity_searches", res.seconds_capacity);

    progress_start(&j.progress, "writing outputs");
    rc = reach_write(o->outdir, j.in, j.in->existing, j.districts, &res, j.summary, e);
    summary_time(j.summary, "write_outputs", progress_end(&j.progress));
    if (rc != ERR_OK) goto done;
    rc = cli_job_finish(o, &j, &human, e);
    if (rc == ERR_OK && human) {
        reach_print(j.in, j.in->existing, j.districts, &res);
        cli_job_footer(o);
    }
done:
    reach_result_destroy(&res);
    cli_job_close(&j);
    return rc;
}

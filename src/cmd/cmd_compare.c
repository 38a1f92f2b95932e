/* compare: the base scenario and each of its variants side by side. A short
 * script of stages: inputs -> network -> compare (variants edit the network in
 * place and are undone after each). */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
#include "job.h"
#include "compare.h"
#include "districts.h"
#include "inputs.h"
#include "network.h"
#include "output.h"
#include "progress.h"
#include "summary.h"

const char cmd_compare_usage[] =
    "usage: sitereach compare SCENARIO.json -o OUTDIR [--json] [--quiet]\n"
    "\n"
    "Runs the base scenario and each of its variants (the \"variants\" list: roads\n"
    "closed, a flood extent, rainy-season speeds, sites closed or opened; see\n"
    "docs/whatif.md) and sets them side by side: people by time band, people pushed\n"
    "beyond the coverage limit (coverage.limit_min) and where they are, added\n"
    "person-hours, sites whose load rises past capacity. Writes into OUTDIR:\n"
    "  compare.csv             variants ranked by people pushed beyond the limit\n"
    "  compare_bands.csv       people by band, overall and per district, base and variants\n"
    "  compare_sites.csv       per variant and site: people, capacity, load\n"
    "  delta_VARIANT.tif       minutes lost (+) or gained (-) per cell; 9999 = cut off,\n"
    "                          -9999 = newly reached\n"
    "  affected_VARIANT.gpkg   areas that lost (or gained) access within the limit\n"
    "  summary.json            inputs with checksums, the \"compare\" section, timings\n"
    "\n"
    "  --json        print summary.json on stdout instead of the human summary\n"
    "  --quiet       no progress lines and no human summary\n";

int cmd_compare(const cli_options_t *o, err_t *e)
{
    cli_job_t j;
    compare_result_t res = {0};
    int rc, human;

    rc = cli_job_open(o, "compare", NULL, &j, e);
    if (rc != ERR_OK) goto done;
    {
        double t0 = progress_now();
        rc = compare_run(j.in, j.net, j.districts, o->outdir, o->threads, o->quiet, j.summary,
                         &res, e);
        summary_time(j.summary, "compare", progress_now() - t0);
    }
    if (rc != ERR_OK) goto done;
    rc = cli_job_finish(o, &j, &human, e);
    if (rc == ERR_OK && human) {
        compare_print(j.in, &res);
        cli_job_footer(o);
    }
done:
    compare_result_destroy(&res);
    cli_job_close(&j);
    return rc;
}

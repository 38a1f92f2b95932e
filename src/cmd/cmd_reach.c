/* reach: travel times to the nearest existing site, catchments, people by
 * time band, site loads. A short script of stages: inputs -> network -> reach. */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
#include "districts.h"
#include "inputs.h"
#include "network.h"
#include "output.h"
#include "progress.h"
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
    inputs_t *in = NULL;
    districts_t *d = NULL;
    network_t *net = NULL;
    reach_result_t res = {0};
    cJSON *sum = NULL;
    char *path = NULL;
    progress_t pr;
    int rc;

    progress_init(&pr, o->quiet);
    rc = inputs_load(o->scenario, o->quiet, &in, e);
    if (rc != ERR_OK) goto done;
    rc = out_mkdir(o->outdir, e);
    if (rc != ERR_OK) goto done;
    if (in->scen->districts.path != NULL) {
        rc = districts_load(&in->scen->districts, in->grid, &d, e);
        if (rc != ERR_OK) goto done;
    }
    rc = summary_new("reach", in, &sum, e);
    if (rc != ERR_OK) goto done;

    progress_start(&pr, "building travel network");
    rc = network_build(in->grid, in->roads, in->scen, &net, e);
    summary_time(sum, "build_network", progress_end(&pr));
    if (rc != ERR_OK) goto done;
    rc = reach_run(in, net, in->existing, d, o->threads, o->quiet, &res, e);
    if (rc != ERR_OK) goto done;
    summary_time(sum, "nearest_site_pass", res.seconds_nearest);
    summary_time(sum, "capacity_searches", res.seconds_capacity);

    /* From here on files change: first drop the old run's index (see output.h). */
    rc = out_forget_run(o->outdir, e);
    if (rc != ERR_OK) goto done;
    progress_start(&pr, "writing outputs");
    rc = reach_write(o->outdir, in, in->existing, d, &res, sum, e);
    summary_time(sum, "write_outputs", progress_end(&pr));
    if (rc != ERR_OK) goto done;
    summary_caution(sum);
    path = out_join(o->outdir, "summary.json");
    rc = out_write_json(path, sum, e);
    if (rc != ERR_OK) goto done;

    if (o->json) {
        char *text = cJSON_Print(sum);
        if (text != NULL) puts(text);
        cJSON_free(text);
    } else if (!o->quiet) {
        for (size_t i = 0; i < in->warnings.n; i++) printf("warning: %s\n", in->warnings.items[i]);
        reach_print(in, in->existing, d, &res);
        printf("outputs in %s\n%s\n", o->outdir, summary_caution_text);
    }
done:
    free(path);
    cJSON_Delete(sum);
    reach_result_destroy(&res);
    network_free(net);
    districts_free(d);
    inputs_free(in);
    return rc;
}

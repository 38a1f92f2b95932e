/* compare: the base scenario and each of its variants side by side. A short
 * script of stages: inputs -> network -> compare (variants edit the network in
 * place and are undone after each). */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
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
    inputs_t *in = NULL;
    districts_t *d = NULL;
    network_t *net = NULL;
    compare_result_t res = {0};
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
    rc = summary_new("compare", in, &sum, e);
    if (rc != ERR_OK) goto done;

    progress_start(&pr, "building travel network");
    rc = network_build(in->grid, in->roads, in->scen, &net, e);
    summary_time(sum, "build_network", progress_end(&pr));
    if (rc != ERR_OK) goto done;
    {
        double t0 = progress_now();
        rc = compare_run(in, net, d, o->outdir, o->threads, o->quiet, sum, &res, e);
        summary_time(sum, "compare", progress_now() - t0);
    }
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
        compare_print(in, &res);
        printf("outputs in %s\n%s\n", o->outdir, summary_caution_text);
    }
done:
    free(path);
    cJSON_Delete(sum);
    compare_result_destroy(&res);
    network_free(net);
    districts_free(d);
    inputs_free(in);
    return rc;
}

/* links: rank road links by the harm of closing each one alone. A short script
 * of stages: inputs -> network -> links (build, score on threads, write). */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
#include "inputs.h"
#include "links.h"
#include "network.h"
#include "output.h"
#include "progress.h"
#include "summary.h"

const char cmd_links_usage[] =
    "usage: sitereach links SCENARIO.json -o OUTDIR [--json] [--quiet] [--threads N]\n"
    "\n"
    "Splits the road network into links (chains of segments between junctions; each\n"
    "bridge is a link of its own) and scores each by closing it alone: people pushed\n"
    "beyond the coverage limit (coverage.limit_min) to the nearest existing site,\n"
    "people cut off, and added person-hours. Links that carry no shortest path are\n"
    "skipped (closing them changes nothing). Writes into OUTDIR:\n"
    "  links.csv      every link, most harmful first\n"
    "  links.gpkg     the same as lines, for a GIS\n"
    "  summary.json   inputs with checksums, the \"links\" section, timings\n"
    "\n"
    "  --json        print summary.json on stdout instead of the human summary\n"
    "  --quiet       no progress lines and no human summary\n"
    "  --threads N   threads for the scoring (default: all cores)\n";

int cmd_links(const cli_options_t *o, err_t *e)
{
    inputs_t *in = NULL;
    network_t *net = NULL;
    links_t *L = NULL;
    cJSON *sum = NULL;
    char *path = NULL;
    progress_t pr;
    int rc;

    progress_init(&pr, o->quiet);
    rc = inputs_load(o->scenario, o->quiet, &in, e);
    if (rc != ERR_OK) goto done;
    if (in->roads == NULL || in->roads->n_segs == 0) {
        rc = err_set(e, ERR_INPUT, "scenario '%s' has no roads to rank; give inputs.roads",
                     o->scenario);
        goto done;
    }
    rc = out_mkdir(o->outdir, e);
    if (rc != ERR_OK) goto done;
    rc = summary_new("links", in, &sum, e);
    if (rc != ERR_OK) goto done;

    progress_start(&pr, "building travel network");
    rc = network_build(in->grid, in->roads, in->scen, &net, e);
    summary_time(sum, "build_network", progress_end(&pr));
    if (rc != ERR_OK) goto done;
    rc = links_build(in->roads, &L, e);
    if (rc != ERR_OK) goto done;
    progress_start(&pr, "scoring road links");
    rc = links_score(L, net, in->grid->people, in->existing, in->grid->nx, in->scen->limit_s,
                     o->threads, e);
    summary_time(sum, "score_links", progress_end(&pr));
    if (rc != ERR_OK) goto done;
    rc = links_write(o->outdir, in, L, sum, e);
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
        links_print(in, L, 10);
        printf("outputs in %s\n%s\n", o->outdir, summary_caution_text);
    }
done:
    free(path);
    cJSON_Delete(sum);
    links_free(L);
    network_free(net);
    inputs_free(in);
    return rc;
}

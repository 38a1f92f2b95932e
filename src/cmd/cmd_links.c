/* links: rank road links by the harm of closing each one alone. A short script
 * of stages: inputs -> network -> links (build, score on threads, write). */
#include <stdio.h>
#include <stdlib.h>

#include <cJSON.h>

#include "cli.h"
#include "job.h"
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

/* Refuse a scenario without roads before anything is written. */
static int need_roads(const cli_options_t *o, const inputs_t *in, err_t *e)
{
    if (in->roads == NULL || in->roads->n_segs == 0)
        return err_set(e, ERR_INPUT, "scenario '%s' has no roads to rank; give inputs.roads",
                       o->scenario);
    return ERR_OK;
}

int cmd_links(const cli_options_t *o, err_t *e)
{
    cli_job_t j;
    links_t *L = NULL;
    int rc, human;

    rc = cli_job_open(o, "links", need_roads, &j, e);
    if (rc != ERR_OK) goto done;
    rc = links_build(j.in->roads, &L, e);
    if (rc != ERR_OK) goto done;
    progress_start(&j.progress, "scoring road links");
    rc = links_score(L, j.net, j.in->grid->people, j.in->existing, j.in->grid->nx,
                     j.in->scen->limit_s, o->threads, e);
    summary_time(j.summary, "score_links", progress_end(&j.progress));
    if (rc != ERR_OK) goto done;
    rc = links_write(o->outdir, j.in, L, j.summary, e);
    if (rc != ERR_OK) goto done;
    rc = cli_job_finish(o, &j, &human, e);
    if (rc == ERR_OK && human) {
        links_print(j.in, L, 10);
        cli_job_footer(o);
    }
done:
    links_free(L);
    cli_job_close(&j);
    return rc;
}

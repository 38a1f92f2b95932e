/* job: the opening and closing every grid command shares: load and check the
 * inputs, create OUTDIR, burn the districts, start summary.json, build the travel
 * network; at the end write summary.json with the caution, print it for --json,
 * or print the warnings before the command's human summary. Internal to src/cmd/. */
#ifndef JOB_H
#define JOB_H

#include <cJSON.h>

#include "cli.h"
#include "districts.h"
#include "inputs.h"
#include "network.h"
#include "progress.h"

typedef struct cli_job {
    inputs_t *in;
    districts_t *districts;   /* NULL when the scenario names none */
    network_t *net;
    cJSON *summary;
    progress_t progress;
} cli_job_t;

/* Load the inputs of o->scenario. A 'check' function (may be NULL) can refuse
 * them before any file is written; then OUTDIR, districts, summary (for
 * 'command') and the travel network. Close with cli_job_close, also on error. */
int cli_job_open(const cli_options_t *o, const char *command,
                 int (*check)(const cli_options_t *o, const inputs_t *in, err_t *e),
                 cli_job_t *j, err_t *e);
/* Write OUTDIR/summary.json with the caution (again, after a late change). */
int cli_summary_save(const cli_options_t *o, cJSON *summary, err_t *e);
/* With --json print the summary and return 0; with --quiet return 0; else print
 * the warnings (w may be NULL) and return 1: the caller prints its human summary. */
int cli_summary_show(const cli_options_t *o, const cJSON *summary, const warn_list_t *w);
/* cli_summary_save then cli_summary_show for a job; *human as the latter returns. */
int cli_job_finish(const cli_options_t *o, cli_job_t *j, int *human, err_t *e);
/* The last human lines: where the outputs are, and the caution. */
void cli_job_footer(const cli_options_t *o);
void cli_job_close(cli_job_t *j);

#endif

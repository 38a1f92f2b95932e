/* job: shared opening and closing of the grid commands (see job.h). */
#include "job.h"

#include <stdio.h>
#include <stdlib.h>

#include "output.h"
#include "summary.h"

int cli_job_open(const cli_options_t *o, const char *command,
                 int (*check)(const cli_options_t *o, const inputs_t *in, err_t *e),
                 cli_job_t *j, err_t *e)
{
    int rc;

    j->in = NULL;
    j->districts = NULL;
    j->net = NULL;
    j->summary = NULL;
    progress_init(&j->progress, o->quiet);
    rc = inputs_load(o->scenario, o->quiet, &j->in, e);
    if (rc == ERR_OK && check != NULL) rc = check(o, j->in, e);
    if (rc == ERR_OK) rc = out_mkdir(o->outdir, e);
    /* Files are about to change: drop the old run's index first (see output.h). */
    if (rc == ERR_OK) rc = out_forget_run(o->outdir, e);
    if (rc == ERR_OK && j->in->scen->districts.path != NULL)
        rc = districts_load(&j->in->scen->districts, j->in->grid, &j->districts, e);
    if (rc == ERR_OK) rc = summary_new(command, j->in, &j->summary, e);
    if (rc != ERR_OK) return rc;
    progress_start(&j->progress, "building travel network");
    rc = network_build(j->in->grid, j->in->roads, j->in->scen, &j->net, e);
    summary_time(j->summary, "build_network", progress_end(&j->progress));
    return rc;
}

int cli_summary_save(const cli_options_t *o, cJSON *summary, err_t *e)
{
    char *path = out_join(o->outdir, "summary.json");
    int rc;

    if (path == NULL) return err_set(e, ERR_NOMEM, "out of memory");
    summary_caution(summary);
    rc = out_write_json(path, summary, e);
    free(path);
    return rc;
}

int cli_summary_show(const cli_options_t *o, const cJSON *summary, const warn_list_t *w)
{
    if (o->json) {
        char *text = cJSON_Print(summary);
        if (text != NULL) puts(text);
        cJSON_free(text);
        return 0;
    }
    if (o->quiet) return 0;
    for (size_t i = 0; w != NULL && i < w->n; i++) printf("warning: %s\n", w->items[i]);
    return 1;
}

int cli_job_finish(const cli_options_t *o, cli_job_t *j, int *human, err_t *e)
{
    int rc = cli_summary_save(o, j->summary, e);

    *human = rc == ERR_OK && cli_summary_show(o, j->summary, &j->in->warnings);
    return rc;
}

void cli_job_footer(const cli_options_t *o)
{
    printf("outputs in %s\n%s\n", o->outdir, summary_caution_text);
}

void cli_job_close(cli_job_t *j)
{
    cJSON_Delete(j->summary);
    network_free(j->net);
    districts_free(j->districts);
    inputs_free(j->in);
    j->summary = NULL;
    j->net = NULL;
    j->districts = NULL;
    j->in = NULL;
}

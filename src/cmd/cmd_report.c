/* report: the HTML plan report of an output folder. Reads OUTDIR/summary.json
 * (written by reach and the later commands) and writes OUTDIR/report.html with
 * maps and charts in OUTDIR/maps/. */
#include <stdio.h>

#include <cJSON.h>

#include "cli.h"
#include "report.h"
#include "summary.h"

const char cmd_report_usage[] =
    "usage: sitereach report OUTDIR [--json] [--quiet]\n"
    "\n"
    "Writes OUTDIR/report.html from the results a command left in OUTDIR\n"
    "(summary.json and the files it names): key figures first (people within and\n"
    "beyond the limit, worst districts, sites over capacity), then maps, charts,\n"
    "tables, assumptions and the caution. The page is self-contained (images are\n"
    "embedded), reads on a phone and prints on A4. The maps are also written as\n"
    "PNG files into OUTDIR/maps/. The inputs are read again where summary.json\n"
    "recorded them (absolute paths), so they must not have moved since the run.\n"
    "\n"
    "  --json     print {\"report\": PATH, \"images\": [...], \"notes\": [...]} on stdout\n"
    "  --quiet    print nothing on success\n";

int cmd_report(const cli_options_t *o, err_t *e)
{
    report_result_t res;
    int rc = report_write(o->scenario, &res, e);

    if (rc != ERR_OK) goto done;
    if (o->json) {
        cJSON *j = cJSON_CreateObject(), *arr;
        char *text;
        cJSON_AddStringToObject(j, "report", res.html);
        arr = cJSON_AddArrayToObject(j, "images");
        for (size_t i = 0; i < res.n_images; i++)
            cJSON_AddItemToArray(arr, cJSON_CreateString(res.images[i]));
        arr = cJSON_AddArrayToObject(j, "notes");
        for (size_t i = 0; i < res.n_notes; i++)
            cJSON_AddItemToArray(arr, cJSON_CreateString(res.notes[i]));
        text = cJSON_Print(j);
        if (text != NULL) puts(text);
        cJSON_free(text);
        cJSON_Delete(j);
    } else if (!o->quiet) {
        for (size_t i = 0; i < res.n_notes; i++) printf("note: %s\n", res.notes[i]);
        printf("report written: %s (%zu maps and charts in it)\n%s\n", res.html, res.n_images,
               summary_caution_text);
    }
done:
    report_result_destroy(&res);
    return rc;
}

/* report: the plan report. Reads OUTDIR/summary.json and the files it names,
 * draws the maps and charts of every section present (reach now; site
 * selection, supply and variants add a section each), and writes one
 * self-contained OUTDIR/report.html: key figures first, then maps, tables,
 * assumptions and the caution. Images go to OUTDIR/maps/ and are embedded as
 * base64 data URIs. HTML is XHTML-compatible (every text escaped). */
#ifndef REPORT_H
#define REPORT_H

#include <stddef.h>

#include "err.h"

typedef struct report_result {
    char *html;      /* path of report.html (owned) */
    size_t n_images; /* maps and charts written */
    char **images;   /* their paths (owned) */
    size_t n_notes;  /* things left out (a layer missing, ...), one sentence each */
    char **notes;    /* owned */
} report_result_t;

/* Write OUTDIR/report.html (temporary name + rename) and PNG files in OUTDIR/maps
 * from OUTDIR/summary.json. A map layer that cannot be read (roads, districts)
 * is left out and noted, not an error. Errors: summary.json missing (ERR_IO)
 * or without any known section (ERR_INPUT), a raster of the run missing or
 * unreadable (ERR_IO/ERR_INPUT), writing failed (ERR_IO). Relative input
 * paths in the summary are read as given, i.e. from the folder the command
 * ran in. Caller destroys 'res' with report_result_destroy (also after an
 * error). */
int report_write(const char *outdir, report_result_t *res, err_t *e);
void report_result_destroy(report_result_t *res);  /* NULL-safe */

/* Data credits for the given input paths into buf, "; "-separated, each
 * source once: OpenStreetMap for .osm/.osm.pbf files and file names with an
 * "osm" word, GHS-POP for file names with "ghs_pop"/"ghs-pop". "" when none. */
void report_credits(const char *const *paths, size_t n, char *buf, size_t len);

/* Append 'text' to buf (of size len) with &, <, >, " and ' escaped for HTML
 * and XML; returns the length the full escaped text needs (like snprintf). */
size_t report_escape(const char *text, char *buf, size_t len);

#endif

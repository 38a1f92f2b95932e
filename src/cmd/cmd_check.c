/* check: validate a scenario and every input it names, and print a short report
 * (or the same as JSON with --json). The report is built once as a cJSON tree
 * and printed either way, so the two never disagree. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <cJSON.h>

#include "cli.h"
#include "inputs.h"

const char cmd_check_usage[] =
    "usage: sitereach check SCENARIO.json [--json] [--quiet]\n"
    "\n"
    "Reads the scenario and every input it names (population grid, optional land cover,\n"
    "elevation and barriers, roads, districts, site and depot layers) and prints a report:\n"
    "CRS, grid size, cell sizes, people, people on nodata and barrier cells, road features\n"
    "by class, junctions, road components, points and every warning.\n"
    "\n"
    "  --json    print the report as JSON on stdout\n"
    "  --quiet   no progress lines\n"
    "\n"
    "Exit status: 0 ok (warnings allowed), 1 bad input, 2 usage error, 3 internal failure.\n";

static void print_points(const cJSON *pts)
{
    const cJSON *p;
    cJSON_ArrayForEach(p, pts) {
        const cJSON *d = cJSON_GetObjectItem(p, "max_road_distance_m");
        int n = cJSON_GetObjectItem(p, "count")->valueint;
        printf("  %-22s %5d points", cJSON_GetObjectItem(p, "layer")->valuestring, n);
        /* No distance to claim without points or without roads. */
        if (cJSON_IsNumber(d)) printf(", farthest %.0f m from a road\n", d->valuedouble);
        else printf(n == 0 ? "\n" : ", no roads to measure from\n");
    }
}

static void print_report(const cJSON *r)
{
    const cJSON *g = cJSON_GetObjectItem(r, "grid");
    const cJSON *rd = cJSON_GetObjectItem(r, "roads");
    const cJSON *w = cJSON_GetObjectItem(r, "warnings");
    const cJSON *it;

    printf("scenario   %s\n", cJSON_GetObjectItem(r, "scenario")->valuestring);
    printf("CRS        %s\n", cJSON_GetObjectItem(g, "crs")->valuestring);
    printf("grid       %d x %d cells (%s)\n", cJSON_GetObjectItem(g, "columns")->valueint,
           cJSON_GetObjectItem(g, "rows")->valueint,
           cJSON_IsTrue(cJSON_GetObjectItem(g, "geographic")) ? "geographic, geodesic sizes"
                                                              : "projected");
    printf("cell size  %.1f-%.1f m wide, %.1f-%.1f m high\n",
           cJSON_GetObjectItem(g, "cell_width_min_m")->valuedouble,
           cJSON_GetObjectItem(g, "cell_width_max_m")->valuedouble,
           cJSON_GetObjectItem(g, "cell_height_min_m")->valuedouble,
           cJSON_GetObjectItem(g, "cell_height_max_m")->valuedouble);
    printf("people     %.0f in %.0f populated cells\n",
           cJSON_GetObjectItem(g, "people")->valuedouble,
           cJSON_GetObjectItem(g, "populated_cells")->valuedouble);
    printf("nodata     %.0f cells (counted as 0 people), %.0f NaN cells\n",
           cJSON_GetObjectItem(g, "nodata_cells")->valuedouble,
           cJSON_GetObjectItem(g, "nan_cells")->valuedouble);
    printf("barriers   %.0f people live on barrier cells\n",
           cJSON_GetObjectItem(g, "people_on_barriers")->valuedouble);
    if (rd != NULL) {
        printf("roads      %.0f features kept of %.0f read, %.1f km; %.0f clipped at the grid edge\n",
               cJSON_GetObjectItem(rd, "features")->valuedouble,
               cJSON_GetObjectItem(rd, "features_read")->valuedouble,
               cJSON_GetObjectItem(rd, "length_km")->valuedouble,
               cJSON_GetObjectItem(rd, "features_clipped")->valuedouble);
        cJSON_ArrayForEach(it, cJSON_GetObjectItem(rd, "classes")) {
            printf("  %-22s %6d features %9.1f km  walk %4.1f km/h, vehicle %5.1f km/h%s\n",
                   cJSON_GetObjectItem(it, "class")->valuestring,
                   cJSON_GetObjectItem(it, "features")->valueint,
                   cJSON_GetObjectItem(it, "length_km")->valuedouble,
                   cJSON_GetObjectItem(it, "walk_kmh")->valuedouble,
                   cJSON_GetObjectItem(it, "vehicle_kmh")->valuedouble,
                   cJSON_IsTrue(cJSON_GetObjectItem(it, "known")) ? "" : "  (unknown class)");
        }
        printf("junctions  %.0f; road nodes %.0f; segments %.0f\n",
               cJSON_GetObjectItem(rd, "junctions")->valuedouble,
               cJSON_GetObjectItem(rd, "nodes")->valuedouble,
               cJSON_GetObjectItem(rd, "segments")->valuedouble);
        printf("components %.0f connected road components (largest %.0f nodes)\n",
               cJSON_GetObjectItem(rd, "components")->valuedouble,
               cJSON_GetObjectItem(rd, "largest_component_nodes")->valuedouble);
    } else {
        printf("roads      none given: travel is walking only\n");
    }
    if (cJSON_GetArraySize(cJSON_GetObjectItem(r, "points")) > 0) {
        printf("points\n");
        print_points(cJSON_GetObjectItem(r, "points"));
    }
    printf("warnings   %d\n", cJSON_GetArraySize(w));
    cJSON_ArrayForEach(it, w) printf("  warning: %s\n", it->valuestring);
    printf("result     inputs are usable\n");
}

int cmd_check(const cli_options_t *o, err_t *e)
{
    inputs_t *in = NULL;
    cJSON *report = NULL;
    char *text = NULL;
    int rc;

    rc = inputs_load(o->scenario, o->quiet, &in, e);
    if (rc != ERR_OK) goto done;
    rc = inputs_report(in, &report, e);
    if (rc != ERR_OK) goto done;
    if (o->json) {
        text = cJSON_Print(report);
        if (text == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory printing the report");
            goto done;
        }
        puts(text);
    } else {
        print_report(report);
    }
done:
    cJSON_free(text);
    cJSON_Delete(report);
    inputs_free(in);
    return rc;
}

/* export-graph: write the travel network built for a scenario, its existing sites
 * and our nearest-site times as CSV, for independent cross-checks (networkx).
 * Usage: export-graph SCENARIO.json OUTDIR
 * Writes OUTDIR/edges.csv (from,to,weight in seconds), OUTDIR/sources.csv
 * (direction, n_nodes, one "site,NODE" line per site) and OUTDIR/result.csv
 * (node,time_s,site). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include <gdal.h>
#include <cpl_error.h>
#include <igraph.h>

#include "inputs.h"
#include "network.h"
#include "output.h"
#include "travel.h"

static int run(const char *scenario, const char *dir, err_t *e)
{
    inputs_t *in = NULL;
    network_t *net = NULL;
    travel_result_t *res = NULL;
    int64_t *sites = NULL;
    out_file_t of = {0};
    char *p = NULL;
    int rc;

    rc = inputs_load(scenario, 1, &in, e);
    if (rc == ERR_OK && in->existing == NULL)
        rc = err_set(e, ERR_INPUT, "scenario '%s' has no existing sites", scenario);
    if (rc == ERR_OK) rc = network_build(in->grid, in->roads, in->scen, &net, e);
    if (rc == ERR_OK) rc = out_mkdir(dir, e);
    if (rc != ERR_OK) goto done;
    sites = malloc(in->existing->n * sizeof *sites);
    if (sites == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory");
        goto done;
    }
    for (size_t i = 0; i < in->existing->n; i++)
        sites[i] = network_cell_node(net, (int)(in->existing->cell[i] % in->grid->nx),
                                     (int)(in->existing->cell[i] / in->grid->nx));
    rc = travel_nearest(net, sites, in->existing->n, &res, e);
    if (rc != ERR_OK) goto done;
    /* The virtual source's edges are disabled (infinite) after the pass. */
    p = out_join(dir, "edges.csv");
    if ((rc = out_file_open(&of, p, e)) != ERR_OK) goto done;
    fprintf(of.f, "from,to,weight\n");
    {
        const igraph_t *gr = network_graph(net);
        const igraph_vector_t *w = network_weights(net);
        for (igraph_integer_t k = 0; k < igraph_ecount(gr); k++)
            if (!isinf(VECTOR(*w)[k]))
                fprintf(of.f, "%ld,%ld,%.17g\n", (long)IGRAPH_FROM(gr, k), (long)IGRAPH_TO(gr, k),
                        VECTOR(*w)[k]);
    }
    if ((rc = out_file_commit(&of, e)) != ERR_OK) goto done;
    free(p);
    p = out_join(dir, "sources.csv");
    if ((rc = out_file_open(&of, p, e)) != ERR_OK) goto done;
    fprintf(of.f, "direction,%s\nn_nodes,%ld\n",
            network_direction(net) == SCEN_TO_SITE ? "to_site" : "from_site",
            (long)network_n_nodes(net));
    for (size_t i = 0; i < in->existing->n; i++) fprintf(of.f, "site,%ld\n", (long)sites[i]);
    if ((rc = out_file_commit(&of, e)) != ERR_OK) goto done;
    free(p);
    p = out_join(dir, "result.csv");
    if ((rc = out_file_open(&of, p, e)) != ERR_OK) goto done;
    fprintf(of.f, "node,time_s,site\n");
    for (int64_t v = 0; v < res->n_nodes; v++)
        fprintf(of.f, "%ld,%.17g,%d\n", (long)v, res->time_s[v], (int)res->site[v]);
    rc = out_file_commit(&of, e);
done:
    out_file_abort(&of);
    free(p);
    free(sites);
    travel_result_free(res);
    network_free(net);
    inputs_free(in);
    return rc;
}

int main(int argc, char **argv)
{
    err_t e = {0};
    if (argc != 3) {
        fprintf(stderr, "usage: export-graph SCENARIO.json OUTDIR\n");
        return EXIT_USAGE;
    }
    GDALAllRegister();
    CPLSetErrorHandler(CPLQuietErrorHandler);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    if (run(argv[1], argv[2], &e) != ERR_OK) {
        fprintf(stderr, "export-graph: error: %s\n", e.msg);
        return err_exit_status(e.code);
    }
    return EXIT_OK;
}

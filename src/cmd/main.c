/* sitereach: command-line planner for relief logistics and service coverage.
 * main sets the process-wide library switches once (GDAL drivers, igraph's
 * non-aborting error handler), picks the command and maps errors to exit codes:
 * 0 ok, 1 bad input, 2 usage, 3 internal or solver failure. */
#include <stdio.h>
#include <string.h>

#include <gdal.h>
#include <cpl_error.h>
#include <igraph.h>

#include "cli.h"
#include "err.h"
#include "render.h"

static const cli_command_t commands[] = {
    {"check", "validate a scenario and its inputs, print a report", cmd_check_usage, 0,
     cmd_check, NULL},
    {"reach", "travel times to the nearest site, catchments, people by time band",
     cmd_reach_usage, 1, cmd_reach, NULL},
    {"report", "the HTML plan report (maps, charts, tables) of an output folder",
     cmd_report_usage, 0, cmd_report, "OUTDIR"},
    {"supply", "stock per site and truck trips from the depots, for the existing sites",
     cmd_supply_usage, 1, cmd_supply, NULL},
    {"plan", "the whole job: check, reach, new sites, stock and shipments, report",
     cmd_plan_usage, 1, cmd_plan, NULL},
    {"site", "choose sites: covering, median or capacitated models, on a grid or tables",
     cmd_site_usage, 1, cmd_site, NULL},
    {"compare", "base and what-if variants side by side: who loses access",
     cmd_compare_usage, 1, cmd_compare, NULL},
    {"links", "rank road links by the harm of closing each one alone",
     cmd_links_usage, 1, cmd_links, NULL},
};
static const size_t n_commands = sizeof commands / sizeof commands[0];

static void print_usage(FILE *f)
{
    fprintf(f, "usage: sitereach COMMAND SCENARIO.json [options]\n\n"
               "Plans distribution points and service coverage from a population grid and\n"
               "a road network: travel times, catchments, site selection, stock and shipments.\n\n"
               "commands:\n");
    for (size_t i = 0; i < n_commands; i++)
        fprintf(f, "  %-9s %s\n", commands[i].name, commands[i].summary);
    fprintf(f, "\noptions: --help (per command), --version\n"
               "exit status: 0 ok, 1 bad input, 2 usage error, 3 internal or solver failure\n");
}

/* GDAL prints its own errors on stderr by default; we copy them into err_t
 * messages instead, so keep it quiet. */
static void CPL_STDCALL quiet_gdal(CPLErr cls, CPLErrorNum num, const char *msg)
{
    (void)cls;
    (void)num;
    (void)msg;
}

int main(int argc, char **argv)
{
    const cli_command_t *c = NULL;
    cli_options_t o;
    err_t e = {0};
    int help = 0, rc;

    if (argc < 2 || strcmp(argv[1], "--help") == 0 || strcmp(argv[1], "-h") == 0) {
        print_usage(argc < 2 ? stderr : stdout);
        return argc < 2 ? EXIT_USAGE : EXIT_OK;
    }
    if (strcmp(argv[1], "--version") == 0) {
        if (argc > 2) {
            fprintf(stderr, "sitereach: error: '--version' takes no argument, got '%s'\n", argv[2]);
            return EXIT_USAGE;
        }
        cli_print_version();
        return EXIT_OK;
    }
    for (size_t i = 0; i < n_commands; i++)
        if (strcmp(argv[1], commands[i].name) == 0) c = &commands[i];
    if (c == NULL) {
        fprintf(stderr, "sitereach: error: unknown command '%s'; try 'sitereach --help'\n",
                argv[1]);
        return EXIT_USAGE;
    }
    rc = cli_parse(c, argc - 2, argv + 2, &o, &help, &e);
    if (rc != ERR_OK) return cli_fail(c->name, &e);
    if (help) {
        fputs(c->usage, stdout);
        return EXIT_OK;
    }

    GDALAllRegister();
    CPLSetErrorHandler(quiet_gdal);
    igraph_set_error_handler(igraph_error_handler_ignore);
    igraph_set_warning_handler(igraph_warning_handler_ignore);

    rc = c->run(&o, &e);
    /* Font caches of the maps' text: released so leak checkers stay quiet. */
    render_shutdown();
    if (rc != ERR_OK) return cli_fail(c->name, &e);
    return EXIT_OK;
}

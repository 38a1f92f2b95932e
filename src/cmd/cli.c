/* cli: common option parsing and error printing for every command. */
#include "cli.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cairo.h>
#include <cJSON.h>
#include <gdal.h>
#include <glpk.h>
#include <igraph.h>
#include <proj.h>

int cli_parse(const cli_command_t *c, int argc, char **argv, cli_options_t *o, int *help,
              err_t *e)
{
    int options_end = 0;

    memset(o, 0, sizeof *o);
    *help = 0;
    for (int i = 0; i < argc; i++) {
        const char *a = argv[i];
        if (options_end || a[0] != '-' || a[1] == '\0') {
            if (o->scenario != NULL)
                return err_set(e, ERR_USAGE, "unexpected argument '%s'; try 'sitereach %s --help'",
                               a, c->name);
            o->scenario = a;
        } else if (strcmp(a, "--") == 0) {
            options_end = 1;   /* what follows is a file name, even if it starts with '-' */
        } else if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            *help = 1;
            return ERR_OK;
        } else if (strcmp(a, "--json") == 0) {
            o->json = 1;
        } else if (strcmp(a, "--quiet") == 0 || strcmp(a, "-q") == 0) {
            o->quiet = 1;
        } else if (strcmp(a, "-o") == 0 || strcmp(a, "--out") == 0) {
            if (i + 1 >= argc || argv[i + 1][0] == '\0')
                return err_set(e, ERR_USAGE, "option '%s' needs a folder name", a);
            if (o->outdir != NULL)
                return err_set(e, ERR_USAGE, "option '%s' given twice; name one output folder", a);
            if (!c->needs_outdir)
                return err_set(e, ERR_USAGE, "'sitereach %s' writes no output folder; drop '%s'",
                               c->name, a);
            o->outdir = argv[++i];
        } else if (strcmp(a, "--threads") == 0) {
            char *end = NULL;
            long n;
            if (!c->needs_outdir)
                return err_set(e, ERR_USAGE, "'sitereach %s' has no option '--threads'", c->name);
            if (i + 1 >= argc)
                return err_set(e, ERR_USAGE, "option '--threads' needs a number");
            n = strtol(argv[++i], &end, 10);
            if (*end != '\0' || n < 0 || n > 1024)
                return err_set(e, ERR_USAGE, "option '--threads' takes 0..1024, not '%s'",
                               argv[i]);
            o->threads = (int)n;
        } else {
            return err_set(e, ERR_USAGE, "unknown option '%s'; try 'sitereach %s --help'", a,
                           c->name);
        }
    }
    if (o->scenario == NULL && c->arg_name != NULL)
        return err_set(e, ERR_USAGE, "no %s given; usage: sitereach %s %s", c->arg_name, c->name,
                       c->arg_name);
    if (o->scenario == NULL)
        return err_set(e, ERR_USAGE, "no scenario file given; usage: sitereach %s SCENARIO.json%s",
                       c->name, c->needs_outdir ? " -o OUTDIR" : "");
    if (c->needs_outdir && o->outdir == NULL)
        return err_set(e, ERR_USAGE, "no output folder given; usage: sitereach %s SCENARIO.json -o OUTDIR",
                       c->name);
    return ERR_OK;
}

int cli_fail(const char *cmd, const err_t *e)
{
    fprintf(stderr, "sitereach %s: error: %s\n", cmd, e->msg[0] ? e->msg : err_code_name(e->code));
    return err_exit_status(e->code);
}

void cli_print_version(void)
{
    PJ_INFO pj = proj_info();
    printf("sitereach %s\n", SITEREACH_VERSION);
    printf("libraries: GDAL %s, PROJ %s, igraph %s, GLPK %s, cJSON %s, cairo %s\n",
           GDALVersionInfo("RELEASE_NAME"), pj.version, IGRAPH_VERSION, glp_version(),
           cJSON_Version(), cairo_version_string());
}

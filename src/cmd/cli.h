/* cli: what every command shares: options, usage text, turning an err_t into
 * one line on stderr and an exit status. Internal to src/cmd/. */
#ifndef CLI_H
#define CLI_H

#include "err.h"

typedef struct cli_options {
    const char *scenario;   /* first positional argument */
    const char *outdir;     /* -o/--out; NULL when not given */
    int json;               /* --json: summary as JSON on stdout */
    int quiet;              /* --quiet: no progress, no human summary */
    int threads;            /* --threads N; 0 = all cores */
} cli_options_t;

typedef struct cli_command {
    const char *name;
    const char *summary;    /* one line for 'sitereach --help' */
    const char *usage;      /* full help text for 'sitereach NAME --help' */
    int needs_outdir;       /* 1 when -o is required */
    int (*run)(const cli_options_t *o, err_t *e);
    const char *arg_name;   /* the positional argument in messages; NULL = "SCENARIO.json" */
} cli_command_t;

/* Parse the common options of a command into 'o'. Returns ERR_OK, or ERR_USAGE
 * with 'e' filled; sets *help when --help was asked. */
int cli_parse(const cli_command_t *c, int argc, char **argv, cli_options_t *o, int *help,
              err_t *e);

/* Print the version of sitereach and of every library it uses. */
void cli_print_version(void);

/* Print "sitereach NAME: error: MSG" on stderr; returns the exit status. */
int cli_fail(const char *cmd, const err_t *e);

/* The commands, one file each. */
int cmd_check(const cli_options_t *o, err_t *e);
extern const char cmd_check_usage[];
int cmd_reach(const cli_options_t *o, err_t *e);
extern const char cmd_reach_usage[];
int cmd_report(const cli_options_t *o, err_t *e);
extern const char cmd_report_usage[];
int cmd_plan(const cli_options_t *o, err_t *e);
extern const char cmd_plan_usage[];
int cmd_supply(const cli_options_t *o, err_t *e);
extern const char cmd_supply_usage[];
/* The plan script; full = 0 leaves out site selection and the report (supply). */
int cmd_plan_job(const cli_options_t *o, int full, err_t *e);
int cmd_site(const cli_options_t *o, err_t *e);
extern const char cmd_site_usage[];
int cmd_compare(const cli_options_t *o, err_t *e);
extern const char cmd_compare_usage[];
int cmd_links(const cli_options_t *o, err_t *e);
extern const char cmd_links_usage[];

#endif

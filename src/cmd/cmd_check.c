/* check: validate a scenario and every input it names, print a short report. */
#include <stdio.h>

#include "cli.h"
#include "scenario.h"

const char cmd_check_usage[] =
    "usage: sitereach check SCENARIO.json [--json] [--quiet]\n"
    "Validates the scenario and its inputs and prints a report.\n";

int cmd_check(const cli_options_t *o, err_t *e)
{
    (void)o;
    return err_set(e, ERR_INTERNAL, "check is not built yet");
}

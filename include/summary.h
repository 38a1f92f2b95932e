/* summary: the parts of summary.json every command shares: software version,
 * scenario, inputs with sizes and SHA-256 checksums, parameters, warnings and
 * per-stage timings. */
#ifndef SUMMARY_H
#define SUMMARY_H

#include <cJSON.h>

#include "err.h"
#include "inputs.h"

/* A new summary object for 'command' (caller frees with cJSON_Delete). */
int summary_new(const char *command, const inputs_t *in, cJSON **out, err_t *e);
/* Record how long a stage took, under "seconds". */
void summary_time(cJSON *summary, const char *stage, double seconds);
/* Add the caution every plan carries (once, however often it is called). */
void summary_caution(cJSON *summary);
/* The caution text, also printed by commands. */
extern const char summary_caution_text[];

#endif

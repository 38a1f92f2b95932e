/* scen_sections: readers of the scenario's optional top-level sections, one
 * file each (src/io/scen_<name>.c), called by scen_parse. Each sets *out to NULL
 * when its section is absent; each free function accepts NULL. Internal to src/io. */
#ifndef SCEN_SECTIONS_H
#define SCEN_SECTIONS_H

#include "jsonv.h"
#include "scenario.h"

int scen_siting_read(const jsonv_node_t *root, const scen_t *s, struct scen_siting **out,
                     err_t *e);
void scen_siting_free(struct scen_siting *x);
int scen_supply_read(const jsonv_node_t *root, const scen_t *s, struct scen_supply **out,
                     err_t *e);
void scen_supply_free(struct scen_supply *x);
int scen_variants_read(const jsonv_node_t *root, const scen_t *s, struct scen_variants **out,
                       err_t *e);
void scen_variants_free(struct scen_variants *x);

#endif

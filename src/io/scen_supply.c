/* scen_supply: reader of the scenario's "supply" section (see include/scen_supply.h).
 * Strict like the rest of the scenario: unknown keys are errors. */
#include "scen_supply.h"

#include <stdlib.h>

#include "scen_sections.h"

static const char *const KEYS[] = {NULL};

int scen_supply_read(const jsonv_node_t *root, const scen_t *s, struct scen_supply **out,
                     err_t *e)
{
    jsonv_node_t o;
    int rc;

    (void)s;
    *out = NULL;
    if ((rc = jsonv_object(root, "supply", 0, KEYS, &o, e)) != ERR_OK || o.json == NULL)
        return rc;
    *out = calloc(1, sizeof **out);
    if (*out == NULL) return err_set(e, ERR_NOMEM, "%s: out of memory", root->file);
    (*out)->present = 1;
    return ERR_OK;
}

void scen_supply_free(struct scen_supply *x)
{
    free(x);
}

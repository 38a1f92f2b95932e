/* scen_variants: the scenario's "variants" section (see docs/scenario.md). Read by
 * src/io/scen_variants.c; reached as scen_t.variants (NULL when absent). */
#ifndef SCEN_VARIANTS_H
#define SCEN_VARIANTS_H

struct scen_variants {
    int present;   /* 1: the section was given (its keys are added with its stage) */
};

#endif

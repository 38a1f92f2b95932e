/* scen_siting: the scenario's "siting" section (see docs/scenario.md). Read by
 * src/io/scen_siting.c; reached as scen_t.siting (NULL when absent). */
#ifndef SCEN_SITING_H
#define SCEN_SITING_H

struct scen_siting {
    int present;   /* 1: the section was given (its keys are added with its stage) */
};

#endif

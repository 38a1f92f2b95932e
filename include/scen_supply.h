/* scen_supply: the scenario's "supply" section (see docs/scenario.md). Read by
 * src/io/scen_supply.c; reached as scen_t.supply (NULL when absent). */
#ifndef SCEN_SUPPLY_H
#define SCEN_SUPPLY_H

struct scen_supply {
    int present;   /* 1: the section was given (its keys are added with its stage) */
};

#endif

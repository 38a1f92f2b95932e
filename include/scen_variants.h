/* scen_variants: the scenario's "variants" section (see docs/whatif.md): named
 * what-if cases, each a list of changes on top of the base scenario (roads closed
 * by id or attribute, a flood polygon layer, road speed factors by attribute,
 * sites closed or opened, site capacities). Read by src/io/scen_variants.c;
 * reached as scen_t.variants (NULL when absent). Ids are checked against the
 * loaded data later (src/whatif/variant.c), where the layers are known. */
#ifndef SCEN_VARIANTS_H
#define SCEN_VARIANTS_H

#include <stddef.h>

#include "scenario.h"

/* A road attribute test: the road's value of 'field' is one of values[]. */
typedef struct scen_road_match {
    char *field;          /* the class field (inputs.roads.class_field) or any other */
    char **values;
    size_t n_values;
} scen_road_match_t;

/* A speed factor for roads whose 'field' has 'value'. */
typedef struct scen_road_factor {
    char *field;
    char *value;
    double factor;        /* > 0, <= 10; road edge times are divided by it */
} scen_road_factor_t;

typedef struct scen_variant {
    char *name;                   /* unique among the variants */
    char **close_road_ids;        /* "close_roads.ids": road feature ids */
    size_t n_close_road_ids;
    scen_road_match_t *close_where; /* "close_roads.where": field -> [values] */
    size_t n_close_where;
    scen_road_factor_t *speed;    /* "road_speed_factors": field -> {value: factor} */
    size_t n_speed;
    scen_layer_t flood;           /* "flood": polygon layer; flood.path NULL when none */
    double flood_cell_factor;     /* "flood.cells": 0 = impassable (default), else the
                                     walking-speed factor in (0, 1] inside the flood */
    int flood_cut_roads;          /* "flood.cut_roads": default 1 */
    char **close_sites;           /* existing site ids closed */
    size_t n_close_sites;
    char **open_sites;            /* candidate site ids opened */
    size_t n_open_sites;
    char **capacity_ids;          /* "capacity": site id -> persons */
    double *capacity;
    size_t n_capacity;
} scen_variant_t;

struct scen_variants {
    int present;                  /* 1: the section was given */
    scen_variant_t *v;
    size_t n;                     /* 1..64 */
    char **road_fields;           /* attribute fields the variants test, other than the
                                     class field; roads_load keeps their values */
    size_t n_road_fields;
};

#endif

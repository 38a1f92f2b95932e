/* roads: the road network read from any OGR line layer (GeoJSON, GeoPackage,
 * Shapefile, OSM PBF/XML 'lines' with its 'highway' tag), reprojected to the
 * grid's CRS. Features become vertex-to-vertex segments between road nodes;
 * nodes of different features within the snapping tolerance merge into
 * junctions. Bridges and tunnels join other roads only at their end vertices.
 * Segment lengths are in metres (geodesic when the source data is lon/lat).
 * Roads outside the grid are clipped away (counted). Wraps GDAL/OGR. */
#ifndef ROADS_H
#define ROADS_H

#include <stddef.h>
#include <stdint.h>

#include "err.h"
#include "grid.h"
#include "scenario.h"

enum road_flags {
    ROAD_BRIDGE = 1,     /* joins the surface only at its ends */
    ROAD_TUNNEL = 2,     /* likewise */
    ROAD_ONEWAY = 4,     /* vehicles may go only from node a to node b */
    ROAD_LIMITED = 8     /* limited access: connectors only at junctions */
};

typedef struct road_seg {
    int32_t a, b;        /* road node indices */
    int32_t cls;         /* index into roads_t.classes */
    int32_t feature;     /* index into roads_t.feature_ids */
    double length_m;     /* > 0 */
    uint8_t flags;       /* ROAD_* */
} road_seg_t;

typedef struct road_class_count {
    char *name;          /* class value ("(none)" when the attribute is empty) */
    size_t n_features;   /* features of this class kept */
    double length_m;     /* their total length inside the grid */
    double walk_mps;     /* speeds from the scenario (or the unknown-class fallback) */
    double vehicle_mps;
    int known;           /* 1 when the class is in the scenario's speed table */
} road_class_count_t;

typedef struct roads {
    double *x, *y;       /* n_nodes node coordinates in the grid CRS */
    uint8_t *node_junction; /* n_nodes: 1 where >= 2 features meet or a line ends
                            (a piece's first or last vertex, cut points at the grid
                            edge included) */
    size_t n_nodes;
    road_seg_t *segs;
    size_t n_segs;
    char **feature_ids;  /* per kept feature: its id (id field, or OSM id, or FID) */
    size_t n_features;   /* features kept (at least one segment inside the grid) */
    road_class_count_t *classes;
    size_t n_classes;
    size_t n_junctions;  /* nodes holding vertices of >= 2 different features; line
                            ends that touch nothing and a loop closing on itself
                            are not counted */
    size_t n_features_read;   /* line features in the layer (OSM: those with the
                                 class tag, normally 'highway', set) */
    size_t n_features_clipped;/* features cut or dropped by the grid's extent */
    size_t n_features_skipped;/* features without usable geometry: empty, not a
                                 line (mixed layers), or not reprojectable */
    double total_length_m;
    /* Attributes kept for what-if variants (scen_t.variants->road_fields): the
     * field names, and per kept feature its value of each ("" when unset). */
    char **attr_fields;  /* n_attr owned names */
    size_t n_attr;
    char **attr;         /* n_features * n_attr owned values, row = feature */
} roads_t;

/* Read the road layer named in s->roads, reprojected onto g's CRS and clipped to
 * its extent. An empty layer is allowed (returns an empty roads_t with a warning
 * in 'w'); so is s->roads.path == NULL (walking only). Unknown classes add a
 * warning with the count and fallback speed. Snapping: a vertex joins the
 * nearest node within s->snap_tolerance_m (metres, measured in the grid CRS)
 * that already holds another feature's vertex, or a vertex of its own feature
 * at exactly the same spot (closed loops); two steps whose ends thereby merge
 * into one node are dropped. Errors: missing file (ERR_IO), layer not found,
 * layer not lines, a named field missing, no transformation to the grid CRS
 * (ERR_INPUT). Caller frees with roads_free. */
int roads_load(const scen_t *s, const grid_t *g, roads_t **out, warn_list_t *w, err_t *e);
/* Value of kept attribute 'field' on feature 'feature', or NULL when the field
 * was not kept. The class field is not an attribute: use classes[segs[i].cls]. */
const char *roads_attr(const roads_t *r, size_t feature, const char *field);

/* Mark in hit[0..n_segs) (1 = intersects) every road segment (the straight line
 * between its two nodes) that intersects a polygon of layer 'l' (any OGR polygon
 * layer, reprojected onto g's CRS; a layer without a CRS is taken to be in it).
 * *n_hit counts them and *n_polygons the polygons read. Uses GEOS through OGR.
 * Errors: missing file (ERR_IO), layer not found or not polygons, no transformation
 * to the grid's CRS (ERR_INPUT). */
int roads_segments_in_polygons(const roads_t *r, const grid_t *g, const scen_layer_t *l,
                               uint8_t *hit, size_t *n_hit, size_t *n_polygons, err_t *e);
void roads_free(roads_t *r);  /* NULL-safe */

/* Connected components of the road network (undirected, igraph). Sets *n_comp and,
 * if 'largest' is not NULL, the node count of the largest component; if
 * 'membership' is not NULL (n_nodes entries) the component of every node. */
int roads_components(const roads_t *r, size_t *n_comp, size_t *largest, int32_t *membership,
                     err_t *e);

#endif

/* roads: read an OGR line layer into road nodes and segments (see include/roads.h).
 * Two passes. The first reads every feature, reprojects its vertices onto the
 * grid CRS, clips each vertex-to-vertex piece to the grid's extent and keeps
 * the inside parts as "pieces" (polylines with a length in metres per step,
 * measured in the source CRS). The second turns piece vertices into nodes:
 * snappable vertices (all vertices of ordinary roads, only the end vertices of
 * bridges and tunnels) merge with the nearest node within the snapping
 * tolerance found through a hash grid; other vertices become private nodes.
 * Wraps GDAL/OGR (through ogr_util), PROJ geodesics and igraph (components). */
#include "roads.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include <igraph.h>

#include "ogr_util.h"
#include "scen_variants.h"

/* Attribute text longer than this is cut; class names and ids are short. */
#define ATTR_MAX 256

/* Vertices of the kept pieces, in the grid CRS. len[i] is the length in
 * metres from vertex i to vertex i+1 of the same piece (unused at a piece's end). */
typedef struct vbuf {
    double *x, *y, *len;
    size_t n, cap;
} vbuf_t;

typedef struct piece {
    size_t start, n;     /* vertices [start, start+n) in vbuf; n >= 2 */
    int32_t feat;        /* provisional feature index */
    int32_t cls;         /* provisional class index */
    uint8_t flags;       /* ROAD_* */
} piece_t;

/* Everything the first pass collects. */
typedef struct rd {
    vbuf_t v;
    piece_t *pc;
    size_t n_pc, cap_pc;
    char **fid;          /* provisional feature ids */
    int32_t *fcls;       /* provisional class per feature */
    size_t n_f, cap_f, cap_fc;
    char **cls;          /* class names met so far */
    size_t n_cls, cap_cls;
    char **fattr;        /* n_f * n_attr kept attribute values */
    size_t n_attr, cap_fattr;
} rd_t;

/* Grow *p (element size sz) so it holds at least need elements. */
static int grow(void **p, size_t *cap, size_t need, size_t sz)
{
    size_t nc;
    void *q;

    if (need <= *cap) return 0;
    nc = *cap ? *cap : 16;
    while (nc < need) nc *= 2;
    q = realloc(*p, nc * sz);
    if (q == NULL) return -1;
    *p = q;
    *cap = nc;
    return 0;
}

static int vbuf_push(vbuf_t *v, double x, double y)
{
    if (v->n == v->cap) {
        size_t nc = v->cap ? 2 * v->cap : 1024;
        double *nx = realloc(v->x, nc * sizeof *nx);
        if (nx == NULL) return -1;
        v->x = nx;
        double *ny = realloc(v->y, nc * sizeof *ny);
        if (ny == NULL) return -1;
        v->y = ny;
        double *nl = realloc(v->len, nc * sizeof *nl);
        if (nl == NULL) return -1;
        v->len = nl;
        v->cap = nc;
    }
    v->x[v->n] = x;
    v->y[v->n] = y;
    v->len[v->n] = 0.0;
    v->n++;
    return 0;
}

static void rd_destroy(rd_t *r)
{
    free(r->v.x);
    free(r->v.y);
    free(r->v.len);
    free(r->pc);
    for (size_t i = 0; i < r->n_f; i++) free(r->fid[i]);
    free(r->fid);
    free(r->fcls);
    for (size_t i = 0; i < r->n_cls; i++) free(r->cls[i]);
    free(r->cls);
    for (size_t i = 0; i < r->n_f * r->n_attr; i++) free(r->fattr[i]);
    free(r->fattr);
}

void roads_free(roads_t *r)
{
    if (r == NULL) return;
    free(r->x);
    free(r->y);
    free(r->node_junction);
    free(r->segs);
    for (size_t i = 0; i < r->n_features; i++) free(r->feature_ids[i]);
    free(r->feature_ids);
    for (size_t i = 0; i < r->n_classes; i++) free(r->classes[i].name);
    free(r->classes);
    for (size_t i = 0; i < r->n_attr; i++) free(r->attr_fields[i]);
    free(r->attr_fields);
    if (r->attr != NULL)
        for (size_t i = 0; i < r->n_features * r->n_attr; i++) free(r->attr[i]);
    free(r->attr);
    free(r);
}

/* Index of class 'name', adding it when new; -1 when out of memory. */
static int32_t class_index(rd_t *r, const char *name)
{
    for (size_t i = 0; i < r->n_cls; i++)
        if (strcmp(r->cls[i], name) == 0) return (int32_t)i;
    if (grow((void **)&r->cls, &r->cap_cls, r->n_cls + 1, sizeof *r->cls)) return -1;
    r->cls[r->n_cls] = strdup(name);
    if (r->cls[r->n_cls] == NULL) return -1;
    return (int32_t)r->n_cls++;
}

/* Bridge and tunnel values: anything but empty/no/false/0 is true, so OSM's
 * "viaduct", "boardwalk", "building_passage" and the like count. */
static int attr_true_any(const char *v)
{
    return v[0] != '\0' && strcasecmp(v, "no") != 0 && strcasecmp(v, "false") != 0 &&
           strcmp(v, "0") != 0;
}

/* Strict yes/true/1 values (one-way forward, limited access). */
static int attr_yes(const char *v)
{
    return strcasecmp(v, "yes") == 0 || strcasecmp(v, "true") == 0 || strcmp(v, "1") == 0;
}

/* Liang-Barsky clip of the grid-CRS segment p0-p1 to ext = {xmin, xmax, ymin,
 * ymax}. Returns 1 with the inside parameter range t0 < t1, 0 when the segment
 * misses the extent or only touches it at a point. */
static int clip_seg(double x0, double y0, double x1, double y1, const double ext[4],
                    double *t0, double *t1)
{
    double dx = x1 - x0, dy = y1 - y0;
    double p[4] = {-dx, dx, -dy, dy};
    double q[4] = {x0 - ext[0], ext[1] - x0, y0 - ext[2], ext[3] - y0};
    double a = 0.0, b = 1.0;

    for (int k = 0; k < 4; k++) {
        if (p[k] == 0.0) {
            if (q[k] < 0.0) return 0;
        } else {
            double t = q[k] / p[k];
            if (p[k] < 0.0) {
                if (t > b) return 0;
                if (t > a) a = t;
            } else {
                if (t < a) return 0;
                if (t < b) b = t;
            }
        }
    }
    if (!(a < b)) return 0;
    *t0 = a;
    *t1 = b;
    return 1;
}

/* Per-part scratch arrays: source and grid coordinates. */
typedef struct part_buf {
    double *sx, *sy, *gx, *gy;
    size_t cap;
} part_buf_t;

static int part_reserve(part_buf_t *b, size_t n)
{
    if (n <= b->cap) return 0;
    size_t nc = b->cap ? b->cap : 64;
    while (nc < n) nc *= 2;
    double *p;
    if ((p = realloc(b->sx, nc * sizeof *p)) == NULL) return -1;
    b->sx = p;
    if ((p = realloc(b->sy, nc * sizeof *p)) == NULL) return -1;
    b->sy = p;
    if ((p = realloc(b->gx, nc * sizeof *p)) == NULL) return -1;
    b->gx = p;
    if ((p = realloc(b->gy, nc * sizeof *p)) == NULL) return -1;
    b->gy = p;
    b->cap = nc;
    return 0;
}

static void part_free(part_buf_t *b)
{
    free(b->sx);
    free(b->sy);
    free(b->gx);
    free(b->gy);
}

/* Close the piece being built (if it has >= 2 vertices keep it, else drop its
 * vertex). Returns -1 when out of memory. */
static int piece_close(rd_t *r, piece_t *cur, int *open)
{
    if (!*open) return 0;
    *open = 0;
    cur->n = r->v.n - cur->start;
    if (cur->n < 2) {
        r->v.n = cur->start;
        return 0;
    }
    if (grow((void **)&r->pc, &r->cap_pc, r->n_pc + 1, sizeof *r->pc)) return -1;
    r->pc[r->n_pc++] = *cur;
    return 0;
}

/* Clip one line part (n vertices, already deduplicated and oriented) into
 * pieces of feature 'feat'. Sets *clipped when anything was cut away.
 * Returns -1 when out of memory. */
static int clip_part(rd_t *r, const ogr_util_crs_t *crs, const part_buf_t *b, size_t n,
                     const double ext[4], int32_t feat, int32_t cls, uint8_t flags,
                     int *clipped)
{
    piece_t cur = {0, 0, feat, cls, flags};
    int open = 0;

    for (size_t i = 0; i + 1 < n; i++) {
        double t0, t1, len;
        if (!clip_seg(b->gx[i], b->gy[i], b->gx[i + 1], b->gy[i + 1], ext, &t0, &t1)) {
            *clipped = 1;
            if (piece_close(r, &cur, &open)) return -1;
            continue;
        }
        if (t0 > 0.0 || t1 < 1.0) *clipped = 1;
        if (open && t0 > 0.0 && piece_close(r, &cur, &open)) return -1;
        if (!open) {
            double x = t0 > 0.0 ? b->gx[i] + t0 * (b->gx[i + 1] - b->gx[i]) : b->gx[i];
            double y = t0 > 0.0 ? b->gy[i] + t0 * (b->gy[i + 1] - b->gy[i]) : b->gy[i];
            cur.start = r->v.n;
            open = 1;
            if (vbuf_push(&r->v, x, y)) return -1;
        }
        /* Length measured in the source CRS (geodesic or planar); a cut piece
         * keeps the fraction of it inside the grid. The parameter t is linear
         * in the grid CRS, which over one vertex-to-vertex step differs from
         * the source parametrisation only by the projection's curvature. */
        len = ogr_util_crs_src_length(crs, b->sx[i], b->sy[i], b->sx[i + 1], b->sy[i + 1]);
        r->v.len[r->v.n - 1] = len * (t1 - t0);
        {
            double x = t1 < 1.0 ? b->gx[i] + t1 * (b->gx[i + 1] - b->gx[i]) : b->gx[i + 1];
            double y = t1 < 1.0 ? b->gy[i] + t1 * (b->gy[i + 1] - b->gy[i]) : b->gy[i + 1];
            if (vbuf_push(&r->v, x, y)) return -1;
        }
        if (t1 < 1.0 && piece_close(r, &cur, &open)) return -1;
    }
    return piece_close(r, &cur, &open);
}

/* Metres per degree of latitude and of longitude at latitude phi (degrees) on
 * an ellipsoid (a, f): the meridian and prime-vertical radii of curvature. */
static void m_per_deg(double a, double f, double phi, double *mlat, double *mlon)
{
    double e2 = f * (2.0 - f), s = sin(phi * M_PI / 180.0);
    double w = sqrt(1.0 - e2 * s * s);
    *mlat = M_PI / 180.0 * a * (1.0 - e2) / (w * w * w);
    *mlon = M_PI / 180.0 * a * cos(phi * M_PI / 180.0) / w;
}

/* Snapping state: a hash grid over node positions. Nodes in the same or
 * neighbouring hash cells are candidates; cells are at least as wide as the
 * tolerance so 3x3 cells cover every node within it. */
typedef struct snap {
    int32_t *head;       /* hash slot -> last node in the slot, -1 = empty */
    int32_t *next;       /* node -> previous node in the same slot */
    size_t mask;
    double x0, y0;       /* origin of the hash cells (grid extent corner) */
    double csx, csy;     /* hash cell size in grid CRS units */
    double tol2;         /* tolerance squared, metres^2 */
    int geographic;
    double deg_per_unit, m_per_unit, a, f;
} snap_t;

static size_t snap_slot(const snap_t *s, int64_t ix, int64_t iy)
{
    uint64_t h = (uint64_t)ix * 0x9E3779B97F4A7C15ULL ^ (uint64_t)iy * 0xC2B2AE3D27D4EB4FULL;
    h ^= h >> 29;
    return (size_t)(h & s->mask);
}

/* Squared distance in metres between two grid-CRS points. Geographic grids
 * use local metres per degree at the mean latitude (the points are at most a
 * few tolerances apart, so the flat approximation is far below a millimetre off). */
static double snap_d2(const snap_t *s, double x1, double y1, double x2, double y2)
{
    if (s->geographic) {
        double mlat, mlon, k = s->deg_per_unit;
        m_per_deg(s->a, s->f, 0.5 * (y1 + y2) * k, &mlat, &mlon);
        double dx = (x2 - x1) * k * mlon, dy = (y2 - y1) * k * mlat;
        return dx * dx + dy * dy;
    }
    double dx = (x2 - x1) * s->m_per_unit, dy = (y2 - y1) * s->m_per_unit;
    return dx * dx + dy * dy;
}

int roads_load(const scen_t *s, const grid_t *g, roads_t **out, warn_list_t *w, err_t *e)
{
    GDALDatasetH ds = NULL;
    OGRLayerH l = NULL;
    OGRFeatureH f = NULL;
    ogr_util_crs_t crs;
    int have_crs = 0, osm, rc = ERR_OK;
    rd_t r;
    part_buf_t pb = {0};
    roads_t *o = NULL;
    snap_t sn = {0};
    int32_t *vnode = NULL, *nfeat = NULL, *fmap = NULL, *cmap = NULL;
    uint8_t *nmulti = NULL;
    size_t n_nonline = 0, n_badxy = 0;
    const char *path = s->roads.path, *lname;
    const char *cls_field = s->road_class_field ? s->road_class_field : "highway";
    ogr_util_attr_t a_cls, a_bridge, a_tunnel, a_oneway, a_access, a_id, *a_var = NULL;
    const struct scen_variants *sv = s->variants;
    size_t n_var = sv != NULL ? sv->n_road_fields : 0;
    int has_id_field = 0;
    double ext[4];

    memset(&r, 0, sizeof r);
    *out = NULL;
    o = calloc(1, sizeof *o);
    if (o == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading roads");
        goto done;
    }
    if (path == NULL) {
        /* No road layer in the scenario: walking only, as for an empty layer. */
        warn_add(w, "no road layer given; travel is walking only");
        *out = o;
        o = NULL;
        goto done;
    }
    if ((rc = ogr_util_open(path, "road", &ds, e)) != ERR_OK) goto done;
    osm = ogr_util_is_osm(ds);
    if ((rc = ogr_util_layer(ds, path, s->roads.layer, "lines", &l, e)) != ERR_OK) goto done;
    lname = OGR_L_GetName(l);
    {
        OGRwkbGeometryType t = wkbFlatten(OGR_L_GetGeomType(l));
        if (t == wkbNone) {
            rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has no geometries; roads must be lines",
                         path, lname);
            goto done;
        }
        if (t != wkbUnknown && t != wkbLineString && t != wkbMultiLineString &&
            t != wkbCircularString && t != wkbCompoundCurve && t != wkbMultiCurve &&
            t != wkbGeometryCollection) {
            rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has %s geometries; roads must be lines",
                         path, lname, OGRGeometryTypeToName(t));
            goto done;
        }
    }
    if ((rc = ogr_util_crs_init(&crs, l, path, g->wkt, e)) != ERR_OK) goto done;
    have_crs = 1;
    if (!crs.layer_has_crs)
        warn_add(w, "road layer '%s' in '%s' has no CRS; taken to be the population grid's",
                 lname, path);

    /* Attributes. A named field that is missing is an error; the optional tags
     * (bridge, tunnel, one-way) are simply absent. An empty layer (which some
     * formats store without fields) is allowed: walking only, with a warning. */
    if (osm || OGR_L_GetFeatureCount(l, TRUE) != 0) {
        char fl[300];
        const char *need[2] = {cls_field, s->road_access_field};
        const char *role[2] = {"road class field", "road access field"};
        for (int k = 0; k < 2; k++) {
            ogr_util_attr_t tmp;
            if (need[k] == NULL || ogr_util_attr_init(&tmp, l, need[k])) continue;
            ogr_util_field_list(l, fl, sizeof fl);
            rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has no %s '%s'; fields present: %s",
                         path, lname, role[k], need[k], fl);
            goto done;
        }
        for (size_t k = 0; k < n_var; k++) {
            ogr_util_attr_t tmp;
            if (ogr_util_attr_init(&tmp, l, sv->road_fields[k])) continue;
            ogr_util_field_list(l, fl, sizeof fl);
            rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has no field '%s', which a variant "
                         "tests; fields present: %s", path, lname, sv->road_fields[k], fl);
            goto done;
        }
        if (s->roads.id_field != NULL) {
            OGRFeatureDefnH fd = OGR_L_GetLayerDefn(l);
            if (OGR_FD_GetFieldIndex(fd, s->roads.id_field) < 0) {
                ogr_util_field_list(l, fl, sizeof fl);
                rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has no road id field '%s'; "
                             "fields present: %s", path, lname, s->roads.id_field, fl);
                goto done;
            }
        }
    }
    ogr_util_attr_init(&a_cls, l, cls_field);
    ogr_util_attr_init(&a_bridge, l, s->road_bridge_field ? s->road_bridge_field : "bridge");
    ogr_util_attr_init(&a_tunnel, l, s->road_tunnel_field ? s->road_tunnel_field : "tunnel");
    ogr_util_attr_init(&a_oneway, l, s->road_oneway_field ? s->road_oneway_field : "oneway");
    ogr_util_attr_init(&a_access, l, s->road_access_field);
    if (n_var > 0) {
        a_var = calloc(n_var, sizeof *a_var);
        o->attr_fields = calloc(n_var, sizeof *o->attr_fields);
        if (a_var == NULL || o->attr_fields == NULL) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading roads");
            goto done;
        }
        for (size_t k = 0; k < n_var; k++) {
            ogr_util_attr_init(&a_var[k], l, sv->road_fields[k]);
            if ((o->attr_fields[k] = strdup(sv->road_fields[k])) == NULL) {
                rc = err_set(e, ERR_NOMEM, "out of memory reading roads");
                goto done;
            }
            o->n_attr = k + 1;
        }
    }
    r.n_attr = n_var;
    if (s->roads.id_field != NULL) {
        has_id_field = ogr_util_attr_init(&a_id, l, s->roads.id_field);
        a_id.tags = -1;
    } else {
        has_id_field = OGR_FD_GetFieldIndex(OGR_L_GetLayerDefn(l), "osm_id") >= 0;
        ogr_util_attr_init(&a_id, l, has_id_field ? "osm_id" : NULL);
    }

    /* Grid extent (handles south-up geotransforms too). */
    {
        double xa = g->gt[0], xb = g->gt[0] + g->nx * g->gt[1];
        double ya = g->gt[3], yb = g->gt[3] + g->ny * g->gt[5];
        ext[0] = fmin(xa, xb);
        ext[1] = fmax(xa, xb);
        ext[2] = fmin(ya, yb);
        ext[3] = fmax(ya, yb);
    }

    /* ---- Pass 1: read, reproject, clip. ---- */
    OGR_L_ResetReading(l);
    while ((f = OGR_L_GetNextFeature(l)) != NULL) {
        char cv[ATTR_MAX], bv[ATTR_MAX], tv[ATTR_MAX], ov[ATTR_MAX], av[ATTR_MAX];
        OGRGeometryH geom = OGR_F_GetGeometryRef(f), lin = NULL;
        OGRwkbGeometryType t;
        uint8_t flags = 0;
        int reverse = 0, clipped = 0, bad = 0;
        int32_t cls, feat = (int32_t)r.n_f;
        size_t pc_before = r.n_pc, v_before = r.v.n;

        ogr_util_attr_get(&a_cls, f, cv, sizeof cv);
        /* OSM 'lines' hold rivers, railways, power lines...: only highways are roads. */
        if (osm && cv[0] == '\0') {
            OGR_F_Destroy(f);
            f = NULL;
            continue;
        }
        if (geom == NULL || OGR_G_IsEmpty(geom)) {
            o->n_features_read++;
            o->n_features_skipped++;
            OGR_F_Destroy(f);
            f = NULL;
            continue;
        }
        t = wkbFlatten(OGR_G_GetGeometryType(geom));
        if (t == wkbCircularString || t == wkbCompoundCurve || t == wkbMultiCurve) {
            lin = OGR_G_GetLinearGeometry(geom, 0.0, NULL);
            if (lin == NULL) {
                rc = err_set(e, ERR_NOMEM, "out of memory linearising roads in '%s'", path);
                goto done;
            }
            geom = lin;
            t = wkbFlatten(OGR_G_GetGeometryType(geom));
        }
        if (t != wkbLineString && t != wkbMultiLineString) {
            /* Mixed layers (GeoJSON): other geometry types are skipped, counted. */
            n_nonline++;
            o->n_features_skipped++;
            if (lin != NULL) OGR_G_DestroyGeometry(lin);
            OGR_F_Destroy(f);
            f = NULL;
            continue;
        }
        o->n_features_read++;
        if (cv[0] == '\0') snprintf(cv, sizeof cv, "(none)");
        ogr_util_attr_get(&a_bridge, f, bv, sizeof bv);
        ogr_util_attr_get(&a_tunnel, f, tv, sizeof tv);
        ogr_util_attr_get(&a_oneway, f, ov, sizeof ov);
        ogr_util_attr_get(&a_access, f, av, sizeof av);
        if (attr_true_any(bv)) flags |= ROAD_BRIDGE;
        if (attr_true_any(tv)) flags |= ROAD_TUNNEL;
        if (attr_yes(ov)) flags |= ROAD_ONEWAY;
        if (strcmp(ov, "-1") == 0 || strcasecmp(ov, "reverse") == 0) {
            flags |= ROAD_ONEWAY;
            reverse = 1;   /* stored reversed so a->b is the allowed direction */
        }
        if (s->road_access_field != NULL && attr_yes(av)) flags |= ROAD_LIMITED;
        if ((cls = class_index(&r, cv)) < 0) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'", path);
            goto done;
        }

        {
            int np = t == wkbLineString ? 1 : OGR_G_GetGeometryCount(geom);
            for (int p = 0; p < np && !bad; p++) {
                OGRGeometryH part = t == wkbLineString ? geom : OGR_G_GetGeometryRef(geom, p);
                int n = OGR_G_GetPointCount(part);
                size_t m = 0;
                if (n < 2) continue;
                if (part_reserve(&pb, (size_t)n)) {
                    rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'", path);
                    goto done;
                }
                OGR_G_GetPoints(part, pb.sx, sizeof(double), pb.sy, sizeof(double), NULL, 0);
                /* Drop repeated vertices: they would make zero-length segments. */
                for (int i = 0; i < n; i++) {
                    if (m > 0 && pb.sx[i] == pb.sx[m - 1] && pb.sy[i] == pb.sy[m - 1]) continue;
                    pb.sx[m] = pb.sx[i];
                    pb.sy[m] = pb.sy[i];
                    m++;
                }
                if (m < 2) continue;
                if (reverse) {
                    for (size_t i = 0, j = m - 1; i < j; i++, j--) {
                        double tx = pb.sx[i], ty = pb.sy[i];
                        pb.sx[i] = pb.sx[j];
                        pb.sy[i] = pb.sy[j];
                        pb.sx[j] = tx;
                        pb.sy[j] = ty;
                    }
                }
                memcpy(pb.gx, pb.sx, m * sizeof *pb.gx);
                memcpy(pb.gy, pb.sy, m * sizeof *pb.gy);
                if (ogr_util_crs_apply(&crs, m, pb.gx, pb.gy) > 0) {
                    bad = 1;
                    break;
                }
                if (clip_part(&r, &crs, &pb, m, ext, feat, cls, flags, &clipped)) {
                    rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'", path);
                    goto done;
                }
            }
        }
        if (bad) {
            /* Undo this feature's pieces: a half-transformed road is worse than none. */
            r.n_pc = pc_before;
            r.v.n = v_before;
            n_badxy++;
            o->n_features_skipped++;
        } else {
            if (clipped) o->n_features_clipped++;
            if (r.n_pc > pc_before) {
                char idv[ATTR_MAX];
                if (grow((void **)&r.fid, &r.cap_f, r.n_f + 1, sizeof *r.fid) ||
                    grow((void **)&r.fcls, &r.cap_fc, r.n_f + 1, sizeof *r.fcls)) {
                    rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'", path);
                    goto done;
                }
                idv[0] = '\0';
                if (has_id_field) ogr_util_attr_get(&a_id, f, idv, sizeof idv);
                /* An empty id falls back to the FID so messages can still point at it. */
                if (idv[0] == '\0') snprintf(idv, sizeof idv, "%lld", (long long)OGR_F_GetFID(f));
                r.fid[r.n_f] = strdup(idv);
                if (r.fid[r.n_f] == NULL) {
                    rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'", path);
                    goto done;
                }
                r.fcls[r.n_f] = cls;
                if (n_var > 0) {
                    if (grow((void **)&r.fattr, &r.cap_fattr, (r.n_f + 1) * n_var,
                             sizeof *r.fattr)) {
                        free(r.fid[r.n_f]);
                        rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'", path);
                        goto done;
                    }
                    for (size_t k = 0; k < n_var; k++) r.fattr[r.n_f * n_var + k] = NULL;
                    r.n_f++;
                    for (size_t k = 0; k < n_var; k++) {
                        char av2[ATTR_MAX];
                        ogr_util_attr_get(&a_var[k], f, av2, sizeof av2);
                        if ((r.fattr[(r.n_f - 1) * n_var + k] = strdup(av2)) == NULL) {
                            rc = err_set(e, ERR_NOMEM, "out of memory reading roads in '%s'",
                                         path);
                            goto done;
                        }
                    }
                } else {
                    r.n_f++;
                }
            }
        }
        if (lin != NULL) OGR_G_DestroyGeometry(lin);
        OGR_F_Destroy(f);
        f = NULL;
    }
    if (n_nonline > 0)
        warn_add(w, "%zu features of road layer '%s' in '%s' are not lines; skipped", n_nonline,
                 lname, path);
    if (n_badxy > 0)
        warn_add(w, "%zu road features in '%s' could not be reprojected onto the population "
                 "grid's CRS; skipped", n_badxy, path);
    if (o->n_features_clipped > 0)
        warn_add(w, "%zu road features cross or lie outside the population grid; clipped",
                 o->n_features_clipped);

    /* ---- Pass 2: vertices to nodes. ---- */
    {
        size_t nv = r.v.n, tsize = 16;
        while (tsize < 2 * nv) tsize *= 2;
        vnode = malloc((nv ? nv : 1) * sizeof *vnode);
        nfeat = malloc((nv ? nv : 1) * sizeof *nfeat);
        nmulti = calloc(nv ? nv : 1, 1);
        sn.next = malloc((nv ? nv : 1) * sizeof *sn.next);
        sn.head = malloc(tsize * sizeof *sn.head);
        o->x = malloc((nv ? nv : 1) * sizeof *o->x);
        o->y = malloc((nv ? nv : 1) * sizeof *o->y);
        o->node_junction = calloc(nv ? nv : 1, 1);
        o->segs = malloc((nv ? nv : 1) * sizeof *o->segs);
        if (!vnode || !nfeat || !nmulti || !sn.next || !sn.head || !o->x || !o->y ||
            !o->node_junction || !o->segs) {
            rc = err_set(e, ERR_NOMEM, "out of memory building road nodes for '%s'", path);
            goto done;
        }
        for (size_t i = 0; i < tsize; i++) sn.head[i] = -1;
        sn.mask = tsize - 1;
        sn.x0 = ext[0];
        sn.y0 = ext[2];
        sn.tol2 = s->snap_tolerance_m * s->snap_tolerance_m;
        sn.geographic = crs.dst_geographic;
        sn.deg_per_unit = crs.dst_deg_per_unit;
        sn.m_per_unit = crs.dst_m_per_unit;
        sn.a = crs.dst_a;
        sn.f = crs.dst_f;
        {
            /* Hash cells no narrower than the tolerance (and at least 1 m, so
             * a zero tolerance, which merges identical points only, still
             * spreads the nodes over many cells). */
            double cell_m = s->snap_tolerance_m > 1.0 ? s->snap_tolerance_m : 1.0;
            if (sn.geographic) {
                double mlat, mlon, mlat0, mlon0;
                double latmax = fmax(fabs(ext[2]), fabs(ext[3])) * sn.deg_per_unit;
                if (latmax > 89.0) latmax = 89.0;
                m_per_deg(sn.a, sn.f, latmax, &mlat, &mlon);
                m_per_deg(sn.a, sn.f, 0.0, &mlat0, &mlon0);
                sn.csx = cell_m / mlon / sn.deg_per_unit;
                sn.csy = cell_m / mlat0 / sn.deg_per_unit;
            } else {
                sn.csx = sn.csy = cell_m / sn.m_per_unit;
            }
        }
    }
    for (size_t p = 0; p < r.n_pc; p++) {
        const piece_t *pc = &r.pc[p];
        int priv = (pc->flags & (ROAD_BRIDGE | ROAD_TUNNEL)) != 0;
        for (size_t j = 0; j < pc->n; j++) {
            size_t vi = pc->start + j;
            double x = r.v.x[vi], y = r.v.y[vi];
            int32_t best = -1;
            int is_end = j == 0 || j + 1 == pc->n;
            int64_t ix = (int64_t)floor((x - sn.x0) / sn.csx);
            int64_t iy = (int64_t)floor((y - sn.y0) / sn.csy);
            if (!priv || is_end) {
                double bd = INFINITY;
                for (int64_t dy = -1; dy <= 1; dy++)
                    for (int64_t dx = -1; dx <= 1; dx++) {
                        for (int32_t nd = sn.head[snap_slot(&sn, ix + dx, iy + dy)]; nd >= 0;
                             nd = sn.next[nd]) {
                            int same = o->x[nd] == x && o->y[nd] == y;
                            double d2 = snap_d2(&sn, x, y, o->x[nd], o->y[nd]);
                            /* Vertices of one feature merge only where they coincide
                             * (a closed loop); merging near ones would eat its own
                             * short steps. A node shared with another feature
                             * already is a junction and takes anyone near. */
                            if (d2 > sn.tol2 && !same) continue;
                            if (nfeat[nd] == pc->feat && !nmulti[nd] && !same) continue;
                            if (d2 < bd) {
                                bd = d2;
                                best = nd;
                            }
                        }
                    }
            }
            if (best < 0) {
                best = (int32_t)o->n_nodes++;
                o->x[best] = x;
                o->y[best] = y;
                nfeat[best] = pc->feat;
                if (!priv || is_end) {
                    size_t h = snap_slot(&sn, ix, iy);
                    sn.next[best] = sn.head[h];
                    sn.head[h] = best;
                }
            } else if (nfeat[best] != pc->feat) {
                nmulti[best] = 1;
            }
            if (is_end) o->node_junction[best] = 1;
            vnode[vi] = best;
        }
    }
    /* Segments; a step whose two ends snapped into one node is dropped. */
    fmap = malloc((r.n_f ? r.n_f : 1) * sizeof *fmap);
    cmap = malloc((r.n_cls ? r.n_cls : 1) * sizeof *cmap);
    if (fmap == NULL || cmap == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory building road segments for '%s'", path);
        goto done;
    }
    for (size_t i = 0; i < r.n_f; i++) fmap[i] = -1;
    for (size_t i = 0; i < r.n_cls; i++) cmap[i] = -1;
    for (size_t p = 0; p < r.n_pc; p++) {
        const piece_t *pc = &r.pc[p];
        for (size_t j = 0; j + 1 < pc->n; j++) {
            size_t vi = pc->start + j;
            road_seg_t *sg;
            if (vnode[vi] == vnode[vi + 1] || !(r.v.len[vi] > 0.0)) continue;
            sg = &o->segs[o->n_segs++];
            sg->a = vnode[vi];
            sg->b = vnode[vi + 1];
            sg->cls = pc->cls;
            sg->feature = pc->feat;
            sg->length_m = r.v.len[vi];
            sg->flags = pc->flags;
            fmap[pc->feat] = 0;
        }
    }
    /* Compact features and classes to those with at least one segment. */
    o->feature_ids = malloc((r.n_f ? r.n_f : 1) * sizeof *o->feature_ids);
    o->classes = calloc(r.n_cls ? r.n_cls : 1, sizeof *o->classes);
    if (n_var > 0) o->attr = calloc(r.n_f * n_var + 1, sizeof *o->attr);
    if (o->feature_ids == NULL || o->classes == NULL || (n_var > 0 && o->attr == NULL)) {
        rc = err_set(e, ERR_NOMEM, "out of memory building road segments for '%s'", path);
        goto done;
    }
    for (size_t i = 0; i < r.n_f; i++) {
        if (fmap[i] < 0) continue;
        int32_t c = r.fcls[i];
        fmap[i] = (int32_t)o->n_features;
        for (size_t k = 0; k < n_var; k++) {
            o->attr[o->n_features * n_var + k] = r.fattr[i * n_var + k];
            r.fattr[i * n_var + k] = NULL;
        }
        o->feature_ids[o->n_features++] = r.fid[i];
        r.fid[i] = NULL;
        if (cmap[c] < 0) {
            road_class_count_t *cc = &o->classes[o->n_classes];
            cmap[c] = (int32_t)o->n_classes++;
            cc->name = r.cls[c];
            r.cls[c] = NULL;
            cc->known = scen_road_speed(s, cc->name, &cc->walk_mps, &cc->vehicle_mps);
        }
        o->classes[cmap[c]].n_features++;
    }
    for (size_t i = 0; i < o->n_segs; i++) {
        road_seg_t *sg = &o->segs[i];
        sg->feature = fmap[sg->feature];
        sg->cls = cmap[sg->cls];
        o->classes[sg->cls].length_m += sg->length_m;
        o->total_length_m += sg->length_m;
    }
    for (size_t i = 0; i < o->n_nodes; i++) {
        if (!nmulti[i]) continue;
        o->n_junctions++;
        o->node_junction[i] = 1;
    }
    for (size_t i = 0; i < o->n_classes; i++) {
        const road_class_count_t *cc = &o->classes[i];
        if (!cc->known)
            warn_add(w, "road class '%s' (%zu features) not in travel.road_speeds; using %g km/h "
                     "walking, %g km/h by vehicle", cc->name, cc->n_features,
                     cc->walk_mps * 3.6, cc->vehicle_mps * 3.6);
    }
    if (o->n_segs == 0) warn_add(w, "road layer '%s' is empty; travel is walking only", lname);
    /* Give back the room reserved for one node and one segment per vertex
     * (snapping usually leaves far fewer); a failed shrink keeps the old block. */
    if (o->n_nodes > 0) {
        void *q;
        if ((q = realloc(o->x, o->n_nodes * sizeof *o->x)) != NULL) o->x = q;
        if ((q = realloc(o->y, o->n_nodes * sizeof *o->y)) != NULL) o->y = q;
        if ((q = realloc(o->node_junction, o->n_nodes)) != NULL) o->node_junction = q;
    }
    if (o->n_segs > 0) {
        void *q = realloc(o->segs, o->n_segs * sizeof *o->segs);
        if (q != NULL) o->segs = q;
    }

    *out = o;
    o = NULL;
done:
    if (f != NULL) OGR_F_Destroy(f);
    if (have_crs) ogr_util_crs_destroy(&crs);
    if (ds != NULL) GDALClose(ds);
    rd_destroy(&r);
    part_free(&pb);
    free(vnode);
    free(nfeat);
    free(nmulti);
    free(fmap);
    free(cmap);
    free(sn.next);
    free(sn.head);
    free(a_var);
    roads_free(o);
    return rc;
}

const char *roads_attr(const roads_t *r, size_t feature, const char *field)
{
    if (r == NULL || feature >= r->n_features) return NULL;
    for (size_t k = 0; k < r->n_attr; k++)
        if (strcmp(r->attr_fields[k], field) == 0) return r->attr[feature * r->n_attr + k];
    return NULL;
}

int roads_segments_in_polygons(const roads_t *r, const grid_t *g, const scen_layer_t *lay,
                               uint8_t *hit, size_t *n_hit, size_t *n_polygons, err_t *e)
{
    GDALDatasetH ds = NULL;
    OGRLayerH l = NULL;
    OGRFeatureH f = NULL;
    OGRGeometryH line = NULL;
    OGRSpatialReferenceH dst = NULL;
    OGRCoordinateTransformationH ct = NULL;
    OGREnvelope env;
    int rc = ERR_OK;

    *n_hit = 0;
    *n_polygons = 0;
    memset(hit, 0, r->n_segs);
    if ((rc = ogr_util_open(lay->path, "flood", &ds, e)) != ERR_OK) goto done;
    if ((rc = ogr_util_layer(ds, lay->path, lay->layer, "multipolygons", &l, e)) != ERR_OK)
        goto done;
    {
        OGRwkbGeometryType t = wkbFlatten(OGR_L_GetGeomType(l));
        if (t != wkbUnknown && t != wkbPolygon && t != wkbMultiPolygon &&
            t != wkbCurvePolygon && t != wkbMultiSurface) {
            rc = err_set(e, ERR_INPUT, "'%s' layer '%s' has %s geometries; a flood extent must "
                         "be polygons", lay->path, OGR_L_GetName(l), OGRGeometryTypeToName(t));
            goto done;
        }
    }
    dst = OSRNewSpatialReference(g->wkt);
    if (dst == NULL) {
        rc = err_set(e, ERR_INPUT, "the population grid's CRS cannot be read for '%s'",
                     lay->path);
        goto done;
    }
    OSRSetAxisMappingStrategy(dst, OAMS_TRADITIONAL_GIS_ORDER);
    {
        OGRSpatialReferenceH src = OGR_L_GetSpatialRef(l);
        if (src != NULL && !OSRIsSame(src, dst)) {
            OGRSpatialReferenceH s2 = OSRClone(src);
            OSRSetAxisMappingStrategy(s2, OAMS_TRADITIONAL_GIS_ORDER);
            ct = OCTNewCoordinateTransformation(s2, dst);
            OSRDestroySpatialReference(s2);
            if (ct == NULL) {
                rc = err_set(e, ERR_INPUT, "no transformation from the CRS of '%s' onto the "
                             "population grid's CRS", lay->path);
                goto done;
            }
        }
    }
    line = OGR_G_CreateGeometry(wkbLineString);
    OGR_G_AddPoint_2D(line, 0, 0);
    OGR_G_AddPoint_2D(line, 0, 0);
    OGR_L_ResetReading(l);
    while ((f = OGR_L_GetNextFeature(l)) != NULL) {
        OGRGeometryH geom = OGR_F_GetGeometryRef(f);
        if (geom != NULL && !OGR_G_IsEmpty(geom)) {
            OGRGeometryH gg = OGR_G_Clone(geom);
            if (ct != NULL && OGR_G_Transform(gg, ct) != OGRERR_NONE) {
                OGR_G_DestroyGeometry(gg);
                rc = err_set(e, ERR_INPUT, "feature %lld of '%s' cannot be reprojected onto "
                             "the population grid's CRS", (long long)OGR_F_GetFID(f),
                             lay->path);
                goto done;
            }
            OGR_G_GetEnvelope(gg, &env);
            (*n_polygons)++;
            for (size_t i = 0; i < r->n_segs; i++) {
                const road_seg_t *sg = &r->segs[i];
                double xa = r->x[sg->a], ya = r->y[sg->a], xb = r->x[sg->b], yb = r->y[sg->b];
                if (hit[i] || fmax(xa, xb) < env.MinX || fmin(xa, xb) > env.MaxX ||
                    fmax(ya, yb) < env.MinY || fmin(ya, yb) > env.MaxY)
                    continue;
                OGR_G_SetPoint_2D(line, 0, xa, ya);
                OGR_G_SetPoint_2D(line, 1, xb, yb);
                if (OGR_G_Intersects(gg, line)) {
                    hit[i] = 1;
                    (*n_hit)++;
                }
            }
            OGR_G_DestroyGeometry(gg);
        }
        OGR_F_Destroy(f);
        f = NULL;
    }
done:
    if (f != NULL) OGR_F_Destroy(f);
    if (line != NULL) OGR_G_DestroyGeometry(line);
    if (ct != NULL) OCTDestroyCoordinateTransformation(ct);
    if (dst != NULL) OSRDestroySpatialReference(dst);
    if (ds != NULL) GDALClose(ds);
    return rc;
}

int roads_components(const roads_t *r, size_t *n_comp, size_t *largest, int32_t *membership,
                     err_t *e)
{
    igraph_t gr;
    igraph_vector_int_t edges, csize, memb;
    igraph_integer_t no = 0;
    int have_g = 0, have_e = 0, have_c = 0, have_m = 0, rc = ERR_OK;
    igraph_error_t ie;

    *n_comp = 0;
    if (largest != NULL) *largest = 0;
    if (r->n_nodes == 0) return ERR_OK;
    ie = igraph_vector_int_init(&edges, (igraph_integer_t)(2 * r->n_segs));
    if (ie != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "road components: %s", igraph_strerror(ie));
        goto done;
    }
    have_e = 1;
    for (size_t i = 0; i < r->n_segs; i++) {
        VECTOR(edges)[2 * i] = r->segs[i].a;
        VECTOR(edges)[2 * i + 1] = r->segs[i].b;
    }
    if ((ie = igraph_create(&gr, &edges, (igraph_integer_t)r->n_nodes, IGRAPH_UNDIRECTED)) !=
        IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "road components: building the graph: %s",
                     igraph_strerror(ie));
        goto done;
    }
    have_g = 1;
    if ((ie = igraph_vector_int_init(&csize, 0)) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "road components: %s", igraph_strerror(ie));
        goto done;
    }
    have_c = 1;
    if ((ie = igraph_vector_int_init(&memb, 0)) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "road components: %s", igraph_strerror(ie));
        goto done;
    }
    have_m = 1;
    if ((ie = igraph_connected_components(&gr, &memb, &csize, &no, IGRAPH_WEAK)) !=
        IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_GRAPH, "road components: %s", igraph_strerror(ie));
        goto done;
    }
    *n_comp = (size_t)no;
    if (membership != NULL)
        for (size_t i = 0; i < r->n_nodes; i++) membership[i] = (int32_t)VECTOR(memb)[i];
    if (largest != NULL) {
        igraph_integer_t mx = 0;
        for (igraph_integer_t i = 0; i < igraph_vector_int_size(&csize); i++)
            if (VECTOR(csize)[i] > mx) mx = VECTOR(csize)[i];
        *largest = (size_t)mx;
    }
done:
    if (have_m) igraph_vector_int_destroy(&memb);
    if (have_c) igraph_vector_int_destroy(&csize);
    if (have_g) igraph_destroy(&gr);
    if (have_e) igraph_vector_int_destroy(&edges);
    return rc;
}

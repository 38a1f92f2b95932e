/* gen-demo: writes the invented demo district, deterministically from a seed.
 *
 *   gen-demo --seed 7 --out scenarios/demo
 *
 * The district (Orvanne, a made-up place) is laid out in cell coordinates
 * (column, row; (0,0) is the top-left corner of a 400 x 400 grid of 100 m cells),
 * then written with the GDAL C API: four GeoTIFFs on one grid, three GeoPackages
 * and a scenario.json that names them. A river runs from the north edge to the
 * south edge; roads cross it only on two bridges, each its own feature. Every
 * road is checked against the water cells (with a one-cell margin) and against
 * every other road (no crossings except at shared vertices) before it is kept.
 * Randomness comes from our own splitmix64 stream, never rand(), so the same
 * seed gives the same rasters byte for byte. Files are written under temporary
 * names and renamed when complete; scenario.json comes last because the
 * Makefile treats it as the target. */
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <gdal.h>
#include <ogr_api.h>
#include <ogr_srs_api.h>

#include "err.h"

/* ---- fixed shape of the district ------------------------------------------ */

#define NX 400                 /* columns */
#define NY 400                 /* rows */
#define CELL_M 100.0           /* cell size, metres */
#define EPSG 32736             /* WGS 84 / UTM zone 36S */
#define X0 512000.0            /* easting of the grid's west edge, metres */
#define Y0 9043000.0           /* northing of the grid's north edge, metres */
#define POP_NODATA (-9999.0f)

#define DISTRICT_NAME "Orvanne District"
#define TOWN_NAME "Kessim"

#define RIVER_HALF 1.5         /* water where |col - river centre| < this, cells */
#define TOWN_HALF 6            /* town street grid spans -6..+6 cells around the centre */

#define MAX_NODES 512
#define MAX_EDGES 1024
#define MAX_VERTS 8
#define MAX_VILLAGES 30
#define MAX_SITES 96
#define NAME_LEN 40

enum cls { C_PRIMARY, C_SECONDARY, C_TERTIARY, C_UNCLASSIFIED, C_TRACK, C_PATH, N_CLS };
static const char *const cls_name[N_CLS] = {"primary", "secondary", "tertiary",
                                            "unclassified", "track", "path"};

enum lc { LC_CROP = 10, LC_GRASS = 20, LC_FOREST = 30, LC_WETLAND = 40, LC_BUILT = 50,
          LC_WATER = 60 };

typedef struct pt {
    double c, r;               /* column, row in cells (fractional) */
} pt_t;

typedef struct node {
    pt_t p;
    int bank;                  /* +1 east of the river, -1 west */
    int comp;                  /* union-find parent while joining a bank */
    int village;               /* village index, or -1 */
    int need;                  /* 1 when the bank network must reach this node */
} node_t;

typedef struct edge {
    int a, b;                  /* node indices; digitised from a to b */
    int cls;                   /* enum cls */
    int bridge, oneway, paved;
    pt_t v[MAX_VERTS];         /* polyline, v[0] = node a, v[nv-1] = node b */
    int nv;
    double length;             /* cells; set before homesteads are placed */
} edge_t;

typedef struct village {
    pt_t at;
    double people;             /* persons */
    double sigma;              /* spread of the settlement, cells */
    int node;
    char name[NAME_LEN];
} village_t;

typedef struct site {
    pt_t at;
    char id[16];
    char name[NAME_LEN + 24];
    int capacity;              /* persons */
    double cost;               /* fixed opening cost, planning units */
} site_t;

typedef struct rng {
    uint64_t s;
} rng_t;

typedef struct demo {
    uint64_t seed;
    rng_t rng;

    /* River centre: col = rc0 + a1 sin(r/p1 + f1) + a2 sin(r/p2 + f2). */
    double rc0, a1, p1, f1, a2, p2, f2;
    pt_t lake;                 /* lake centre */
    double lake_a, lake_b;     /* semi-axes along columns and rows, cells */
    pt_t town;
    double town_people;
    int row_b1, row_b2;        /* rows of the two bridges */

    float *pop, *elev;         /* NX*NY persons, metres */
    uint8_t *lc, *bar;         /* NX*NY class, barrier flag */

    node_t nodes[MAX_NODES];
    int n_nodes;
    edge_t edges[MAX_EDGES];
    int n_edges;
    village_t vill[MAX_VILLAGES];
    int n_vill;
    int town_node[5][5];       /* town street grid, [row][col] offsets -6,-3,0,3,6 */
    int spine_n, spine_w;      /* spine nodes chosen for the two depots */
    int b1w, b2e, b2w;         /* bridge ends: west of bridge 1, both of bridge 2 */

    site_t hp[16], cand[MAX_SITES], dep[2];
    int n_hp, n_cand;
    char ward[4][NAME_LEN];
    int name_order[64];        /* shuffled indices into name_pool */
    int n_names;               /* names dealt so far */
    double total_people;
} demo_t;

/* ---- randomness: splitmix64 (Steele, Lea, Flood 2014), our own stream -------- */

static uint64_t rng_u64(rng_t *g)
{
    uint64_t z = (g->s += 0x9E3779B97F4A7C15ULL);
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

/* Uniform in [0, 1), 53 bits. */
static double rng_unif(rng_t *g)
{
    return (double)(rng_u64(g) >> 11) * (1.0 / 9007199254740992.0);
}

static double rng_range(rng_t *g, double lo, double hi)
{
    return lo + (hi - lo) * rng_unif(g);
}

static int rng_int(rng_t *g, int lo, int hi)   /* inclusive */
{
    return lo + (int)(rng_u64(g) % (uint64_t)(hi - lo + 1));
}

/* Standard normal by Box-Muller. */
static double rng_normal(rng_t *g)
{
    double u = rng_unif(g), v = rng_unif(g);
    if (u < 1e-300) u = 1e-300;
    return sqrt(-2.0 * log(u)) * cos(6.283185307179586 * v);
}

/* Hash of a lattice point, in [0, 1): the basis of the smooth noise fields. */
static double lattice(uint64_t seed, int ix, int iy, int layer)
{
    rng_t g = {seed ^ ((uint64_t)(uint32_t)ix * 0x632BE59BD9B4E019ULL)
               ^ ((uint64_t)(uint32_t)iy * 0x8CB92BA72F3D8DD7ULL)
               ^ ((uint64_t)(uint32_t)layer << 56)};
    return rng_unif(&g);
}

/* Smooth value noise in [0, 1) with features about 'scale' cells across, two octaves. */
static double noise(const demo_t *d, double c, double r, double scale, int layer)
{
    double sum = 0, wsum = 0, w = 1.0;
    for (int oct = 0; oct < 2; oct++, scale /= 2.0, w /= 2.0) {
        double x = c / scale, y = r / scale;
        int ix = (int)floor(x), iy = (int)floor(y);
        double fx = x - ix, fy = y - iy;
        fx = fx * fx * (3 - 2 * fx);
        fy = fy * fy * (3 - 2 * fy);
        int l = layer * 4 + oct;
        double v00 = lattice(d->seed, ix, iy, l), v10 = lattice(d->seed, ix + 1, iy, l);
        double v01 = lattice(d->seed, ix, iy + 1, l), v11 = lattice(d->seed, ix + 1, iy + 1, l);
        double top = v00 + (v10 - v00) * fx, bot = v01 + (v11 - v01) * fx;
        sum += w * (top + (bot - top) * fy);
        wsum += w;
    }
    return sum / wsum;
}

/* ---- names: made up for this district and checked against no real place we
 * know of; the seed shuffles them, so every village keeps a name of its own. -- */

static const char *const name_pool[] = {
    "Velumbra", "Kasorind", "Ishvenna", "Morudai", "Pelkatho", "Savirune", "Oskelim",
    "Quorasel", "Bantaveru", "Dulmavik", "Ferrogan", "Ilvaskor", "Nembraith", "Zovanti",
    "Cartomeh", "Yulvessa", "Grenmaro", "Lothkapi", "Murivale", "Toravinde", "Wennaspo",
    "Ubalorin", "Kelvathu", "Pradilmo", "Vintessoh", "Ombrakel", "Jaskerru", "Halvonti",
    "Rennimbo", "Tasquileh", "Brovannik", "Ciluvamba", "Dravossin", "Norvessa", "Caldurim",
    "Sepharond", "Lintavo", "Kettrasso", "Mavrolin", "Eshumbri", "Gorvendal", "Piravoste"};

#define N_OF(a) ((int)(sizeof(a) / sizeof((a)[0])))

/* Deal the pool in a seeded order (Fisher-Yates); called once, first. */
static void shuffle_names(demo_t *d)
{
    for (int i = 0; i < N_OF(name_pool); i++) d->name_order[i] = i;
    for (int i = N_OF(name_pool) - 1; i > 0; i--) {
        int j = rng_int(&d->rng, 0, i), t = d->name_order[i];
        d->name_order[i] = d->name_order[j];
        d->name_order[j] = t;
    }
}

/* The next unused name. The pool holds more names than the most villages,
 * wards and depots a district can have (28 + 4 + 2), so it never runs dry. */
static void make_name(demo_t *d, char *out)
{
    snprintf(out, NAME_LEN, "%s", name_pool[d->name_order[d->n_names++ % N_OF(name_pool)]]);
}

/* ---- geography --------------------------------------------------------------- */

static double river_col(const demo_t *d, double r)
{
    return d->rc0 + d->a1 * sin(r / d->p1 + d->f1) + d->a2 * sin(r / d->p2 + d->f2);
}

static double lake_q(const demo_t *d, double c, double r)  /* < 1 inside the lake */
{
    double u = (c - d->lake.c) / d->lake_a, v = (r - d->lake.r) / d->lake_b;
    return sqrt(u * u + v * v);
}

static int bank_of(const demo_t *d, pt_t p)
{
    return p.c > river_col(d, p.r) ? 1 : -1;
}

static double dist(pt_t a, pt_t b)
{
    return hypot(a.c - b.c, a.r - b.r);
}

/* Lay the water cells: river from north to south and one lake. The river's
 * centre moves at most ~1.25 columns per row, so with a half width of 1.5 the
 * water of consecutive rows always shares a column: the barrier is 4-connected
 * from edge to edge and nothing can slip between its cells. */
static void lay_water(demo_t *d)
{
    for (int r = 0; r < NY; r++) {
        double rc = river_col(d, r + 0.5);
        for (int c = 0; c < NX; c++) {
            int w = fabs(c + 0.5 - rc) < RIVER_HALF || lake_q(d, c + 0.5, r + 0.5) < 1.0;
            d->bar[(size_t)r * NX + c] = (uint8_t)w;
        }
    }
}

static int is_water(const demo_t *d, int c, int r)
{
    if (c < 0 || r < 0 || c >= NX || r >= NY) return 0;
    return d->bar[(size_t)r * NX + c] != 0;
}

/* A point is clear when it lies inside the grid and neither its cell nor any of
 * the eight around it is water: a road through clear points never touches a
 * water cell, whatever rasteriser draws it. */
static int clear_at(const demo_t *d, pt_t p)
{
    if (p.c < 0.05 || p.r < 0.05 || p.c > NX - 0.05 || p.r > NY - 0.05) return 0;
    int c = (int)floor(p.c), r = (int)floor(p.r);
    for (int dr = -1; dr <= 1; dr++)
        for (int dc = -1; dc <= 1; dc++)
            if (is_water(d, c + dc, r + dr)) return 0;
    return 1;
}

/* Nearest clear point on row 'r' beside the river, on the given bank. */
static pt_t bridge_end(const demo_t *d, double r, int bank)
{
    pt_t p = {river_col(d, r), r};
    while (!clear_at(d, p)) p.c += 0.25 * bank;
    p.c += 0.25 * bank;
    return p;
}

/* ---- road network ------------------------------------------------------------- */

/* A new road node at p ('village' = its village index or -1). Returns the
 * node's index, or -1 with 'e' filled when the table is full. */
static int add_node(demo_t *d, pt_t p, int village, err_t *e)
{
    if (d->n_nodes >= MAX_NODES)
        return err_set(e, ERR_INTERNAL, "gen-demo: more than %d road nodes", MAX_NODES), -1;
    node_t *n = &d->nodes[d->n_nodes];
    n->p = p;
    n->bank = bank_of(d, p);
    n->comp = d->n_nodes;
    n->village = village;
    n->need = village >= 0;
    return d->n_nodes++;
}

static double orient(pt_t a, pt_t b, pt_t c)
{
    return (b.c - a.c) * (c.r - a.r) - (b.r - a.r) * (c.c - a.c);
}

static int same_pt(pt_t a, pt_t b)
{
    return a.c == b.c && a.r == b.r;
}

/* Do segments pq and uv meet? Touching counts, except at a shared end point. */
static int seg_meet(pt_t p, pt_t q, pt_t u, pt_t v)
{
    if (same_pt(p, u) || same_pt(p, v) || same_pt(q, u) || same_pt(q, v)) {
        /* Shared end s: they meet elsewhere only when collinear and leaving s
         * the same way. */
        pt_t s = same_pt(p, u) || same_pt(p, v) ? p : q;
        pt_t a = same_pt(s, p) ? q : p, b = same_pt(s, u) ? v : u;
        return fabs(orient(s, a, b)) < 1e-9 &&
               (a.c - s.c) * (b.c - s.c) + (a.r - s.r) * (b.r - s.r) > 0;
    }
    double d1 = orient(u, v, p), d2 = orient(u, v, q), d3 = orient(p, q, u), d4 = orient(p, q, v);
    return d1 * d2 <= 0 && d3 * d4 <= 0 &&
           fmin(p.c, q.c) <= fmax(u.c, v.c) && fmin(u.c, v.c) <= fmax(p.c, q.c) &&
           fmin(p.r, q.r) <= fmax(u.r, v.r) && fmin(u.r, v.r) <= fmax(p.r, q.r);
}

static double seg_point_dist(pt_t a, pt_t b, pt_t p)
{
    double vx = b.c - a.c, vy = b.r - a.r, l2 = vx * vx + vy * vy;
    double t = l2 > 0 ? ((p.c - a.c) * vx + (p.r - a.r) * vy) / l2 : 0;
    t = t < 0 ? 0 : t > 1 ? 1 : t;
    pt_t q = {a.c + t * vx, a.r + t * vy};
    return dist(p, q);
}

/* Can polyline 'x' be built? It must stay on clear ground (unless it is a
 * bridge), cross no other road except at shared end nodes, and pass no other
 * node closer than 'gap' cells (a road through a village stops there). */
static int edge_ok(const demo_t *d, const edge_t *x, double gap)
{
    for (int i = 0; i + 1 < x->nv; i++) {
        pt_t a = x->v[i], b = x->v[i + 1];
        if (!x->bridge) {
            double len = dist(a, b);
            int n = (int)ceil(len / 0.1);
            for (int k = 0; k <= n; k++) {
                pt_t s = {a.c + (b.c - a.c) * k / n, a.r + (b.r - a.r) * k / n};
                if (!clear_at(d, s)) return 0;
            }
        }
        for (int j = 0; j < d->n_edges; j++) {
            const edge_t *y = &d->edges[j];
            for (int k = 0; k + 1 < y->nv; k++)
                if (seg_meet(a, b, y->v[k], y->v[k + 1])) return 0;
        }
        for (int j = 0; j < d->n_nodes; j++)
            if (j != x->a && j != x->b && seg_point_dist(a, b, d->nodes[j].p) < gap) return 0;
    }
    return 1;
}

/* Shape a road from node a to node b: straight, or with 'bends' inner vertices
 * pushed sideways by up to 'wiggle' of its length, as roads follow the ground. */
static void shape_edge(demo_t *d, edge_t *x, int a, int b, int bends, double wiggle)
{
    pt_t pa = d->nodes[a].p, pb = d->nodes[b].p;
    double len = dist(pa, pb);
    double nx = -(pb.r - pa.r) / (len > 0 ? len : 1), ny = (pb.c - pa.c) / (len > 0 ? len : 1);
    memset(x, 0, sizeof *x);
    x->a = a;
    x->b = b;
    x->v[0] = pa;
    x->nv = 1;
    if (bends > MAX_VERTS - 2) bends = MAX_VERTS - 2;
    double amp = rng_range(&d->rng, -wiggle, wiggle) * len;
    for (int k = 1; k <= bends; k++) {
        double t = (double)k / (bends + 1);
        double off = amp * sin(3.141592653589793 * t) + rng_range(&d->rng, -0.02, 0.02) * len;
        x->v[x->nv++] = (pt_t){pa.c + (pb.c - pa.c) * t + nx * off,
                               pa.r + (pb.r - pa.r) * t + ny * off};
    }
    x->v[x->nv++] = pb;
}

static int push_edge(demo_t *d, const edge_t *x, int cls, err_t *e)
{
    if (d->n_edges >= MAX_EDGES)
        return err_set(e, ERR_INTERNAL, "gen-demo: more than %d road features", MAX_EDGES);
    edge_t *y = &d->edges[d->n_edges++];
    *y = *x;
    y->cls = cls;
    y->paved = cls <= C_SECONDARY;
    return ERR_OK;
}

/* Try a few shapes for a road between two nodes; *kept says whether one fitted.
 * Returns an error only when the feature table is full. */
static int try_road(demo_t *d, int a, int b, int cls, double gap, int *kept, err_t *e)
{
    edge_t x;
    double len = dist(d->nodes[a].p, d->nodes[b].p);
    int bends = len < 4 ? 0 : len < 20 ? 1 : len < 50 ? 2 : 3;
    *kept = 0;
    for (int attempt = 0; attempt < 6; attempt++) {
        shape_edge(d, &x, a, b, bends, attempt < 3 ? 0.06 : 0.02);
        if (edge_ok(d, &x, gap)) {
            *kept = 1;
            return push_edge(d, &x, cls, e);
        }
    }
    return ERR_OK;
}

/* A road that must exist (spine, town streets): failure is a generator bug. */
static int must_road(demo_t *d, int a, int b, int cls, int bends, err_t *e)
{
    edge_t x;
    for (int attempt = 0; attempt < 8; attempt++) {
        shape_edge(d, &x, a, b, attempt < 6 ? bends : 0, attempt < 6 ? 0.03 : 0);
        if (edge_ok(d, &x, 1.0)) return push_edge(d, &x, cls, e);
    }
    return err_set(e, ERR_INTERNAL, "gen-demo: seed %llu: cannot lay the %s road from "
                   "(%.1f, %.1f) to (%.1f, %.1f) cells; try another seed",
                   (unsigned long long)d->seed, cls_name[cls], d->nodes[a].p.c,
                   d->nodes[a].p.r, d->nodes[b].p.c, d->nodes[b].p.r);
}

static int uf_find(demo_t *d, int i)
{
    while (d->nodes[i].comp != i) {
        d->nodes[i].comp = d->nodes[d->nodes[i].comp].comp;
        i = d->nodes[i].comp;
    }
    return i;
}

static void uf_join(demo_t *d, int a, int b)
{
    d->nodes[uf_find(d, a)].comp = uf_find(d, b);
}

/* A chain of 'links' primary-road features from node 'from' to node 'to' on
 * one bank; inner nodes stay at least 10 cells from the river and clear of the
 * lake. One feature per link, so side roads can join at every spine node.
 * Sets *first to the node after 'from'. */
static int lay_spine(demo_t *d, int from, int to, int links, int *first, err_t *e)
{
    pt_t pa = d->nodes[from].p, pb = d->nodes[to].p;
    int bank = d->nodes[from].bank, prev = from, rc = ERR_OK;
    *first = -1;
    for (int k = 1; k <= links; k++) {
        int nd;
        if (k == links) {
            nd = to;
        } else {
            double t = (double)k / links;
            pt_t p = {pa.c + (pb.c - pa.c) * t + rng_range(&d->rng, -5, 5),
                      pa.r + (pb.r - pa.r) * t + rng_range(&d->rng, -3, 3)};
            double rcol = river_col(d, p.r);
            if (bank > 0 && p.c < rcol + 10) p.c = rcol + 10;
            if (bank < 0 && p.c > rcol - 10) p.c = rcol - 10;
            if (lake_q(d, p.c, p.r) < 1.8) p.r += (p.r < d->lake.r ? -1 : 1) * 2.5 * d->lake_b;
            nd = add_node(d, p, -1, e);
            if (nd < 0) return e->code;
        }
        if ((rc = must_road(d, prev, nd, C_PRIMARY, 2, e)) != ERR_OK) return rc;
        uf_join(d, prev, nd);
        if (*first < 0) *first = nd;
        prev = nd;
    }
    return ERR_OK;
}

typedef struct cand_edge {
    int a, b;
    double len;
} cand_edge_t;

static int cmp_cand(const void *x, const void *y)
{
    const cand_edge_t *p = x, *q = y;
    if (p->len != q->len) return p->len < q->len ? -1 : 1;
    if (p->a != q->a) return p->a - q->a;
    return p->b - q->b;
}

/* Join every node of one bank into the network of 'anchor' (a node of the
 * bank's trunk): Kruskal's minimum spanning tree over valid, non-crossing roads
 * (the trunk is joined already), then a few extra links that make loops.
 * Villages left unreachable are dropped from the settlements by the caller. */
static int join_bank(demo_t *d, int bank, int anchor, err_t *e)
{
    cand_edge_t *ce = NULL;
    size_t n = 0;
    int rc = ERR_OK, kept;

    ce = malloc(sizeof *ce * (size_t)d->n_nodes * (size_t)d->n_nodes / 2 + 1);
    if (ce == NULL) return err_set(e, ERR_NOMEM, "gen-demo: out of memory");
    for (int i = 0; i < d->n_nodes; i++)
        for (int j = i + 1; j < d->n_nodes; j++) {
            if (d->nodes[i].bank != bank || d->nodes[j].bank != bank) continue;
            if (!d->nodes[i].need && !d->nodes[j].need) continue;
            double len = dist(d->nodes[i].p, d->nodes[j].p);
            if (len < 130) ce[n++] = (cand_edge_t){i, j, len};
        }
    qsort(ce, n, sizeof *ce, cmp_cand);

    for (size_t k = 0; k < n; k++) {
        int a = ce[k].a, b = ce[k].b;
        if (uf_find(d, a) == uf_find(d, b)) continue;
        /* Tertiary for now; build() upgrades roads to large villages. */
        if ((rc = try_road(d, a, b, C_TERTIARY, 3.0, &kept, e)) != ERR_OK) goto done;
        if (kept) uf_join(d, a, b);
    }
    /* Loops: short links between villages not yet joined directly. */
    int extra = 0, want = 4 + (int)(n / 30);
    for (size_t k = 0; k < n && extra < want; k++) {
        int a = ce[k].a, b = ce[k].b, linked = 0;
        if (d->nodes[a].village < 0 || d->nodes[b].village < 0 || ce[k].len > 85) continue;
        for (int j = 0; j < d->n_edges && !linked; j++)
            linked = (d->edges[j].a == a && d->edges[j].b == b) ||
                     (d->edges[j].a == b && d->edges[j].b == a);
        if (linked || rng_unif(&d->rng) < 0.2) continue;
        int cls = ce[k].len < 50 ? C_PATH : (extra % 2 ? C_TRACK : C_UNCLASSIFIED);
        if ((rc = try_road(d, a, b, cls, 3.0, &kept, e)) != ERR_OK) goto done;
        extra += kept;
    }
    /* Nodes the tree missed (every short link blocked): try longer links to
     * the bank's network, nearest first. */
    for (int i = 0; i < d->n_nodes; i++) {
        if (d->nodes[i].bank != bank || !d->nodes[i].need ||
            uf_find(d, i) == uf_find(d, anchor))
            continue;
        n = 0;
        for (int j = 0; j < d->n_nodes; j++)
            if (d->nodes[j].bank == bank && uf_find(d, j) == uf_find(d, anchor))
                ce[n++] = (cand_edge_t){i, j, dist(d->nodes[i].p, d->nodes[j].p)};
        qsort(ce, n, sizeof *ce, cmp_cand);
        for (size_t k = 0; k < n && uf_find(d, i) != uf_find(d, anchor); k++) {
            if ((rc = try_road(d, i, ce[k].b, C_TERTIARY, 3.0, &kept, e)) != ERR_OK) goto done;
            if (kept) uf_join(d, i, ce[k].b);
        }
    }
done:
    free(ce);
    return rc;
}

/* ---- building the district ------------------------------------------------------ */

static int place_town_and_river(demo_t *d)
{
    rng_t *g = &d->rng;
    d->rc0 = rng_range(g, 175, 215);
    d->a1 = rng_range(g, 22, 36);
    d->p1 = rng_range(g, 55, 75);
    d->f1 = rng_range(g, 0, 6.283);
    d->a2 = rng_range(g, 5, 9);
    d->p2 = rng_range(g, 22, 30);
    d->f2 = rng_range(g, 0, 6.283);
    d->town.r = floor(rng_range(g, 150, 250)) + 0.5;
    d->town.c = floor(river_col(d, d->town.r) + 21) + 0.5;
    d->row_b1 = (int)d->town.r;
    d->row_b2 = d->town.r < 200 ? rng_int(g, 305, 350) : rng_int(g, 50, 95);
    /* The lake lies on the west bank, away from both bridge roads and the
     * west road out of the town. */
    for (int tries = 0; tries < 200; tries++) {
        d->lake.r = rng_range(g, 40, 360);
        d->lake.c = river_col(d, d->lake.r) - rng_range(g, 50, 90);
        d->lake_a = rng_range(g, 8, 14);
        d->lake_b = rng_range(g, 5, 9);
        if (d->lake.c > 35 && fabs(d->lake.r - d->row_b1) > 60 &&
            fabs(d->lake.r - d->row_b2) > 40)
            return 1;
    }
    return 0;
}

/* Villages go where there is room: off the water and the lake shore, clear of
 * the town, of each other and of the trunk roads already laid (so a main road
 * never runs through a village without a junction). */
static int place_villages(demo_t *d, err_t *e)
{
    rng_t *g = &d->rng;
    int want = rng_int(g, 18, 28);
    for (int tries = 0; tries < 20000 && d->n_vill < want; tries++) {
        pt_t p = {floor(rng_range(g, 18, NX - 18)) + 0.5, floor(rng_range(g, 18, NY - 18)) + 0.5};
        double rdist = fabs(p.c - river_col(d, p.r));
        if (rdist < 9 || lake_q(d, p.c, p.r) < 2.0 || dist(p, d->town) < 38) continue;
        int near = 0;
        for (int i = 0; i < d->n_vill && !near; i++) near = dist(p, d->vill[i].at) < 34;
        for (int j = 0; j < d->n_edges && !near; j++)
            for (int k = 0; k + 1 < d->edges[j].nv && !near; k++)
                near = seg_point_dist(d->edges[j].v[k], d->edges[j].v[k + 1], p) < 6;
        if (near) continue;
        village_t *v = &d->vill[d->n_vill];
        v->at = p;
        v->sigma = rng_range(g, 2.4, 3.4);
        v->people = 0;        /* set once the district total is known */
        make_name(d, v->name);
        if ((v->node = add_node(d, p, d->n_vill, e)) < 0) return e->code;
        d->n_vill++;
    }
    return ERR_OK;
}

/* The trunk: town streets, the primary road north and south along the east
 * bank and west over bridge 1, and bridge 2 (joined to each bank later). */
static int lay_trunk(demo_t *d, err_t *e)
{
    static const int off[5] = {-TOWN_HALF, -TOWN_HALF / 2, 0, TOWN_HALF / 2, TOWN_HALF};
    int rc = ERR_OK, nd, first;

    /* Town street grid: blocks of 300 m. */
    for (int i = 0; i < 5; i++)
        for (int j = 0; j < 5; j++) {
            nd = add_node(d, (pt_t){d->town.c + off[j], d->town.r + off[i]}, -1, e);
            if (nd < 0) return e->code;
            d->town_node[i][j] = nd;
        }
    for (int i = 0; i < 5; i++)
        for (int j = 0; j < 5; j++) {
            int ring = i == 0 || i == 4 || j == 0 || j == 4;
            if (j + 1 < 5) {   /* east-west street */
                int prim = i == 2 && j < 2;
                int cls = prim ? C_PRIMARY : ring ? C_TERTIARY : C_UNCLASSIFIED;
                int a = d->town_node[i][j], b = d->town_node[i][j + 1];
                /* Two one-way streets in the centre: eastbound north of the main
                 * junction, westbound south of it (each digitised its way). */
                if (i == 3 && j == 2) {
                    a = d->town_node[i][j + 1];
                    b = d->town_node[i][j];
                }
                if ((rc = must_road(d, a, b, cls, 0, e))) return rc;
                d->edges[d->n_edges - 1].oneway = (i == 1 || i == 3) && j == 2;
                uf_join(d, a, b);
            }
            if (i + 1 < 5) {   /* north-south street */
                int cls = j == 2 ? C_PRIMARY : ring ? C_TERTIARY : C_UNCLASSIFIED;
                if ((rc = must_road(d, d->town_node[i][j], d->town_node[i + 1][j], cls, 0, e)))
                    return rc;
                uf_join(d, d->town_node[i][j], d->town_node[i + 1][j]);
            }
        }
    for (int j = 0; j < d->n_edges; j++)
        d->edges[j].paved = 1;   /* town streets are sealed */

    /* Primary road north and south along the east bank. */
    pt_t pn = {river_col(d, 0.3) + rng_range(&d->rng, 30, 55), 0.3};
    pt_t ps = {river_col(d, NY - 0.3) + rng_range(&d->rng, 30, 55), NY - 0.3};
    int n_exit = add_node(d, pn, -1, e), s_exit = add_node(d, ps, -1, e);
    if (n_exit < 0 || s_exit < 0) return e->code;
    if ((rc = lay_spine(d, d->town_node[0][2], n_exit, 5, &first, e))) return rc;
    d->spine_n = d->edges[d->n_edges - 1].a;   /* the spine node nearest the north edge */
    if ((rc = lay_spine(d, d->town_node[4][2], s_exit, 5, &first, e))) return rc;

    /* Bridge 1 carries the primary road west from the town. */
    int b1e = add_node(d, bridge_end(d, d->town.r, 1), -1, e);
    int b1w = add_node(d, bridge_end(d, d->town.r, -1), -1, e);
    if (b1e < 0 || b1w < 0) return e->code;
    d->b1w = b1w;
    if ((rc = must_road(d, d->town_node[2][0], b1e, C_PRIMARY, 1, e))) return rc;
    uf_join(d, d->town_node[2][0], b1e);
    edge_t br;
    shape_edge(d, &br, b1e, b1w, 0, 0);
    br.bridge = 1;
    if ((rc = push_edge(d, &br, C_PRIMARY, e))) return rc;
    pt_t pw = {0.3, d->town.r + rng_range(&d->rng, -25, 25)};
    int w_exit = add_node(d, pw, -1, e);
    if (w_exit < 0) return e->code;
    if ((rc = lay_spine(d, b1w, w_exit, 4, &first, e))) return rc;
    d->spine_w = first;

    /* Bridge 2: a secondary road. Near its planned row, find the first row
     * where the east end can be joined by a straight road to a node of the
     * east bank's trunk within 4 km, and lay that approach now; the west end
     * is joined with the west bank's villages later. */
    d->b2e = -1;
    for (int tries = 0; tries < 81 && d->b2e < 0; tries++) {
        int row = d->row_b2 + (tries % 2 ? 1 : -1) * ((tries + 1) / 2);
        if (row < 20 || row > NY - 20 || fabs(row + 0.5 - d->lake.r) < 30) continue;
        int pe = add_node(d, bridge_end(d, row + 0.5, 1), -1, e), done = 0;
        if (pe < 0) return e->code;
        for (int j = 0; j < pe && !done; j++) {
            if (d->nodes[j].bank != 1 || dist(d->nodes[j].p, d->nodes[pe].p) > 40) continue;
            edge_t x;
            memset(&x, 0, sizeof x);
            x.a = pe;
            x.b = j;
            x.v[0] = d->nodes[pe].p;
            x.v[1] = d->nodes[j].p;
            x.nv = 2;
            if (!edge_ok(d, &x, 3.0)) continue;
            if ((rc = push_edge(d, &x, C_SECONDARY, e))) return rc;
            uf_join(d, pe, j);
            done = 1;
        }
        if (done) {
            d->row_b2 = row;
            d->b2e = pe;
        } else {
            d->n_nodes--;   /* the trial node is the last one; drop it */
        }
    }
    if (d->b2e < 0 && (d->b2e = add_node(d, bridge_end(d, d->row_b2 + 0.5, 1), -1, e)) < 0)
        return e->code;
    if ((d->b2w = add_node(d, bridge_end(d, d->row_b2 + 0.5, -1), -1, e)) < 0) return e->code;
    shape_edge(d, &br, d->b2e, d->b2w, 0, 0);
    br.bridge = 1;
    if ((rc = push_edge(d, &br, C_SECONDARY, e))) return rc;
    d->nodes[d->b2e].need = d->nodes[d->b2w].need = 1;
    return ERR_OK;
}

/* Village roads on each bank, secondary approaches to bridge 2, dead-end
 * tracks to hamlets and a footpath to the lake shore. */
static int lay_local(demo_t *d, err_t *e)
{
    int rc;
    if ((rc = join_bank(d, 1, d->town_node[2][2], e))) return rc;
    if ((rc = join_bank(d, -1, d->b1w, e))) return rc;
    if (uf_find(d, d->b2e) != uf_find(d, d->town_node[2][2]) ||
        uf_find(d, d->b2w) != uf_find(d, d->b1w))
        return err_set(e, ERR_INTERNAL, "gen-demo: seed %llu: bridge 2 is not joined to the "
                       "roads of both banks; try another seed", (unsigned long long)d->seed);
    for (int j = 0; j < d->n_edges; j++) {
        edge_t *x = &d->edges[j];
        if (!x->bridge && (x->a == d->b2e || x->b == d->b2e || x->a == d->b2w ||
                           x->b == d->b2w)) {
            x->cls = C_SECONDARY;
            x->paved = 1;
        }
    }

    for (int i = 0; i < d->n_vill; i++) {
        if (rng_unif(&d->rng) < 0.5) continue;
        double ang = rng_range(&d->rng, 0, 6.283), len = rng_range(&d->rng, 12, 22);
        pt_t p = {d->vill[i].at.c + len * cos(ang), d->vill[i].at.r + len * sin(ang)};
        if (!clear_at(d, p) || p.c < 3 || p.r < 3 || p.c > NX - 3 || p.r > NY - 3) continue;
        int h = add_node(d, p, -1, e), kept;
        if (h < 0) return e->code;
        if ((rc = try_road(d, d->vill[i].node, h, C_TRACK, 3.0, &kept, e))) return rc;
        if (!kept) d->n_nodes--;   /* the hamlet node is the last one; drop it */
    }

    int best = -1;
    double bd = 1e9;
    for (int i = 0; i < d->n_vill; i++) {
        double dd = dist(d->vill[i].at, d->lake);
        if (uf_find(d, d->vill[i].node) == uf_find(d, d->b1w) && dd < bd) {
            bd = dd;
            best = i;
        }
    }
    if (best >= 0) {
        /* Walk from the lake centre towards the village until the ground is clear. */
        pt_t v = d->vill[best].at, p = d->lake;
        for (double t = 1.0; t > 0 && !clear_at(d, p); t -= 0.01)
            p = (pt_t){v.c + (d->lake.c - v.c) * t, v.r + (d->lake.r - v.r) * t};
        int h = add_node(d, p, -1, e), kept;
        if (h < 0) return e->code;
        if ((rc = try_road(d, d->vill[best].node, h, C_PATH, 3.0, &kept, e))) return rc;
        if (!kept) d->n_nodes--;
    }
    return ERR_OK;
}
/* Drop villages the network could not reach, and any roads among them, so the
 * road network is one piece (the nodes stay, unused and without people). */
static void drop_unjoined(demo_t *d)
{
    int east = uf_find(d, d->town_node[2][2]), west = uf_find(d, d->b1w);
    int k = 0;
    for (int j = 0; j < d->n_edges; j++) {
        int root = uf_find(d, d->edges[j].a);
        if (root == east || root == west) d->edges[k++] = d->edges[j];
    }
    d->n_edges = k;
    k = 0;
    for (int i = 0; i < d->n_vill; i++) {
        int root = uf_find(d, d->vill[i].node);
        if (root != east && root != west) {
            d->nodes[d->vill[i].node].village = -1;
            continue;
        }
        d->vill[k] = d->vill[i];
        d->nodes[d->vill[k].node].village = k;
        k++;
    }
    d->n_vill = k;
}

static int is_nodata_cell(int c, int r)
{
    /* A few corner cells carry the nodata value: a test that totals skip them. */
    return (c + r < 3) || (NX - 1 - c + r < 2);
}

static void deposit(demo_t *d, int c, int r, double people)
{
    if (c < 0 || r < 0 || c >= NX || r >= NY) return;
    if (d->bar[(size_t)r * NX + c] || is_nodata_cell(c, r)) return;
    d->pop[(size_t)r * NX + c] += (float)people;
}

/* Spread 'people' over a Gaussian settlement of spread sigma (cells) at p,
 * normalised over the cells that can hold people, so the total is exact. */
static void settle(demo_t *d, pt_t p, double sigma, double people)
{
    int rad = (int)ceil(3 * sigma);
    int c0 = (int)floor(p.c), r0 = (int)floor(p.r);
    double wsum = 0;
    for (int pass = 0; pass < 2; pass++)
        for (int r = r0 - rad; r <= r0 + rad; r++)
            for (int c = c0 - rad; c <= c0 + rad; c++) {
                if (c < 0 || r < 0 || c >= NX || r >= NY) continue;
                if (d->bar[(size_t)r * NX + c] || is_nodata_cell(c, r)) continue;
                double dc = c + 0.5 - p.c, dr = r + 0.5 - p.r;
                double w = exp(-(dc * dc + dr * dr) / (2 * sigma * sigma));
                if (pass == 0) wsum += w;
                else if (wsum > 0) deposit(d, c, r, people * w / wsum);
            }
}

/* People: about 26% in the town, 44% in the villages, the rest in homesteads
 * scattered along roads and across the land. Target total 180-260 thousand. */
static void populate(demo_t *d)
{
    rng_t *g = &d->rng;
    double total = floor(rng_range(g, 180000, 260000));
    d->town_people = floor(total * rng_range(g, 0.24, 0.30));
    double vshare = floor(total * 0.44), wsum = 0;
    double w[MAX_VILLAGES];
    for (int i = 0; i < d->n_vill; i++) {
        w[i] = exp(rng_range(g, 0, 1.6));   /* a few large villages, many small */
        wsum += w[i];
    }
    for (int i = 0; i < d->n_vill; i++) d->vill[i].people = floor(vshare * w[i] / wsum);

    settle(d, d->town, 6.0, d->town_people);
    for (int i = 0; i < d->n_vill; i++)
        settle(d, d->vill[i].at, d->vill[i].sigma, d->vill[i].people);

    double road_len = 0;   /* cells */
    for (int j = 0; j < d->n_edges; j++) {
        edge_t *x = &d->edges[j];
        x->length = 0;
        for (int k = 0; k + 1 < x->nv; k++) x->length += dist(x->v[k], x->v[k + 1]);
        road_len += x->length;
    }
    double left = total - d->town_people;
    for (int i = 0; i < d->n_vill; i++) left -= d->vill[i].people;
    while (left > 0) {
        double hh = fmin(left, (double)rng_int(g, 3, 9));
        pt_t p;
        for (;;) {
            if (rng_unif(g) < 0.6 && road_len > 0) {   /* along a road, uniform by length */
                double at = rng_unif(g) * road_len;
                int j = 0, s = 0;
                while (j + 1 < d->n_edges && at > d->edges[j].length) at -= d->edges[j++].length;
                const edge_t *x = &d->edges[j];
                while (s + 2 < x->nv && at > dist(x->v[s], x->v[s + 1]))
                    at -= dist(x->v[s], x->v[s + 1]), s++;
                double t = fmin(at / fmax(dist(x->v[s], x->v[s + 1]), 1e-9), 1.0);
                p = (pt_t){x->v[s].c + (x->v[s + 1].c - x->v[s].c) * t + 3 * rng_normal(g),
                           x->v[s].r + (x->v[s + 1].r - x->v[s].r) * t + 3 * rng_normal(g)};
            } else {
                p = (pt_t){rng_range(g, 0, NX), rng_range(g, 0, NY)};
            }
            int c = (int)floor(p.c), r = (int)floor(p.r);
            if (c >= 0 && r >= 0 && c < NX && r < NY && !d->bar[(size_t)r * NX + c] &&
                !is_nodata_cell(c, r))
                break;
        }
        deposit(d, (int)floor(p.c), (int)floor(p.r), hh);
        left -= hh;
    }
    d->total_people = 0;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            size_t i = (size_t)r * NX + c;
            if (is_nodata_cell(c, r)) d->pop[i] = POP_NODATA;
            else d->total_people += d->pop[i];
        }
}

/* Elevation (metres): a valley floor falling gently southwards, sides rising
 * 1.8 m per 100 m from the river, and hills as Gaussian bumps of 60-260 m. */
static void shape_terrain(demo_t *d)
{
    rng_t *g = &d->rng;
    pt_t hill[12];
    double hh[12], hs[12];
    int nh = 0;
    while (nh < 12) {
        pt_t p = {rng_range(g, 0, NX), rng_range(g, 0, NY)};
        if (fabs(p.c - river_col(d, p.r)) < 30 || dist(p, d->town) < 30) continue;
        hill[nh] = p;
        hh[nh] = rng_range(g, 60, 260);
        hs[nh] = rng_range(g, 12, 35);
        nh++;
    }
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            double rc = river_col(d, r + 0.5), dv = fabs(c + 0.5 - rc);
            /* Hills and roughness fade out over 20 cells towards the river, so
             * the valley floor falls steadily downstream and the banks are gentle. */
            double f = fmin(dv / 20.0, 1.0), relief = 12 * noise(d, c, r, 40, 3);
            for (int k = 0; k < nh; k++) {
                double dc = c + 0.5 - hill[k].c, dr = r + 0.5 - hill[k].r;
                relief += hh[k] * exp(-(dc * dc + dr * dr) / (2 * hs[k] * hs[k]));
            }
            double z = 1240.0 - 0.15 * r + 1.8 * fmin(dv, 90) + relief * f * f * (3 - 2 * f);
            size_t i = (size_t)r * NX + c;
            if (d->bar[i] && lake_q(d, c + 0.5, r + 0.5) >= 1.0) z = 1240.0 - 0.15 * r - 1;
            d->elev[i] = (float)z;
        }
    /* The lake is flat, 1 m below its lowest shore cell, and sits in a basin:
     * the ground within 1.5 lake radii of the shore is eased down towards it. */
    double lo = 1e9;
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            double q = lake_q(d, c + 0.5, r + 0.5);
            if (q >= 1.0 && q < 1.2) lo = fmin(lo, d->elev[(size_t)r * NX + c]);
        }
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            double q = lake_q(d, c + 0.5, r + 0.5), w = (q - 1.0) / 1.5;
            float *z = &d->elev[(size_t)r * NX + c];
            if (q < 1.0) *z = (float)(lo - 1);
            else if (w < 1.0) *z = (float)(lo + (*z - lo) * w * w * (3 - 2 * w));
        }
}

static void classify_land(demo_t *d)
{
    for (int r = 0; r < NY; r++)
        for (int c = 0; c < NX; c++) {
            size_t i = (size_t)r * NX + c;
            pt_t p = {c + 0.5, r + 0.5};
            double dv = fabs(p.c - river_col(d, p.r)), lq = lake_q(d, p.c, p.r);
            double valley = 1240.0 - 0.15 * r + 1.8 * fmin(dv, 90);
            double rise = d->elev[i] - valley;     /* metres above the plain: hills */
            double nearest = dist(p, d->town) - 3;
            int built = dist(p, d->town) < 7.5;
            for (int k = 0; k < d->n_vill; k++) {
                double dd = dist(p, d->vill[k].at);
                built |= dd < 1.3;
                if (dd < nearest) nearest = dd;
            }
            uint8_t v;
            if (d->bar[i]) v = LC_WATER;
            else if (built) v = LC_BUILT;
            else if ((lq < 1.5 || dv < 6) && noise(d, c, r, 12, 1) > 0.42) v = LC_WETLAND;
            else if (noise(d, c, r, 30, 2) + rise / 300.0 > 0.82 && nearest > 6) v = LC_FOREST;
            else if (nearest < 14 || noise(d, c, r, 30, 2) < 0.3) v = LC_CROP;
            else v = LC_GRASS;
            d->lc[i] = v;
        }
}

static int point_ok(const demo_t *d, pt_t p)
{
    int c = (int)floor(p.c), r = (int)floor(p.r);
    return p.c > 0 && p.r > 0 && p.c < NX && p.r < NY && !is_water(d, c, r) &&
           !is_nodata_cell(c, r);
}

/* Health posts, candidate distribution points and depots. */
static int place_sites(demo_t *d, err_t *e)
{
    rng_t *g = &d->rng;
    int order[MAX_VILLAGES];
    for (int i = 0; i < d->n_vill; i++) order[i] = i;
    for (int i = 1; i < d->n_vill; i++)   /* by people, largest first (insertion sort) */
        for (int j = i; j > 0 && d->vill[order[j]].people > d->vill[order[j - 1]].people; j--) {
            int t = order[j];
            order[j] = order[j - 1];
            order[j - 1] = t;
        }

    /* Health posts: a health centre in the town, posts in the largest villages. */
    d->n_hp = rng_int(g, 6, 10);
    if (d->n_hp > d->n_vill + 1) d->n_hp = d->n_vill + 1;
    for (int k = 0; k < d->n_hp; k++) {
        site_t *s = &d->hp[k];
        snprintf(s->id, sizeof s->id, "HP%02d", k + 1);
        if (k == 0) {
            s->at = (pt_t){d->town.c + 1.6, d->town.r + 1.4};
            snprintf(s->name, sizeof s->name, "%s Health Centre", TOWN_NAME);
            s->capacity = 40000;
        } else {
            const village_t *v = &d->vill[order[k - 1]];
            s->at = (pt_t){v->at.c + 0.7, v->at.r - 0.6};
            char place[NAME_LEN];   /* a copy: snprintf may not read from 'd' while writing it */
            memcpy(place, v->name, sizeof place);
            snprintf(s->name, sizeof s->name, "%s Health Post", place);
            s->capacity = 1000 * rng_int(g, 8, 15);
        }
        s->cost = 0;
    }

    /* Candidates: six in the town beside street corners, then villages in turn:
     * the k-th point of a village sits beside road k mod degree, 1.2 cells out
     * (further for later rounds, alternating sides), 40 m off the road. */
    int want = rng_int(g, 48, 64), per[MAX_VILLAGES] = {0};
    static const int town_spots[6][2] = {{1, 1}, {1, 3}, {3, 1}, {3, 3}, {0, 2}, {4, 2}};
    for (int k = 0; k < 6; k++) {
        site_t *s = &d->cand[d->n_cand++];
        const node_t *n = &d->nodes[d->town_node[town_spots[k][0]][town_spots[k][1]]];
        s->at = (pt_t){n->p.c + 0.4, n->p.r + 0.4};
        snprintf(s->name, sizeof s->name, "%s market site %c", TOWN_NAME, 'A' + k);
    }
    for (int round = 0; round < 8 && d->n_cand < want; round++) {
        for (int i = 0; i < d->n_vill && d->n_cand < want; i++) {
            int nd = d->vill[i].node, deg = 0, pick, seen = 0;
            for (int j = 0; j < d->n_edges; j++) deg += d->edges[j].a == nd || d->edges[j].b == nd;
            if (deg == 0 || per[i] >= 4) continue;
            pick = per[i] % deg;
            for (int j = 0; j < d->n_edges; j++) {
                const edge_t *x = &d->edges[j];
                if (x->a != nd && x->b != nd) continue;
                if (seen++ != pick) continue;
                int far = per[i] / deg;
                pt_t a = x->a == nd ? x->v[0] : x->v[x->nv - 1];
                pt_t b = x->a == nd ? x->v[1] : x->v[x->nv - 2];
                double len = dist(a, b), t = fmin(1.2 + 1.4 * far, 0.8 * len) / len;
                double side = far % 2 ? -0.4 : 0.4;
                double nx = -(b.r - a.r) / len, ny = (b.c - a.c) / len;
                pt_t p = {a.c + (b.c - a.c) * t + side * nx, a.r + (b.r - a.r) * t + side * ny};
                int taken = !point_ok(d, p);
                for (int k = 0; k < d->n_cand && !taken; k++) taken = dist(d->cand[k].at, p) < 0.5;
                per[i]++;
                if (taken) break;
                site_t *s = &d->cand[d->n_cand++];
                s->at = p;
                char place[NAME_LEN];
                memcpy(place, d->vill[i].name, sizeof place);
                snprintf(s->name, sizeof s->name, "%s site %d", place, per[i]);
                break;
            }
        }
    }
    for (int k = 0; k < d->n_cand; k++) {
        site_t *s = &d->cand[k];
        snprintf(s->id, sizeof s->id, "C%03d", k + 1);
        s->capacity = 500 * rng_int(g, 4, 16);
        s->cost = 250.0 * rng_int(g, 4, 20);
    }

    /* Depots on the primary roads: north of the town and west over bridge 1. */
    d->dep[0].at = d->nodes[d->spine_n].p;
    d->dep[1].at = d->nodes[d->spine_w].p;
    snprintf(d->dep[0].id, sizeof d->dep[0].id, "D1");
    snprintf(d->dep[1].id, sizeof d->dep[1].id, "D2");
    for (int k = 0; k < 2; k++) {
        char nm[NAME_LEN];
        make_name(d, nm);
        snprintf(d->dep[k].name, sizeof d->dep[k].name, "%s Depot", nm);
    }

    for (int k = 0; k < d->n_hp + d->n_cand + 2; k++) {
        const site_t *s = k < d->n_hp ? &d->hp[k]
                        : k < d->n_hp + d->n_cand ? &d->cand[k - d->n_hp]
                        : &d->dep[k - d->n_hp - d->n_cand];
        if (!point_ok(d, s->at))
            return err_set(e, ERR_INTERNAL, "gen-demo: seed %llu: site %s lands on water or "
                           "outside the grid; try another seed", (unsigned long long)d->seed,
                           s->id);
    }
    if (d->n_cand < 40)
        return err_set(e, ERR_INTERNAL, "gen-demo: seed %llu: only %d candidate sites; try "
                       "another seed", (unsigned long long)d->seed, d->n_cand);
    return ERR_OK;
}

static int build(demo_t *d, err_t *e)
{
    int rc;
    shuffle_names(d);
    if (!place_town_and_river(d))
        return err_set(e, ERR_INTERNAL, "gen-demo: seed %llu: no room for the lake; try "
                       "another seed", (unsigned long long)d->seed);
    lay_water(d);
    if ((rc = lay_trunk(d, e)) != ERR_OK) return rc;
    if ((rc = place_villages(d, e)) != ERR_OK) return rc;
    for (int i = 0; i < 4; i++) make_name(d, d->ward[i]);
    if ((rc = lay_local(d, e)) != ERR_OK) return rc;
    drop_unjoined(d);
    if (d->n_vill < 15)
        return err_set(e, ERR_INTERNAL, "gen-demo: seed %llu: only %d villages joined to the "
                       "roads; try another seed", (unsigned long long)d->seed, d->n_vill);
    populate(d);
    /* Roads to the larger villages become secondary once their size is known. */
    for (int j = 0; j < d->n_edges; j++) {
        edge_t *x = &d->edges[j];
        int va = d->nodes[x->a].village, vb = d->nodes[x->b].village;
        if (x->cls != C_TERTIARY) continue;
        if ((va >= 0 && vb < 0 && d->vill[va].people > 5500) ||
            (vb >= 0 && va < 0 && d->vill[vb].people > 5500)) {
            x->cls = C_SECONDARY;
            x->paved = 1;
        }
    }
    shape_terrain(d);
    classify_land(d);
    return place_sites(d, e);
}

/* ---- writing ------------------------------------------------------------------- */

static void to_crs(pt_t p, double *x, double *y)
{
    *x = X0 + p.c * CELL_M;
    *y = Y0 - p.r * CELL_M;
}

/* GDALClose returns nothing in GDAL 3.6; a failed final flush shows up as
 * the last error instead. */
static CPLErr close_ds(GDALDatasetH ds)
{
    CPLErrorReset();
    GDALClose(ds);
    return CPLGetLastErrorType() == CE_Failure || CPLGetLastErrorType() == CE_Fatal
               ? CE_Failure : CE_None;
}

static int write_raster(const char *path, const char *what, GDALDataType type,
                        const void *data, const double *nodata, OGRSpatialReferenceH srs,
                        err_t *e)
{
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    GDALDatasetH ds = NULL;
    char *wkt = NULL;
    int rc = ERR_OK;
    char **opt = NULL;
    double gt[6] = {X0, CELL_M, 0, Y0, 0, -CELL_M};

    opt = CSLSetNameValue(opt, "COMPRESS", "DEFLATE");
    opt = CSLSetNameValue(opt, "TILED", "NO");
    ds = drv ? GDALCreate(drv, path, NX, NY, 1, type, opt) : NULL;
    if (ds == NULL) {
        rc = err_set(e, ERR_IO, "gen-demo: cannot create %s raster '%s': %s", what, path,
                     CPLGetLastErrorMsg());
        goto done;
    }
    if (OSRExportToWkt(srs, &wkt) != OGRERR_NONE || GDALSetProjection(ds, wkt) != CE_None ||
        GDALSetGeoTransform(ds, gt) != CE_None) {
        rc = err_set(e, ERR_IO, "gen-demo: cannot set the grid of '%s': %s", path,
                     CPLGetLastErrorMsg());
        goto done;
    }
    GDALRasterBandH b = GDALGetRasterBand(ds, 1);
    if (nodata != NULL) GDALSetRasterNoDataValue(b, *nodata);
    if (GDALRasterIO(b, GF_Write, 0, 0, NX, NY, (void *)data, NX, NY, type, 0, 0) != CE_None) {
        rc = err_set(e, ERR_IO, "gen-demo: cannot write %s raster '%s': %s", what, path,
                     CPLGetLastErrorMsg());
        goto done;
    }
done:
    if (ds != NULL && close_ds(ds) != CE_None && rc == ERR_OK)
        rc = err_set(e, ERR_IO, "gen-demo: cannot finish '%s': %s", path, CPLGetLastErrorMsg());
    CPLFree(wkt);
    CSLDestroy(opt);
    return rc;
}

/* Field spec for a layer: name and OGR type. */
typedef struct field {
    const char *name;
    OGRFieldType type;
} field_t;

static int make_layer(GDALDatasetH ds, const char *path, const char *name,
                      OGRwkbGeometryType gtype, OGRSpatialReferenceH srs, const field_t *f,
                      int nf, OGRLayerH *out, err_t *e)
{
    OGRLayerH l = GDALDatasetCreateLayer(ds, name, srs, gtype, NULL);
    if (l == NULL)
        return err_set(e, ERR_IO, "gen-demo: cannot create layer '%s' in '%s': %s", name, path,
                       CPLGetLastErrorMsg());
    for (int i = 0; i < nf; i++) {
        OGRFieldDefnH fd = OGR_Fld_Create(f[i].name, f[i].type);
        OGRErr oe = OGR_L_CreateField(l, fd, TRUE);
        OGR_Fld_Destroy(fd);
        if (oe != OGRERR_NONE)
            return err_set(e, ERR_IO, "gen-demo: cannot add field '%s' to layer '%s' of '%s'",
                           f[i].name, name, path);
    }
    *out = l;
    return ERR_OK;
}

/* Store feature 'f' (taking ownership of geometry 'geom') in layer 'l'. */
static int put_feature(OGRLayerH l, OGRFeatureH f, OGRGeometryH geom, const char *path,
                       const char *id, err_t *e)
{
    int rc = ERR_OK;
    OGR_F_SetGeometryDirectly(f, geom);
    if (OGR_L_CreateFeature(l, f) != OGRERR_NONE)
        rc = err_set(e, ERR_IO, "gen-demo: cannot write feature %s to '%s': %s", id, path,
                     CPLGetLastErrorMsg());
    OGR_F_Destroy(f);
    return rc;
}

static GDALDatasetH new_gpkg(const char *path, err_t *e)
{
    GDALDriverH drv = GDALGetDriverByName("GPKG");
    GDALDatasetH ds = drv ? GDALCreate(drv, path, 0, 0, 0, GDT_Unknown, NULL) : NULL;
    if (ds == NULL)
        err_set(e, ERR_IO, "gen-demo: cannot create GeoPackage '%s': %s", path,
                CPLGetLastErrorMsg());
    return ds;
}

static int close_gpkg(GDALDatasetH ds, const char *path, int rc, err_t *e)
{
    if (ds == NULL) return rc;
    if (rc == ERR_OK && GDALDatasetCommitTransaction(ds) != OGRERR_NONE)
        rc = err_set(e, ERR_IO, "gen-demo: cannot commit '%s': %s", path, CPLGetLastErrorMsg());
    if (close_ds(ds) != CE_None && rc == ERR_OK)
        rc = err_set(e, ERR_IO, "gen-demo: cannot finish '%s': %s", path, CPLGetLastErrorMsg());
    return rc;
}

static int write_roads(const demo_t *d, const char *path, OGRSpatialReferenceH srs, err_t *e)
{
    static const field_t fields[] = {{"id", OFTString}, {"highway", OFTString},
                                     {"bridge", OFTString}, {"oneway", OFTString},
                                     {"surface", OFTString}};
    OGRLayerH l = NULL;
    int rc = ERR_OK;
    GDALDatasetH ds = new_gpkg(path, e);
    if (ds == NULL) return e->code;
    if ((rc = make_layer(ds, path, "roads", wkbLineString, srs, fields, 5, &l, e))) goto done;
    GDALDatasetStartTransaction(ds, FALSE);
    for (int j = 0; j < d->n_edges && rc == ERR_OK; j++) {
        const edge_t *x = &d->edges[j];
        char id[16];
        snprintf(id, sizeof id, "R%03d", j + 1);
        OGRFeatureH f = OGR_F_Create(OGR_L_GetLayerDefn(l));
        OGR_F_SetFieldString(f, 0, id);
        OGR_F_SetFieldString(f, 1, cls_name[x->cls]);
        OGR_F_SetFieldString(f, 2, x->bridge ? "yes" : "no");
        OGR_F_SetFieldString(f, 3, x->oneway ? "yes" : "no");
        OGR_F_SetFieldString(f, 4, x->paved ? "paved" : "unpaved");
        OGRGeometryH g = OGR_G_CreateGeometry(wkbLineString);
        for (int k = 0; k < x->nv; k++) {
            double gx, gy;
            to_crs(x->v[k], &gx, &gy);
            OGR_G_AddPoint_2D(g, gx, gy);
        }
        rc = put_feature(l, f, g, path, id, e);
    }
done:
    return close_gpkg(ds, path, rc, e);
}

static int write_points(GDALDatasetH ds, const char *path, const char *layer,
                        const site_t *s, int n, int with_capacity, int with_cost,
                        OGRSpatialReferenceH srs, err_t *e)
{
    field_t fields[4] = {{"id", OFTString}, {"name", OFTString}, {"capacity", OFTInteger},
                         {"cost", OFTReal}};
    int nf = 2 + with_capacity + with_cost;
    OGRLayerH l = NULL;
    int rc = make_layer(ds, path, layer, wkbPoint, srs, fields, nf, &l, e);
    for (int k = 0; k < n && rc == ERR_OK; k++) {
        OGRFeatureH f = OGR_F_Create(OGR_L_GetLayerDefn(l));
        OGR_F_SetFieldString(f, 0, s[k].id);
        OGR_F_SetFieldString(f, 1, s[k].name);
        if (with_capacity) OGR_F_SetFieldInteger(f, 2, s[k].capacity);
        if (with_cost) OGR_F_SetFieldDouble(f, 3, s[k].cost);
        OGRGeometryH g = OGR_G_CreateGeometry(wkbPoint);
        double gx, gy;
        to_crs(s[k].at, &gx, &gy);
        OGR_G_SetPoint_2D(g, 0, gx, gy);
        rc = put_feature(l, f, g, path, s[k].id, e);
    }
    return rc;
}

static int write_sites(const demo_t *d, const char *path, OGRSpatialReferenceH srs, err_t *e)
{
    int rc = ERR_OK;
    GDALDatasetH ds = new_gpkg(path, e);
    if (ds == NULL) return e->code;
    GDALDatasetStartTransaction(ds, FALSE);
    if ((rc = write_points(ds, path, "health_posts", d->hp, d->n_hp, 1, 0, srs, e))) goto done;
    if ((rc = write_points(ds, path, "candidates", d->cand, d->n_cand, 1, 1, srs, e))) goto done;
    rc = write_points(ds, path, "depots", d->dep, 2, 0, 0, srs, e);
done:
    return close_gpkg(ds, path, rc, e);
}

/* Four wards: the river splits east from west, and each bank is cut at a row.
 * Borders along the river follow its centre line, sampled at the same rows for
 * both neighbours, so the polygons share their edges exactly and tile the grid. */
static int write_districts(const demo_t *d, const char *path, OGRSpatialReferenceH srs,
                           err_t *e)
{
    static const field_t fields[] = {{"name", OFTString}};
    OGRLayerH l = NULL;
    int rc = ERR_OK;
    double cut_e = floor(d->town.r + 40), cut_w = floor(d->town.r - 45);
    GDALDatasetH ds = new_gpkg(path, e);
    if (ds == NULL) return e->code;
    if ((rc = make_layer(ds, path, "districts", wkbPolygon, srs, fields, 1, &l, e))) goto done;
    GDALDatasetStartTransaction(ds, FALSE);
    for (int w = 0; w < 4 && rc == ERR_OK; w++) {
        int east = w >= 2, north = w % 2 == 0;
        double cut = east ? cut_e : cut_w;
        double r0 = north ? 0 : cut, r1 = north ? cut : NY;
        double edge_c = east ? NX : 0;
        OGRGeometryH ring = OGR_G_CreateGeometry(wkbLinearRing);
        pt_t p;
        double gx, gy;
        /* Down the river from r0 to r1, at rows 0, 5, 10, ... and both cut rows
         * for every ward, so that neighbours share each vertex. */
        for (int r = (int)r0; r <= (int)r1; r++) {
            if (r % 5 != 0 && r != (int)cut_e && r != (int)cut_w) continue;
            p = (pt_t){river_col(d, r), r};
            to_crs(p, &gx, &gy);
            OGR_G_AddPoint_2D(ring, gx, gy);
        }
        to_crs((pt_t){edge_c, r1}, &gx, &gy);
        OGR_G_AddPoint_2D(ring, gx, gy);
        to_crs((pt_t){edge_c, r0}, &gx, &gy);
        OGR_G_AddPoint_2D(ring, gx, gy);
        to_crs((pt_t){river_col(d, r0), r0}, &gx, &gy);
        OGR_G_AddPoint_2D(ring, gx, gy);
        OGRGeometryH poly = OGR_G_CreateGeometry(wkbPolygon);
        OGR_G_AddGeometryDirectly(poly, ring);
        char name[NAME_LEN + 8];
        snprintf(name, sizeof name, "%s Ward", d->ward[w]);
        OGRFeatureH f = OGR_F_Create(OGR_L_GetLayerDefn(l));
        OGR_F_SetFieldString(f, 0, name);
        rc = put_feature(l, f, poly, path, name, e);
    }
done:
    return close_gpkg(ds, path, rc, e);
}

static int write_scenario(const demo_t *d, const char *path, err_t *e)
{
    /* The "bridge down" variant closes the first bridge written (bridge 1, on the
     * primary road through the town), by its road id as write_roads numbers it. */
    char bridge1[16] = "R001";
    for (int j = 0; j < d->n_edges; j++)
        if (d->edges[j].bridge) {
            snprintf(bridge1, sizeof bridge1, "R%03d", j + 1);
            break;
        }
    FILE *f = fopen(path, "w");
    if (f == NULL)
        return err_set(e, ERR_IO, "gen-demo: cannot write '%s': %s", path, strerror(errno));
    fprintf(f,
        "{ \"name\": \"%s (invented demo, seed %llu)\",\n"
        "  \"inputs\": { \"population\": \"population.tif\", \"landcover\": \"landcover.tif\",\n"
        "              \"elevation\": \"elevation.tif\", \"barriers\": \"barriers.tif\",\n"
        "              \"roads\": { \"path\": \"roads.gpkg\", \"layer\": \"roads\", "
        "\"id_field\": \"id\",\n"
        "                         \"class_field\": \"highway\", \"bridge_field\": \"bridge\",\n"
        "                         \"oneway_field\": \"oneway\" },\n"
        "              \"districts\": { \"path\": \"districts.gpkg\", \"layer\": \"districts\", "
        "\"name_field\": \"name\" } },\n"
        "  \"sites\": { \"existing\": { \"path\": \"sites.gpkg\", \"layer\": \"health_posts\", "
        "\"id_field\": \"id\",\n"
        "                           \"name_field\": \"name\", \"capacity_field\": \"capacity\" },\n"
        "             \"candidates\": { \"path\": \"sites.gpkg\", \"layer\": \"candidates\", "
        "\"id_field\": \"id\",\n"
        "                             \"name_field\": \"name\", \"capacity_field\": \"capacity\", "
        "\"cost_field\": \"cost\" },\n"
        "             \"depots\": { \"path\": \"sites.gpkg\", \"layer\": \"depots\", "
        "\"id_field\": \"id\", \"name_field\": \"name\" } },\n"
        "  \"travel\": { \"mode\": \"walk\", \"neighbours\": 8, "
        "\"walk\": { \"speed_kmh\": 5.0, \"slope\": true },\n"
        "              \"landcover_factors\": { \"10\": 1.0, \"20\": 1.0, \"30\": 0.6, "
        "\"40\": 0.4, \"50\": 1.0, \"60\": 0 } },\n"
        "  \"coverage\": { \"limit_min\": 60, \"bands_min\": [30, 60, 120] },\n"
        "  \"siting\": { \"model\": \"max_cover\", \"p\": 5, \"existing\": \"keep\", "
        "\"curve_max_p\": 10 }",
        DISTRICT_NAME, (unsigned long long)d->seed);
    /* Stock and shipments (docs/plan.md): food and shelter at their Sphere 2018
     * defaults plus soap; soap stock is set short on purpose so that the demo
     * shows an unmet-need table. Figures invented for the demo. */
    fputs(",\n"
        "  \"supply\": { \"days_of_cover\": 7, \"lead_time_days\": 2, \"buffer\": 0.1,\n"
        "    \"commodities\": [ { \"name\": \"food\" }, { \"name\": \"shelter\" },\n"
        "      { \"name\": \"soap\", \"unit\": \"kg\", \"rate\": \"per_person_day\", "
        "\"quantity\": 0.0083,\n"
        "        \"unit_kg\": 1, \"unit_m3\": 0.0012, \"pack_units\": 20, \"priority\": 1 } ],\n"
        "    \"fleet\": [\n"
        "      { \"name\": \"10 t lorry\", \"payload_kg\": 10000, \"volume_m3\": 40, "
        "\"count\": 6,\n"
        "        \"cost_per_hour\": 40, \"cost_per_km\": 1.2, \"loading_min\": 90, "
        "\"hours_available\": 60 },\n"
        "      { \"name\": \"4x4 pickup\", \"payload_kg\": 1000, \"volume_m3\": 4, "
        "\"count\": 4,\n"
        "        \"cost_per_hour\": 15, \"cost_per_km\": 0.4, \"loading_min\": 30, "
        "\"hours_available\": 60 } ],\n"
        "    \"depot_stock\": { \"D1\": { \"food\": 700000, \"shelter\": 480000, "
        "\"soap\": 6000 },\n"
        "                     \"D2\": { \"food\": 400000, \"shelter\": 300000, "
        "\"soap\": 2000 } } }", f);
    /* What-if variants (docs/whatif.md): the first bridge closed, and the rains. */
    fprintf(f, ",\n"
        "  \"variants\": [\n"
        "    { \"name\": \"bridge down\", \"close_roads\": { \"ids\": [\"%s\"] } },\n"
        "    { \"name\": \"rainy season\",\n"
        "      \"road_speed_factors\": { \"surface\": { \"unpaved\": 0.3 } } } ]", bridge1);
    fputs(" }\n", f);
    if (fclose(f) != 0)
        return err_set(e, ERR_IO, "gen-demo: cannot finish '%s': %s", path, strerror(errno));
    return ERR_OK;
}

/* ---- files and the command line --------------------------------------------------- */

static const char *const out_names[] = {"population.tif", "landcover.tif", "elevation.tif",
                                        "barriers.tif", "roads.gpkg", "sites.gpkg",
                                        "districts.gpkg", "scenario.json"};
#define N_OUT 8

/* Create 'dir' and its parents (like mkdir -p); then make sure we can write there. */
static int make_dir(const char *dir, err_t *e)
{
    char buf[4096];
    struct stat st;
    if (snprintf(buf, sizeof buf, "%s", dir) >= (int)sizeof buf)
        return err_set(e, ERR_USAGE, "gen-demo: --out path is too long");
    for (char *p = buf + 1;; p++) {
        if (*p == '/' || *p == '\0') {
            char keep = *p;
            *p = '\0';
            if (mkdir(buf, 0777) != 0 && errno != EEXIST)
                return err_set(e, ERR_IO, "gen-demo: cannot create folder '%s': %s", buf,
                               strerror(errno));
            *p = keep;
            if (keep == '\0') break;
        }
    }
    if (stat(dir, &st) != 0 || !S_ISDIR(st.st_mode))
        return err_set(e, ERR_IO, "gen-demo: '%s' is not a folder", dir);
    if (access(dir, W_OK | X_OK) != 0)
        return err_set(e, ERR_IO, "gen-demo: folder '%s' is not writable: %s", dir,
                       strerror(errno));
    return ERR_OK;
}

static void out_path(char *buf, size_t n, const char *dir, int k, int tmp)
{
    /* Temporary names keep the extension, which the GeoPackage driver wants. */
    snprintf(buf, n, "%s/%s%s", dir, tmp ? ".gen-demo-tmp-" : "", out_names[k]);
}

static int write_all(const demo_t *d, const char *dir, err_t *e)
{
    char tmp[N_OUT][4200], fin[4200];
    OGRSpatialReferenceH srs = OSRNewSpatialReference(NULL);
    int rc = ERR_OK;
    double nd = POP_NODATA;

    for (int k = 0; k < N_OUT; k++) {
        out_path(tmp[k], sizeof tmp[k], dir, k, 1);
        VSIUnlink(tmp[k]);   /* a leftover from an interrupted run */
    }
    if (srs == NULL || OSRImportFromEPSG(srs, EPSG) != OGRERR_NONE) {
        rc = err_set(e, ERR_INTERNAL, "gen-demo: PROJ does not know EPSG:%d: %s", EPSG,
                     CPLGetLastErrorMsg());
        goto done;
    }
    OSRSetAxisMappingStrategy(srs, OAMS_TRADITIONAL_GIS_ORDER);
    if ((rc = write_raster(tmp[0], "population", GDT_Float32, d->pop, &nd, srs, e))) goto done;
    if ((rc = write_raster(tmp[1], "land-cover", GDT_Byte, d->lc, NULL, srs, e))) goto done;
    if ((rc = write_raster(tmp[2], "elevation", GDT_Float32, d->elev, NULL, srs, e))) goto done;
    if ((rc = write_raster(tmp[3], "barrier", GDT_Byte, d->bar, NULL, srs, e))) goto done;
    if ((rc = write_roads(d, tmp[4], srs, e))) goto done;
    if ((rc = write_sites(d, tmp[5], srs, e))) goto done;
    if ((rc = write_districts(d, tmp[6], srs, e))) goto done;
    if ((rc = write_scenario(d, tmp[7], e))) goto done;
    /* Rename in order; scenario.json last, so it is newer than everything it names. */
    for (int k = 0; k < N_OUT; k++) {
        out_path(fin, sizeof fin, dir, k, 0);
        if (rename(tmp[k], fin) != 0) {
            rc = err_set(e, ERR_IO, "gen-demo: cannot rename '%s' to '%s': %s", tmp[k], fin,
                         strerror(errno));
            goto done;
        }
    }
done:
    if (rc != ERR_OK)
        for (int k = 0; k < N_OUT; k++) VSIUnlink(tmp[k]);
    OSRDestroySpatialReference(srs);
    return rc;
}

static void usage(FILE *f)
{
    fprintf(f, "usage: gen-demo --seed N --out DIR\n"
               "Writes the invented demo district (rasters, road and site layers, wards and\n"
               "scenario.json) into DIR, the same files for the same seed.\n");
}

static int parse_args(int argc, char **argv, uint64_t *seed, const char **out, int *help,
                      err_t *e)
{
    int have_seed = 0;
    *out = NULL;
    *help = 0;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            *help = 1;
            return ERR_OK;
        }
        if (strcmp(a, "--seed") != 0 && strcmp(a, "--out") != 0)
            return err_set(e, ERR_USAGE, "gen-demo: unknown argument '%s' (expected --seed N "
                           "--out DIR)", a);
        if (i + 1 >= argc || argv[i + 1][0] == '\0')
            return err_set(e, ERR_USAGE, "gen-demo: %s needs a value", a);
        const char *v = argv[++i];
        if (strcmp(a, "--out") == 0) {
            *out = v;
            continue;
        }
        char *end = NULL;
        errno = 0;
        unsigned long long s = strtoull(v, &end, 10);
        if (errno != 0 || end == v || *end != '\0' || v[0] == '-')
            return err_set(e, ERR_USAGE, "gen-demo: --seed '%s' is not a whole number from 0 "
                           "to 18446744073709551615", v);
        *seed = s;
        have_seed = 1;
    }
    if (!have_seed) return err_set(e, ERR_USAGE, "gen-demo: --seed N is required");
    if (*out == NULL) return err_set(e, ERR_USAGE, "gen-demo: --out DIR is required");
    return ERR_OK;
}

static void CPL_STDCALL quiet_gdal(CPLErr cls, CPLErrorNum num, const char *msg)
{
    (void)cls;
    (void)num;
    (void)msg;
}

int main(int argc, char **argv)
{
    err_t e = {0};
    demo_t *d = NULL;
    const char *out = NULL;
    uint64_t seed = 0;
    int help = 0, rc;

    if ((rc = parse_args(argc, argv, &seed, &out, &help, &e)) != ERR_OK) goto done;
    if (help) {
        usage(stdout);
        return EXIT_OK;
    }
    if ((rc = make_dir(out, &e)) != ERR_OK) goto done;

    d = calloc(1, sizeof *d);
    if (d != NULL) {
        d->pop = calloc((size_t)NX * NY, sizeof *d->pop);
        d->elev = calloc((size_t)NX * NY, sizeof *d->elev);
        d->lc = calloc((size_t)NX * NY, 1);
        d->bar = calloc((size_t)NX * NY, 1);
    }
    if (d == NULL || !d->pop || !d->elev || !d->lc || !d->bar) {
        rc = err_set(&e, ERR_NOMEM, "gen-demo: out of memory");
        goto done;
    }
    d->seed = seed;
    d->rng.s = seed ^ 0x5EED0D15C0FFEEULL;
    if ((rc = build(d, &e)) != ERR_OK) goto done;

    GDALAllRegister();
    CPLSetErrorHandler(quiet_gdal);
    /* GeoPackages record a change date; pin it so reruns give the same files. */
    CPLSetConfigOption("OGR_CURRENT_DATE", "2026-01-01T00:00:00Z");
    if ((rc = write_all(d, out, &e)) != ERR_OK) goto done;

    int nb = 0;
    for (int j = 0; j < d->n_edges; j++) nb += d->edges[j].bridge;
    printf("gen-demo: %s (seed %llu): %d x %d cells of %.0f m, %.0f people (town %s %.0f, "
           "%d villages), %d roads with %d bridges, %d health posts, %d candidates, 2 depots "
           "-> %s\n",
           DISTRICT_NAME, (unsigned long long)seed, NX, NY, CELL_M, d->total_people, TOWN_NAME,
           d->town_people, d->n_vill, d->n_edges, nb, d->n_hp, d->n_cand, out);
done:
    if (d != NULL) {
        free(d->pop);
        free(d->elev);
        free(d->lc);
        free(d->bar);
        free(d);
    }
    if (rc != ERR_OK) {
        /* One line, always; usage errors point at --help. */
        fprintf(stderr, "%s%s\n", e.msg, rc == ERR_USAGE ? " (see gen-demo --help)" : "");
        return err_exit_status(rc);
    }
    return EXIT_OK;
}

/* test_depots: depot <-> site vehicle travel on small hand-built road networks.
 * Every expected value is worked by hand in the comments (length / speed). */
#include <math.h>
#include <stdlib.h>

#include <igraph.h>

#include "check.h"
#include "depots.h"

/* A (0,0) - B (1000,0) primary two-way; B -> C (2000,0) primary ONE WAY;
 * C - D (3000,0) footway (closed to vehicles); B - F (1500,1000) - C track
 * (the way back from C); G (0,5000) - H (1000,5000) primary, an island. */
static double nx_[] = {0, 1000, 2000, 3000, 1500, 0, 1000};
static double ny_[] = {0, 0, 0, 0, 1000, 5000, 5000};
static road_class_count_t classes_[3];
static road_seg_t segs_[6];

static void make_roads(roads_t *r)
{
    double diag = hypot(500, 1000);   /* 1118.034 m */
    memset(r, 0, sizeof *r);
    memset(classes_, 0, sizeof classes_);
    classes_[0].name = "primary";
    classes_[0].vehicle_mps = 10;
    classes_[1].name = "footway";
    classes_[1].vehicle_mps = 0;
    classes_[2].name = "track";
    classes_[2].vehicle_mps = 5;
    segs_[0] = (road_seg_t){0, 1, 0, 0, 1000, 0};
    segs_[1] = (road_seg_t){1, 2, 0, 1, 1000, ROAD_ONEWAY};
    segs_[2] = (road_seg_t){2, 3, 1, 2, 1000, 0};
    segs_[3] = (road_seg_t){1, 4, 2, 3, diag, 0};
    segs_[4] = (road_seg_t){4, 2, 2, 4, diag, 0};
    segs_[5] = (road_seg_t){5, 6, 0, 5, 1000, 0};
    r->x = nx_;
    r->y = ny_;
    r->n_nodes = 7;
    r->segs = segs_;
    r->n_segs = 6;
    r->classes = classes_;
    r->n_classes = 3;
}

static void test_hand_worked(void)
{
    roads_t r;
    depots_travel_t t;
    err_t e = {0};
    double dx[] = {0}, dy[] = {-10};
    double sx[] = {2000, 3000, 1000, 0}, sy[] = {-20, 0, 5010, 0};
    double ap = 5 / 3.6;              /* access legs at 5 km/h */
    double diag = hypot(500, 1000);

    make_roads(&r);
    CHECK(depots_travel(&r, 0, dx, dy, 1, sx, sy, 4, ap, 500, &t, &e) == ERR_OK);
    CHECK(t.from_seg[0] == 0);
    CHECK_NEAR(t.from_access_m[0], 10, 1e-9);
    /* Site 0 joins C by 20 m. Out: 10 m + 20 m at 5 km/h = 21.6 s, plus A-B-C
     * 2000 m at 10 m/s = 200 s: 221.6 s over 2030 m. */
    CHECK(t.to_seg[0] == 1 || t.to_seg[0] == 4);   /* at C, where both end */
    CHECK_NEAR(t.out_s[0], 221.6, 1e-9);
    CHECK_NEAR(t.out_m[0], 2030, 1e-9);
    /* Back: B -> C is one way, so C-F-B on the track (2 x 1118.034 m at 5 m/s =
     * 447.214 s) then B-A (100 s), plus the same 21.6 s of access legs. */
    CHECK_NEAR(t.back_s[0], 2 * diag / 5 + 100 + 21.6, 1e-9);
    CHECK_NEAR(t.back_m[0], 2 * diag + 1000 + 30, 1e-9);
    /* Site 1 stands at D, but D lies only on a footway: the nearest vehicle node
     * is C, 1000 m away, beyond the 500 m allowed: no road. */
    CHECK(t.to_seg[1] == -1);
    CHECK(isinf(t.out_s[1]) && isinf(t.back_s[1]) && isinf(t.out_m[1]));
    /* Site 2 joins H on the island: no path. */
    CHECK(t.to_seg[2] == 5);
    CHECK(isinf(t.out_s[2]) && isinf(t.back_s[2]));
    /* Site 3 stands on A: only the depot's 10 m leg, 7.2 s. */
    CHECK_NEAR(t.out_s[3], 7.2, 1e-9);
    CHECK_NEAR(t.back_s[3], 7.2, 1e-9);
    CHECK_NEAR(t.out_m[3], 10, 1e-9);
    depots_travel_destroy(&t);

    /* With 1500 m allowed, site 1 joins C by a 1000 m leg (720 s at 5 km/h). */
    CHECK(depots_travel(&r, 0, dx, dy, 1, sx, sy, 4, ap, 1500, &t, &e) == ERR_OK);
    CHECK(t.to_seg[1] == 1 || t.to_seg[1] == 4);
    CHECK_NEAR(t.out_s[1], 200 + (10 + 1000) / ap, 1e-9);
    depots_travel_destroy(&t);

    /* Depots as the targets: the matrix is simply transposed in meaning. */
    CHECK(depots_travel(&r, 0, sx, sy, 1, dx, dy, 1, ap, 500, &t, &e) == ERR_OK);
    CHECK_NEAR(t.out_s[0], 2 * diag / 5 + 100 + 21.6, 1e-9);
    CHECK_NEAR(t.back_s[0], 221.6, 1e-9);
    depots_travel_destroy(&t);
}

/* Points between nodes join the nearest point of the segment, which splits it. */
static void test_on_segment(void)
{
    roads_t r;
    depots_travel_t t;
    err_t e = {0};
    double dx[] = {0}, dy[] = {-10};
    double sx[] = {500, 1500, 300}, sy[] = {30, -30, -5};
    double ap = 5 / 3.6, diag = hypot(500, 1000);

    make_roads(&r);
    CHECK(depots_travel(&r, 0, dx, dy, 1, sx, sy, 3, ap, 500, &t, &e) == ERR_OK);
    /* Site 0 at (500, 30) joins A-B halfway, 30 m off: 500 m at 10 m/s = 50 s,
     * plus (10 + 30) m at 5 km/h = 28.8 s. */
    CHECK(t.to_seg[0] == 0);
    CHECK_NEAR(t.to_access_m[0], 30, 1e-9);
    CHECK_NEAR(t.out_s[0], 78.8, 1e-9);
    CHECK_NEAR(t.back_s[0], 78.8, 1e-9);
    CHECK_NEAR(t.out_m[0], 540, 1e-9);
    /* Site 1 at (1500, -30) joins the one-way B -> C halfway: out A-B-p = 150 s;
     * back it must drive on to C (50 s), then C-F-B (447.214 s) and B-A (100 s). */
    CHECK(t.to_seg[1] == 1);
    CHECK_NEAR(t.out_s[1], 150 + 28.8, 1e-9);
    CHECK_NEAR(t.back_s[1], 50 + 2 * diag / 5 + 100 + 28.8, 1e-9);
    /* Site 2 at (300, -5) shares A-B with the depot's joint at A: 300 m = 30 s
     * plus (10 + 5) m at 5 km/h = 10.8 s. */
    CHECK_NEAR(t.out_s[2], 40.8, 1e-9);
    depots_travel_destroy(&t);

    /* Two points on one segment reach each other along it, not via its ends:
     * depot at (200, 10), site at (700, -10) on A-B: 500 m = 50 s + 20 m (14.4 s). */
    {
        double ex[] = {200}, ey[] = {10}, fx[] = {700}, fy[] = {-10};
        CHECK(depots_travel(&r, 0, ex, ey, 1, fx, fy, 1, ap, 500, &t, &e) == ERR_OK);
        CHECK_NEAR(t.out_s[0], 64.4, 1e-9);
        CHECK_NEAR(t.back_s[0], 64.4, 1e-9);
        CHECK_NEAR(t.out_m[0], 520, 1e-9);
        depots_travel_destroy(&t);
    }
}

/* The bucket index must find exactly the nearest open segment within reach:
 * compared with a brute-force scan over random segments (our own LCG). */
static void test_index_vs_scan(void)
{
    enum { NS = 400, NP = 80 };
    static double x[2 * NS], y[2 * NS];
    static road_seg_t sg[NS];
    static road_class_count_t cls[1];
    double px[NP], py[NP], reach[] = {0, 150, 300, 5000};
    unsigned long long st = 12345;
    roads_t r;
    depots_travel_t t;
    err_t e = {0};

#define RND() ((st = st * 6364136223846793005ULL + 1442695040888963407ULL), \
               (double)(st >> 11) / 9007199254740992.0)
    memset(cls, 0, sizeof cls);
    cls[0].vehicle_mps = 10;
    for (int i = 0; i < NS; i++) {
        double ang = RND() * 2 * M_PI, len = 50 + RND() * 450;
        x[2 * i] = RND() * 10000;
        y[2 * i] = RND() * 10000;
        x[2 * i + 1] = x[2 * i] + len * cos(ang);
        y[2 * i + 1] = y[2 * i] + len * sin(ang);
        sg[i] = (road_seg_t){2 * i, 2 * i + 1, 0, i, len, 0};
    }
    for (int k = 0; k < NP; k++) {
        px[k] = RND() * 12000 - 1000;
        py[k] = RND() * 12000 - 1000;
    }
#undef RND
    memset(&r, 0, sizeof r);
    r.x = x;
    r.y = y;
    r.n_nodes = 2 * NS;
    r.segs = sg;
    r.n_segs = NS;
    r.classes = cls;
    r.n_classes = 1;
    for (size_t m = 0; m < sizeof reach / sizeof reach[0]; m++) {
        int bad = 0;
        CHECK(depots_travel(&r, 0, px, py, 1, px, py, NP, 1, reach[m], &t, &e) == ERR_OK);
        for (int k = 0; k < NP; k++) {
            double best = INFINITY;
            for (int i = 0; i < NS; i++) {
                double ax = x[2 * i], ay = y[2 * i], dx = x[2 * i + 1] - ax, dy = y[2 * i + 1] - ay;
                double u = ((px[k] - ax) * dx + (py[k] - ay) * dy) / (dx * dx + dy * dy);
                u = u < 0 ? 0 : u > 1 ? 1 : u;
                best = fmin(best, hypot(px[k] - ax - u * dx, py[k] - ay - u * dy));
            }
            if (best <= reach[m]) bad += !(fabs(t.to_access_m[k] - best) < 1e-9);
            else bad += t.to_seg[k] != -1;
        }
        CHECK(bad == 0);
        depots_travel_destroy(&t);
    }
}

/* Lon/lat roads: the access legs are geodesic. 0.001 degree of latitude at the
 * equator is 110.574 m on WGS84 (1 degree = 110,574 m; from memory of the
 * standard meridian-arc tables). */
static void test_geographic(void)
{
    static double x[] = {30, 30.01}, y[] = {0, 0};
    static road_class_count_t cls[1];
    static road_seg_t sg[1];
    roads_t r;
    depots_travel_t t;
    err_t e = {0};
    double dx[] = {30}, dy[] = {0.001}, sx[] = {30.01}, sy[] = {0};

    memset(&r, 0, sizeof r);
    memset(cls, 0, sizeof cls);
    cls[0].vehicle_mps = 10;
    sg[0] = (road_seg_t){0, 1, 0, 0, 1113.2, 0};
    r.x = x;
    r.y = y;
    r.n_nodes = 2;
    r.segs = sg;
    r.n_segs = 1;
    r.classes = cls;
    r.n_classes = 1;
    CHECK(depots_travel(&r, 1, dx, dy, 1, sx, sy, 1, 1, 1000, &t, &e) == ERR_OK);
    CHECK_NEAR(t.from_access_m[0], 110.574, 0.01);
    CHECK_NEAR(t.to_access_m[0], 0, 1e-9);
    CHECK_NEAR(t.out_s[0], 111.32 + t.from_access_m[0], 1e-9);
    depots_travel_destroy(&t);
}

static void test_edges_and_errors(void)
{
    roads_t r;
    depots_travel_t t;
    err_t e = {0};
    double px[] = {0}, py[] = {0};

    /* No roads at all: every time is INFINITY, not an error. */
    CHECK(depots_travel(NULL, 0, px, py, 1, px, py, 1, 1, 100, &t, &e) == ERR_OK);
    CHECK(isinf(t.out_s[0]) && t.from_seg[0] == -1);
    depots_travel_destroy(&t);
    /* No depots: an empty matrix. */
    make_roads(&r);
    CHECK(depots_travel(&r, 0, px, py, 0, px, py, 1, 1, 100, &t, &e) == ERR_OK);
    CHECK(t.n_from == 0 && t.n_to == 1);
    depots_travel_destroy(&t);
    depots_travel_destroy(NULL);

    CHECK(depots_travel(&r, 0, px, py, 1, px, py, 1, 0, 100, &t, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "access speed must be > 0");
    CHECK(depots_travel(&r, 0, px, py, 1, px, py, 1, 1, -1, &t, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "access leg");
    segs_[2].b = 99;
    CHECK(depots_travel(&r, 0, px, py, 1, px, py, 1, 1, 100, &t, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "road segment 2");
    CHECK(t.out_s == NULL);
}

int main(void)
{
    /* Unreachable islands are expected here; main does the same for the CLI. */
    igraph_set_warning_handler(igraph_warning_handler_ignore);
    test_hand_worked();
    test_on_segment();
    test_index_vs_scan();
    test_geographic();
    test_edges_and_errors();
    return CHECK_DONE("test_depots");
}

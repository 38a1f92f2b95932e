/* test_site: the "siting" scenario section and inputs.tables (defaults, units,
 * every refusal with its message), candidate generation on a hand-made grid and
 * road (positions and people counted by hand below), and the site stage on the
 * five villages through the table input (values worked out on paper, the same
 * line as tests/test_cover.c and test_median.c), outputs included. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "candidates.h"
#include "check.h"
#include "scen_siting.h"
#include "scenario.h"
#include "site.h"

static const char *BAD = "case/bad.json";

static void refuse(const char *json, int code, const char *sub)
{
    scen_t *s = (scen_t *)1;
    err_t e = {0, ""};
    CHECK(scen_parse(json, BAD, &s, &e) == code);
    CHECK(e.code == code);
    CHECK(s == NULL);
    CHECK_STR_HAS(e.msg, sub);
}

#define GRID "{\"inputs\": {\"population\": \"p.tif\"}, "

static void test_siting_keys(void)
{
    scen_t *s = NULL;
    err_t e = {0, ""};

    /* Defaults. */
    CHECK(scen_parse(GRID "\"siting\": {\"p\": 3}}", "d/x.json", &s, &e) == ERR_OK);
    if (s != NULL) {
        const struct scen_siting *st = s->siting;
        CHECK(st != NULL && st->present);
        CHECK(st->model == SCEN_SITE_MAX_COVER && st->p == 3);
        CHECK(isinf(st->budget) && isnan(st->limit_s) && isnan(st->limit_cost));
        CHECK(st->target_share == 1 && st->min_fixed_cost == 0 && st->single_source == 0);
        CHECK(st->cost_rate == 1 && st->penalty == 0 && st->existing == SCEN_EXISTING_KEEP);
        CHECK(st->aggregate_cells == 1 && st->curve_max_p == -1);
        CHECK(st->time_limit_s == 600 && st->gap == 0 && st->generate == SCEN_GEN_NONE);
    }
    scen_free(s);
    s = NULL;
    /* Every key, minutes to seconds. */
    CHECK(scen_parse(GRID "\"siting\": {\"model\": \"capacitated\", \"p\": 2, \"budget\": 5000, "
                     "\"limit_min\": 45, \"minimise\": \"fixed_cost\", \"assignment\": \"single\", "
                     "\"assignment_cost_rate\": 0.5, \"penalty_per_person\": 1e6, "
                     "\"existing\": \"may_close\", \"aggregate_cells\": 4, \"curve_max_p\": 7, "
                     "\"time_limit_s\": 30, \"gap\": 0.01, \"candidates\": {\"generate\": "
                     "\"along_roads\", \"spacing_m\": 800, \"min_spacing_m\": 400, \"near_m\": 300, "
                     "\"min_people\": 20, \"capacity\": 5000, \"fixed_cost\": 100, \"max\": 60}}}",
                     "d/x.json", &s, &e) == ERR_OK);
    if (s != NULL) {
        const struct scen_siting *st = s->siting;
        CHECK(st->model == SCEN_SITE_CAPACITATED && st->p == 2 && st->budget == 5000);
        CHECK_NEAR(st->limit_s, 45 * 60, 1e-9);
        CHECK(st->min_fixed_cost == 1 && st->single_source == 1 && st->cost_rate == 0.5);
        CHECK(st->penalty == 1e6 && st->existing == SCEN_EXISTING_MAY_CLOSE);
        CHECK(st->aggregate_cells == 4 && st->curve_max_p == 7 && st->time_limit_s == 30);
        CHECK(st->gap == 0.01 && st->generate == SCEN_GEN_ALONG_ROADS && st->spacing_m == 800);
        CHECK(st->min_spacing_m == 400 && st->near_m == 300 && st->min_people == 20);
        CHECK(st->gen_capacity == 5000 && st->gen_fixed_cost == 100 && st->gen_max == 60);
    }
    scen_free(s);
    s = NULL;
    /* No siting section: NULL. */
    CHECK(scen_parse(GRID "\"name\": \"n\"}", "d/x.json", &s, &e) == ERR_OK);
    CHECK(s != NULL && s->siting == NULL);
    scen_free(s);

    refuse(GRID "\"siting\": {\"model\": \"p_median\"}}", ERR_INPUT,
           "'siting.p' is required for model 'p_median'");
    refuse(GRID "\"siting\": {\"model\": \"max_cover\"}}", ERR_INPUT,
           "needs 'siting.p' (sites to open) or 'siting.budget'");
    refuse(GRID "\"siting\": {\"model\": \"nearest\", \"p\": 1}}", ERR_INPUT, "siting.model");
    refuse(GRID "\"siting\": {\"p\": 0}}", ERR_INPUT, "siting.p");
    refuse(GRID "\"siting\": {\"p\": 1.5}}", ERR_INPUT, "siting.p");
    refuse(GRID "\"siting\": {\"p\": 1, \"budget\": -1}}", ERR_INPUT, "siting.budget");
    refuse(GRID "\"siting\": {\"p\": 1, \"gap\": 0.9}}", ERR_INPUT, "siting.gap");
    refuse(GRID "\"siting\": {\"p\": 1, \"time_limit_s\": 0}}", ERR_INPUT, "siting.time_limit_s");
    refuse(GRID "\"siting\": {\"p\": 1, \"limit_min\": 0}}", ERR_INPUT, "siting.limit_min");
    refuse(GRID "\"siting\": {\"p\": 1, \"assignment_cost_rate\": 0}}", ERR_INPUT,
           "siting.assignment_cost_rate");
    refuse(GRID "\"siting\": {\"p\": 1, \"aggregate_cells\": 2}}", ERR_INPUT,
           "applies to 'p_median' and 'capacitated' only");
    refuse(GRID "\"siting\": {\"p\": 1, \"pp\": 2}}", ERR_INPUT, "unknown key 'siting.pp'");
    refuse(GRID "\"siting\": {\"p\": 1, \"candidates\": {\"spacing_m\": 100}}}", ERR_INPUT,
           "siting.candidates.generate");
    refuse(GRID "\"siting\": {\"p\": 1, \"candidates\": {\"generate\": \"junctions\", "
           "\"spacing_m\": 1}}}", ERR_INPUT, "siting.candidates.spacing_m");
}

static void test_tables_keys(void)
{
    scen_t *s = NULL;
    err_t e = {0, ""};

    CHECK(scen_parse("{\"inputs\": {\"tables\": {\"edges\": \"e.csv\", \"directed\": true, "
                     "\"demand\": \"d.csv\", \"sites\": \"/abs/s.csv\"}}}", "dir/x.json", &s,
                     &e) == ERR_OK);
    if (s != NULL) {
        CHECK(s->population == NULL);
        CHECK(strcmp(s->table_edges, "dir/e.csv") == 0);
        CHECK(strcmp(s->table_demand, "dir/d.csv") == 0);
        CHECK(strcmp(s->table_sites, "/abs/s.csv") == 0);
        CHECK(s->table_matrix == NULL && s->table_directed == 1);
    }
    scen_free(s);
    s = NULL;
    CHECK(scen_parse("{\"inputs\": {\"tables\": {\"matrix\": \"m.csv\", \"demand\": \"d.csv\", "
                     "\"sites\": \"s.csv\"}}}", "x.json", &s, &e) == ERR_OK);
    CHECK(s != NULL && s->table_matrix != NULL && s->table_edges == NULL);
    scen_free(s);

    refuse("{\"inputs\": {\"tables\": {\"demand\": \"d.csv\", \"sites\": \"s.csv\"}}}", ERR_INPUT,
           "needs exactly one of 'edges'");
    refuse("{\"inputs\": {\"tables\": {\"edges\": \"e\", \"matrix\": \"m\", \"demand\": \"d\", "
           "\"sites\": \"s\"}}}", ERR_INPUT, "needs exactly one of 'edges'");
    refuse("{\"inputs\": {\"tables\": {\"edges\": \"e\", \"sites\": \"s\"}}}", ERR_INPUT,
           "missing required key 'inputs.tables.demand'");
    refuse("{\"inputs\": {\"tables\": {\"matrix\": \"m\", \"directed\": false, \"demand\": \"d\", "
           "\"sites\": \"s\"}}}", ERR_INPUT, "applies to 'edges' only");
    refuse("{\"inputs\": {\"population\": \"p.tif\", \"tables\": {\"edges\": \"e\", \"demand\": "
           "\"d\", \"sites\": \"s\"}}}", ERR_INPUT, "not both");
    refuse("{\"inputs\": {}}", ERR_INPUT, "missing required key 'inputs.population'");
    refuse("{\"inputs\": {\"tables\": {\"edges\": \"e\", \"demand\": \"d\", \"sites\": \"s\", "
           "\"weights\": \"w\"}}}", ERR_INPUT, "unknown key 'inputs.tables.weights'");
}

/* A 10 x 10 grid of 100 m cells, origin (0, 1000) top-left; 10 persons in every
 * cell of columns 0-4. Roads: node 0 (50, 950), node 1 (950, 950), node 2
 * (50, 50); segments 0-1 and 0-2, 900 m each; all three nodes are line ends. */
static void make_world(grid_t *g, roads_t *r, double *people, double *dx, double *dy,
                       double *area, double *rx, double *ry, uint8_t *junction, road_seg_t *segs)
{
    memset(g, 0, sizeof *g);
    memset(r, 0, sizeof *r);
    g->nx = g->ny = 10;
    g->gt[0] = 0;
    g->gt[1] = 100;
    g->gt[3] = 1000;
    g->gt[5] = -100;
    for (int c = 0; c < 100; c++) people[c] = (c % 10) < 5 ? 10 : 0;
    for (int k = 0; k < 10; k++) {
        dx[k] = dy[k] = 100;
        area[k] = 1e4;
    }
    g->people = people;
    g->row_dx_m = dx;
    g->row_dy_m = dy;
    g->row_area_m2 = area;
    rx[0] = 50, ry[0] = 950, rx[1] = 950, ry[1] = 950, rx[2] = 50, ry[2] = 50;
    junction[0] = junction[1] = junction[2] = 1;
    segs[0] = (road_seg_t){0, 1, 0, 0, 900, 0};
    segs[1] = (road_seg_t){0, 2, 0, 0, 900, 0};
    r->x = rx;
    r->y = ry;
    r->node_junction = junction;
    r->n_nodes = 3;
    r->segs = segs;
    r->n_segs = 2;
}

static void test_candidates(void)
{
    grid_t g;
    roads_t r;
    double people[100], dx[10], dy[10], area[10], rx[3], ry[3];
    uint8_t junction[3], barrier[100] = {0};
    road_seg_t segs[2];
    cand_opts_t o = {CAND_JUNCTIONS, 300, 0, 100, 1, 100, INFINITY, 0};
    points_t *p = NULL, avoid = {0};
    double ax = 50, ay = 950;
    err_t e = {0, ""};

    make_world(&g, &r, people, dx, dy, area, rx, ry, junction, segs);
    /* Junctions, people within 100 m (a 3 x 3 window): node 0 in cell (0,0) has
     * 4 populated cells = 40; node 1 in cell (9,0) has none (dropped); node 2 in
     * cell (0,9) has 40. */
    CHECK(candidates_generate(&g, &r, NULL, &o, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 2);
    if (p != NULL && p->n == 2) {
        CHECK(strcmp(p->id[0], "G0001") == 0 && p->x[0] == 50 && p->y[0] == 950);
        CHECK(p->cell[0] == 0 && p->cell[1] == 90);
        CHECK(isinf(p->capacity[0]) && p->cost[0] == 0 && isinf(p->storage_m3[0]));
        CHECK_STR_HAS(p->name[0], "road junction, 40 people");
    }
    points_free(p);
    /* 900 m apart: a minimum spacing of 1000 m keeps only the first. */
    o.min_spacing_m = 1000;
    CHECK(candidates_generate(&g, &r, NULL, &o, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 1);
    points_free(p);
    /* An existing site on node 0 pushes it out; node 2 stays. */
    o.min_spacing_m = 100;
    avoid.n = 1;
    avoid.x = &ax;
    avoid.y = &ay;
    CHECK(candidates_generate(&g, &r, &avoid, &o, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 1 && p->cell[0] == 90);
    points_free(p);
    /* Along the roads every 300 m: (350,950) 60 people, (650,950) and (950,950)
     * none, then down the second segment (50,650) 60, (50,350) 60, (50,50) 40.
     * Most people first, ties in the order found. */
    o.generate = CAND_ALONG_ROADS;
    o.min_spacing_m = 0;
    CHECK(candidates_generate(&g, &r, NULL, &o, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 4);
    if (p != NULL && p->n == 4) {
        CHECK_NEAR(p->x[0], 350, 1e-9);
        CHECK_NEAR(p->y[0], 950, 1e-9);
        CHECK_NEAR(p->y[1], 650, 1e-9);
        CHECK_NEAR(p->y[2], 350, 1e-9);
        CHECK_NEAR(p->y[3], 50, 1e-9);
        CHECK_STR_HAS(p->name[0], "along road, 60 people");
    }
    points_free(p);
    /* max = 2 keeps the best two; a barrier cell drops the point on it. */
    o.max = 2;
    barrier[3] = 1;   /* cell (3, 0) holds (350, 950) */
    g.barrier = barrier;
    CHECK(candidates_generate(&g, &r, NULL, &o, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 2);
    if (p != NULL && p->n == 2) CHECK_NEAR(p->y[0], 650, 1e-9);
    points_free(p);
    /* A min_people above everything leaves an empty list, not an error. */
    o.min_people = 1e6;
    CHECK(candidates_generate(&g, &r, NULL, &o, &p, &e) == ERR_OK);
    CHECK(p != NULL && p->n == 0);
    points_free(p);
    /* No roads. */
    p = (points_t *)1;
    CHECK(candidates_generate(&g, NULL, NULL, &o, &p, &e) == ERR_INPUT);
    CHECK(p == NULL);
    CHECK_STR_HAS(e.msg, "has no roads");
    o.spacing_m = 0;
    CHECK(candidates_generate(&g, &r, NULL, &o, &p, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "spacing_m");
}

static int write_file(const char *dir, const char *name, const char *text)
{
    char path[512];
    FILE *f;
    snprintf(path, sizeof path, "%s/%s", dir, name);
    f = fopen(path, "w");
    if (f == NULL) return -1;
    fputs(text, f);
    return fclose(f);
}

/* Run 'siting' on the five villages; returns the result (caller destroys). */
static int run_villages(const char *dir, const char *tables, const char *siting,
                        site_data_t *d, site_result_t *r, scen_t **sp, err_t *e)
{
    char json[1024], path[512];
    int rc;

    snprintf(json, sizeof json, "{\"inputs\": {\"tables\": %s}, \"siting\": %s}", tables, siting);
    snprintf(path, sizeof path, "%s/v.json", dir);
    *sp = NULL;
    rc = scen_parse(json, path, sp, e);
    if (rc == ERR_OK) rc = site_prepare_tables(*sp, d, e);
    if (rc == ERR_OK) rc = site_run(*sp, d, 1, r, e);
    return rc;
}

static void test_villages(const char *dir)
{
    static const char *NET = "{\"edges\": \"e.csv\", \"demand\": \"d.csv\", \"sites\": \"s.csv\"}";
    site_data_t d;
    site_result_t r;
    scen_t *s = NULL;
    err_t e = {0, ""};
    cJSON *sum;
    char path[512];

    write_file(dir, "e.csv", "from,to,cost\nA,B,600\nB,C,600\nC,D,600\nD,E,600\n");
    write_file(dir, "d.csv", "id,weight\nA,100\nB,300\nC,200\nD,50\nE,400\n");
    write_file(dir, "s.csv", "id,capacity,fixed_cost,state\nA,,0,\nB,,0,\nC,,0,\nD,,0,\nE,,0,open\n");

    /* Max covering within 600 s, E kept: before = D + E = 450; p = 1 adds B
     * (A, B, C = 600), after = 1,050; curve p = 1..2: 1050, 1050. */
    CHECK(run_villages(dir, NET, "{\"p\": 1, \"limit\": 600, \"curve_max_p\": 2}", &d, &r, &s,
                       &e) == ERR_OK);
    CHECK_NEAR(r.before_covered, 450, 1e-9);
    CHECK(r.before_sites == 1);
    CHECK_NEAR(r.plan.served_weight, 1050, 1e-9);
    CHECK_NEAR(r.plan.served_weight + r.plan.unserved_weight, d.total_people, 1e-9);
    CHECK_NEAR(d.total_people, 1050, 1e-9);
    CHECK(r.n_curve == 2 && r.curve != NULL);
    if (r.curve != NULL) CHECK_NEAR(r.curve[0].covered, 1050, 1e-9);
    CHECK(d.n_existing == 1 && d.n_layer == 4 && !d.is_grid);
    /* Outputs and summary keys. */
    sum = cJSON_CreateObject();
    CHECK(site_write(dir, s, &d, &r, sum, &e) == ERR_OK);
    CHECK(cJSON_GetObjectItem(sum, "site") != NULL);
    CHECK_NEAR(cJSON_GetObjectItem(sum, "people_covered")->valuedouble, 1050, 1e-9);
    CHECK(strcmp(cJSON_GetObjectItem(sum, "model")->valuestring, "max_cover") == 0);
    CHECK(strcmp(cJSON_GetObjectItem(sum, "status")->valuestring, "optimal") == 0);
    CHECK(cJSON_GetArraySize(cJSON_GetObjectItem(sum, "open_sites")) == 2);
    cJSON_Delete(sum);
    snprintf(path, sizeof path, "%s/assignment.csv", dir);
    CHECK(access(path, F_OK) == 0);
    snprintf(path, sizeof path, "%s/coverage_curve.csv", dir);
    CHECK(access(path, F_OK) == 0);
    site_result_destroy(&r);
    site_data_destroy(&d);
    scen_free(s);

    /* E may close: p = 2 covers everybody with B + D (or B + E); p-median p = 2
     * with every village free: B + E, 210,000 (tests/test_median.c). */
    CHECK(run_villages(dir, NET, "{\"model\": \"p_median\", \"p\": 2, \"existing\": \"may_close\"}",
                       &d, &r, &s, &e) == ERR_OK);
    CHECK_NEAR(r.plan.objective, 210000, 1e-6);
    CHECK_NEAR(r.objective_cells, 210000, 1e-6);
    CHECK(r.penalty > 2400);   /* automatic: 10 x the largest cost + 1 */
    site_result_destroy(&r);
    site_data_destroy(&d);
    scen_free(s);

    /* Capacitated with a cost rate: costs x 2 (per person), capacity 500 at B
     * and D only. Serving 1,000 of 1,050 is forced; the split flows respect
     * the capacities exactly. */
    write_file(dir, "c.csv", "id,capacity,fixed_cost\nB,500,0\nD,500,0\n");
    CHECK(run_villages(dir, "{\"edges\": \"e.csv\", \"demand\": \"d.csv\", \"sites\": \"c.csv\"}",
                       "{\"model\": \"capacitated\", \"limit\": 1200, \"assignment_cost_rate\": 2}",
                       &d, &r, &s, &e) == ERR_OK);
    CHECK_NEAR(r.plan.unserved_weight, 50, 1e-6);
    CHECK(r.flow != NULL);
    if (r.flow != NULL) {
        double load[2] = {0, 0};
        for (size_t k = 0; k < d.prob->n_pairs; k++) load[d.prob->pair_site[k]] += r.flow[k];
        CHECK_NEAR(load[0], 500, 1e-6);
        CHECK_NEAR(load[1], 500, 1e-6);
    }
    /* Least cost of serving 1,000 (units of 600 s): A reaches only B, E only D.
     * B holds A 100 + B 300 (cost 0 at home) + 100 of C; D holds E 400 + D 50 +
     * 50 of C; the other 50 of C stay out (leaving 50 of A or E instead costs
     * the same). Cost 100x600 (A) + 400x600 (E) + 150x600 (C) = 390,000
     * s-persons, x 2 = 780,000, plus 50 unserved at the automatic penalty. */
    CHECK_NEAR(r.plan.objective - 50 * r.penalty, 780000, 1e-3);
    site_result_destroy(&r);
    site_data_destroy(&d);
    scen_free(s);

    /* Refusals by the stage. */
    CHECK(run_villages(dir, NET, "{\"p\": 1}", &d, &r, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "needs 'siting.limit'");
    scen_free(s);
    CHECK(run_villages(dir, NET, "{\"p\": 1, \"limit\": 600, \"limit_min\": 10}", &d, &r, &s, &e) ==
          ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'siting.limit_min' is for grids");
    scen_free(s);
    CHECK(run_villages(dir, NET, "{\"p\": 5, \"limit\": 600}", &d, &r, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "p = 5 is larger than the 4 candidate sites");
    site_data_destroy(&d);
    scen_free(s);
    write_file(dir, "all_open.csv", "id,state\nA,open\nB,open\n");
    CHECK(run_villages(dir, "{\"edges\": \"e.csv\", \"demand\": \"d.csv\", \"sites\": \"all_open.csv\"}",
                       "{\"p\": 1, \"limit\": 600}", &d, &r, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "no candidate sites to choose from");
    site_data_destroy(&d);
    scen_free(s);
    CHECK(run_villages(dir, NET, "{\"p\": 1, \"limit\": 600, \"candidates\": {\"generate\": "
                       "\"junctions\"}}", &d, &r, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "needs a grid with roads");
    scen_free(s);
}

int main(void)
{
    char dir[] = "/tmp/test_site_XXXXXX";
    char cmd[600];

    test_siting_keys();
    test_tables_keys();
    test_candidates();
    if (mkdtemp(dir) == NULL) {
        perror("mkdtemp");
        return 1;
    }
    test_villages(dir);
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    if (system(cmd) != 0) fprintf(stderr, "could not remove %s\n", dir);
    CHECK(site_model_name(SCEN_SITE_P_MEDIAN)[0] == 'p');
    return CHECK_DONE("test_site");
}

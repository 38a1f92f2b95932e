/* test_scenario: reading scenario files. Unit conversions are checked against
 * hand arithmetic (1 km/h = 1/3.6 m/s exactly, 1 min = 60 s); the syntax error
 * position below is also what python3 3.11's json.loads reports for the text
 * (line 4, column 5), checked by hand. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "check.h"
#include "scenario.h"

#define EPS 1e-12

static const char *BAD = "case/bad.json";

/* Expect scen_parse to refuse 'json' with 'code' and a message that starts
 * with the file name and contains 'sub'. */
static void refuse(const char *json, int code, const char *sub)
{
    scen_t *s = (scen_t *)1;
    err_t e = {0, ""};
    int rc = scen_parse(json, BAD, &s, &e);

    CHECK(rc == code);
    CHECK(e.code == code);
    CHECK(s == NULL);
    CHECK(strncmp(e.msg, "case/bad.json: ", 15) == 0);
    CHECK_STR_HAS(e.msg, sub);
    scen_free(s);
}

static void test_full(void)
{
    const char *path = "tests/data/scenario/full.json";
    scen_t *s = NULL;
    err_t e = {0, ""};
    double w, v;

    CHECK(scen_load(path, &s, &e) == ERR_OK);
    if (s == NULL) {
        fprintf(stderr, "scen_load: %s\n", e.msg);
        return;
    }
    CHECK(strcmp(s->file, path) == 0);
    CHECK(strcmp(s->dir, "tests/data/scenario") == 0);
    CHECK(strcmp(s->name, "Lowmoor wet season") == 0);
    /* Relative paths join the file's folder; absolute ones stay. */
    CHECK(strcmp(s->population, "tests/data/scenario/pop.tif") == 0);
    CHECK(strcmp(s->landcover, "tests/data/scenario/rasters/lc.tif") == 0);
    CHECK(strcmp(s->elevation, "/srv/lowmoor/dem.tif") == 0);
    CHECK(strcmp(s->barriers, "tests/data/scenario/../water.tif") == 0);

    CHECK(strcmp(s->roads.path, "tests/data/scenario/roads.gpkg") == 0);
    CHECK(strcmp(s->roads.layer, "lines") == 0);
    CHECK(strcmp(s->roads.id_field, "osm_id") == 0);
    CHECK(s->roads.name_field == NULL && s->roads.capacity_field == NULL);
    CHECK(strcmp(s->road_class_field, "kind") == 0);
    CHECK(strcmp(s->road_bridge_field, "is_bridge") == 0);
    CHECK(s->road_tunnel_field == NULL); /* null: no such field */
    CHECK(strcmp(s->road_oneway_field, "dir") == 0);
    CHECK(strcmp(s->road_access_field, "limited") == 0);
    CHECK(strcmp(s->districts.path, "tests/data/scenario/districts.gpkg") == 0);
    CHECK(strcmp(s->districts.layer, "areas") == 0);
    CHECK(strcmp(s->districts.name_field, "label") == 0);

    CHECK(strcmp(s->existing.path, "tests/data/scenario/sites.gpkg") == 0);
    CHECK(strcmp(s->existing.layer, "clinics") == 0);
    CHECK(strcmp(s->existing.id_field, "code") == 0);
    CHECK(strcmp(s->existing.name_field, "title") == 0);
    CHECK(strcmp(s->existing.capacity_field, "cap") == 0);
    CHECK(strcmp(s->existing.cost_field, "cost") == 0);
    CHECK(strcmp(s->existing.storage_field, "store_m3") == 0);
    CHECK(strcmp(s->candidates.path, "tests/data/scenario/candidates.geojson") == 0);
    CHECK(s->candidates.layer == NULL && s->candidates.id_field == NULL);
    CHECK(strcmp(s->depots.path, "/srv/lowmoor/depots.gpkg") == 0);
    CHECK(strcmp(s->depots.id_field, "ref") == 0);

    CHECK(s->mode == SCEN_MODE_VEHICLE);
    CHECK(s->direction == SCEN_FROM_SITE);
    CHECK(s->neighbours == 16);
    CHECK_NEAR(s->walk_mps, 1.25, EPS); /* 4.5 km/h / 3.6 */
    CHECK(s->use_slope == 0);
    CHECK_NEAR(s->snap_tolerance_m, 2.5, 0);

    /* The given table replaces the built-in one entirely. */
    CHECK(s->n_road_classes == 3);
    CHECK(scen_road_speed(s, "sealed", &w, &v) == 1);
    CHECK_NEAR(w, 5 / 3.6, EPS);
    CHECK_NEAR(v, 20.0, EPS); /* 72 km/h */
    CHECK(scen_road_speed(s, "gravel", &w, &v) == 1);
    CHECK_NEAR(w, 1.25, EPS);
    CHECK_NEAR(v, 10.0, EPS); /* 36 km/h */
    CHECK(scen_road_speed(s, "footpath", &w, &v) == 1);
    CHECK_NEAR(w, 1.0, EPS);
    CHECK(v == 0.0); /* closed to vehicles */
    CHECK(scen_road_speed(s, "primary", &w, &v) == 0);
    CHECK_NEAR(w, 3 / 3.6, EPS);
    CHECK_NEAR(v, 5.0, EPS); /* unknown class: 18 km/h */
    CHECK(scen_road_speed(s, NULL, &w, &v) == 0);
    CHECK_NEAR(v, 5.0, EPS);

    /* Land-cover factors come sorted by class value. */
    CHECK(s->n_cover_factors == 4);
    CHECK(s->cover_factors[0].value == 10 && s->cover_factors[0].factor == 1.0);
    CHECK(s->cover_factors[1].value == 20 && s->cover_factors[1].factor == 2.0);
    CHECK(s->cover_factors[2].value == 40 && s->cover_factors[2].factor == 0.5);
    CHECK(s->cover_factors[3].value == 80 && s->cover_factors[3].factor == 0.0);
    CHECK(scen_cover_factor(s, 40) == 0.5);
    CHECK(scen_cover_factor(s, 80) == 0.0);
    CHECK(scen_cover_factor(s, 50) == 0.8); /* landcover_default */
    CHECK_NEAR(s->cover_default_factor, 0.8, 0);

    CHECK_NEAR(s->limit_s, 5400, 0); /* 90 min */
    CHECK(s->n_bands == 5);
    CHECK_NEAR(s->bands_s[0], 900, 0);
    CHECK_NEAR(s->bands_s[2], 2730, 0); /* 45.5 min */
    CHECK_NEAR(s->bands_s[4], 86400, 0); /* a day, the upper bound */
    scen_free(s);
}

static void test_defaults(void)
{
    scen_t *s = NULL;
    err_t e = {0, ""};
    double w, v;

    CHECK(scen_parse("{\"inputs\": {\"population\": \"pop.tif\"}}", "data/x/case.json", &s, &e) ==
          ERR_OK);
    if (s == NULL) {
        fprintf(stderr, "scen_parse: %s\n", e.msg);
        return;
    }
    CHECK(strcmp(s->name, "case") == 0); /* file base name without .json */
    CHECK(strcmp(s->dir, "data/x") == 0);
    CHECK(strcmp(s->population, "data/x/pop.tif") == 0);
    CHECK(s->landcover == NULL && s->elevation == NULL && s->barriers == NULL);
    CHECK(s->roads.path == NULL && s->districts.path == NULL);
    CHECK(s->existing.path == NULL && s->candidates.path == NULL && s->depots.path == NULL);
    CHECK(strcmp(s->road_class_field, "highway") == 0);
    CHECK(strcmp(s->road_bridge_field, "bridge") == 0);
    CHECK(strcmp(s->road_tunnel_field, "tunnel") == 0);
    CHECK(strcmp(s->road_oneway_field, "oneway") == 0);
    CHECK(s->road_access_field == NULL);
    CHECK(s->mode == SCEN_MODE_WALK);
    CHECK(s->direction == SCEN_TO_SITE);
    CHECK(s->neighbours == 8);
    CHECK_NEAR(s->walk_mps, 5 / 3.6, EPS);
    CHECK(s->use_slope == 1);
    CHECK_NEAR(s->snap_tolerance_m, 1.0, 0);
    CHECK_NEAR(s->unknown_walk_mps, 4 / 3.6, EPS);
    CHECK_NEAR(s->unknown_vehicle_mps, 20 / 3.6, EPS);
    CHECK(s->n_cover_factors == 0 && s->cover_factors == NULL);
    CHECK(s->cover_default_factor == 1.0);
    CHECK(scen_cover_factor(s, 10) == 1.0);
    CHECK_NEAR(s->limit_s, 3600, 0);
    CHECK(s->n_bands == 3);
    CHECK(s->bands_s[0] == 1800 && s->bands_s[1] == 3600 && s->bands_s[2] == 7200);

    /* The built-in table (docs/scenario.md; common practice, no source). */
    CHECK(s->n_road_classes == 22);
    for (size_t i = 1; i < s->n_road_classes; i++)
        CHECK(strcmp(s->road_classes[i - 1].name, s->road_classes[i].name) < 0);
    CHECK(scen_road_speed(s, "motorway", &w, &v) == 1);
    CHECK_NEAR(v, 100 / 3.6, EPS);
    CHECK(scen_road_speed(s, "primary", &w, &v) == 1);
    CHECK_NEAR(w, 5 / 3.6, EPS);
    CHECK_NEAR(v, 60 / 3.6, EPS);
    CHECK(scen_road_speed(s, "track", &w, &v) == 1);
    CHECK_NEAR(w, 4.5 / 3.6, EPS);
    CHECK_NEAR(v, 15 / 3.6, EPS);
    CHECK(scen_road_speed(s, "footway", &w, &v) == 1 && v == 0.0);
    CHECK(scen_road_speed(s, "steps", &w, &v) == 1);
    CHECK_NEAR(w, 2 / 3.6, EPS);
    CHECK(scen_road_speed(s, "Primary", &w, &v) == 0); /* class values match exactly */
    CHECK_NEAR(w, 4 / 3.6, EPS);
    for (size_t i = 0; i < s->n_road_classes; i++) {
        CHECK(s->road_classes[i].walk_mps > 0 && s->road_classes[i].walk_mps <= 20 / 3.6);
        CHECK(s->road_classes[i].vehicle_mps >= 0 && s->road_classes[i].vehicle_mps <= 200 / 3.6);
    }
    scen_free(s);

    /* Folders: none, the root, absolute. */
    CHECK(scen_parse("{\"inputs\": {\"population\": \"p.tif\"}}", "c.json", &s, &e) == ERR_OK);
    CHECK(s && strcmp(s->dir, ".") == 0 && strcmp(s->population, "p.tif") == 0);
    scen_free(s);
    CHECK(scen_parse("{\"inputs\": {\"population\": \"p.tif\"}}", "/c.json", &s, &e) == ERR_OK);
    CHECK(s && strcmp(s->dir, "/") == 0 && strcmp(s->population, "/p.tif") == 0);
    scen_free(s);
    CHECK(scen_parse("{\"inputs\": {\"population\": \"../p.tif\"}, \"name\": \"N\"}",
                     "/a/b/c.txt", &s, &e) == ERR_OK);
    CHECK(s && strcmp(s->population, "/a/b/../p.tif") == 0);
    CHECK(s && strcmp(s->name, "N") == 0);
    scen_free(s);
    CHECK(scen_parse("{\"inputs\": {\"population\": \"p.tif\"}}", "/a/b/c.txt", &s, &e) == ERR_OK);
    CHECK(s && strcmp(s->name, "c.txt") == 0);
    scen_free(s);
    /* Empty objects are fine and mean "all defaults". */
    CHECK(scen_parse("{\"inputs\": {\"population\": \"p.tif\"}, \"sites\": {}, \"travel\": "
                     "{\"walk\": {}, \"unknown_class\": {}, \"landcover_factors\": {}}, "
                     "\"coverage\": {}}", "c.json", &s, &e) == ERR_OK);
    CHECK(s && s->n_road_classes == 22 && s->n_bands == 3 && s->n_cover_factors == 0);
    scen_free(s);
    scen_free(NULL);
}

/* Write 'text' (n bytes) to dir/name and return the path in buf. */
static const char *write_file(const char *dir, const char *name, const char *text, size_t n,
                              char *buf, size_t size)
{
    FILE *f;

    snprintf(buf, size, "%s/%s", dir, name);
    f = fopen(buf, "wb");
    if (f == NULL) return buf;
    fwrite(text, 1, n, f);
    fclose(f);
    return buf;
}

static void test_files(void)
{
    static const char SYN_TEXT[] = "{\n  \"inputs\": {\n    \"population\": \"pop.tif\",\n  }\n}\n";
    static const char OK_TEXT[] = "{\"inputs\": {\"population\": \"pop.tif\"}}";
    char tmpl[] = "/tmp/test_scenario.XXXXXX", path[512], want[600];
    const char *dir = mkdtemp(tmpl);
    scen_t *s = (scen_t *)1;
    err_t e = {0, ""};

    CHECK(dir != NULL);
    if (dir == NULL) return;

    /* Missing file: an I/O error naming it. */
    snprintf(path, sizeof path, "%s/none.json", dir);
    CHECK(scen_load(path, &s, &e) == ERR_IO);
    CHECK(s == NULL);
    snprintf(want, sizeof want, "cannot read scenario '%s': No such file or directory", path);
    CHECK_STR_HAS(e.msg, want);

    /* A folder is not a scenario. */
    CHECK(scen_load(dir, &s, &e) == ERR_IO);
    CHECK_STR_HAS(e.msg, "cannot read scenario '");
    CHECK_STR_HAS(e.msg, "Is a directory");

    /* A file with a NUL byte in it (a binary file given by mistake). */
    write_file(dir, "bin.json", "{\n  \"a\0\": 1}", 13, path, sizeof path);
    CHECK(scen_load(path, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "contains a NUL byte at line 2, column 5");
    CHECK(strncmp(e.msg, path, strlen(path)) == 0);
    unlink(path);

    /* Something far too big to be a scenario (16 MiB + 1 byte of blanks). */
    {
        size_t big = 16u * 1024 * 1024 + 1;
        char *blank = malloc(big);
        CHECK(blank != NULL);
        if (blank != NULL) {
            memset(blank, ' ', big);
            write_file(dir, "big.json", blank, big, path, sizeof path);
            free(blank);
            CHECK(scen_load(path, &s, &e) == ERR_INPUT);
            CHECK_STR_HAS(e.msg, "is larger than 16777216 bytes");
            unlink(path);
        }
    }

    /* A syntax error: the message gives line and column in the file. */
    write_file(dir, "syn.json", SYN_TEXT, strlen(SYN_TEXT), path, sizeof path);
    CHECK(scen_load(path, &s, &e) == ERR_INPUT);
    snprintf(want, sizeof want, "%s: JSON syntax error at line 4, column 3", path);
    CHECK_STR_HAS(e.msg, want);
    unlink(path);

    /* Loading from a file resolves against its folder. */
    write_file(dir, "ok.json", OK_TEXT, strlen(OK_TEXT), path, sizeof path);
    CHECK(scen_load(path, &s, &e) == ERR_OK);
    if (s == NULL) fprintf(stderr, "scen_load: %s\n", e.msg);
    snprintf(want, sizeof want, "%s/pop.tif", dir);
    CHECK(s != NULL && strcmp(s->population, want) == 0);
    CHECK(s != NULL && strcmp(s->name, "ok") == 0);
    scen_free(s);
    unlink(path);

    CHECK(rmdir(dir) == 0);
}

static void test_refusals(void)
{
    /* Syntax, with the position python3's json.loads gives (line 4, column 5). */
    refuse("{\n  \"inputs\": {\n    \"population\": \"pop.tif\"\n    \"landcover\": \"lc.tif\"\n"
           "  }\n}\n", ERR_INPUT, "JSON syntax error at line 4, column 5");
    refuse("", ERR_INPUT, "is empty");
    refuse("[1, 2]", ERR_INPUT, "the top level must be a JSON object");

    /* Unknown keys, with and without a hint. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"walk\": {\"sped_kmh\": 4}}}",
           ERR_INPUT, "unknown key 'travel.walk.sped_kmh'; did you mean 'speed_kmh'?");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"Mode\": \"walk\"}}",
           ERR_INPUT, "unknown key 'travel.Mode'; did you mean 'mode'?");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"sitting\": {}}", ERR_INPUT,
           "unknown key 'sitting'; did you mean 'siting'?");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"outputs\": {}}", ERR_INPUT,
           "unknown key 'outputs'; allowed here: name, inputs, sites, travel, coverage, "
           "population_groups, siting, supply, variants");
    /* Population groups: a share or a raster, never both or neither. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"population_groups\": "
           "[{\"name\": \"u5\"}]}", ERR_INPUT,
           "key 'population_groups[0]' needs exactly one of 'share' or 'raster'");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"population_groups\": "
           "[{\"name\": \"u5\", \"share\": 1.5}]}", ERR_INPUT, "population_groups[0].share");
    {
        scen_t *sg = NULL;
        err_t eg = {0};
        CHECK(scen_parse("{\"inputs\": {\"population\": \"p.tif\"}, \"population_groups\": "
                         "[{\"name\": \"u5\", \"share\": 0.16}, {\"name\": \"w\", "
                         "\"raster\": \"w.tif\"}]}", "case/g.json", &sg, &eg) == ERR_OK);
        CHECK(sg != NULL && sg->n_groups == 2);
        if (sg != NULL && sg->n_groups == 2) {
            CHECK_NEAR(sg->groups[0].share, 0.16, 0);
            CHECK(sg->groups[0].raster == NULL);
            CHECK(isnan(sg->groups[1].share));
            CHECK_STR_HAS(sg->groups[1].raster, "case/w.tif");
        }
        scen_free(sg);
    }
    refuse("{\"inputs\": {\"population\": \"p.tif\", \"roads\": {\"path\": \"r\", "
           "\"name_field\": \"n\"}}}", ERR_INPUT, "unknown key 'inputs.roads.name_field'");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"sites\": {\"candidate\": {}}}",
           ERR_INPUT, "unknown key 'sites.candidate'; did you mean 'candidates'?");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"mode\": \"walk\", "
           "\"mode\": \"vehicle\"}}", ERR_INPUT, "duplicate key 'travel.mode'");

    /* Missing required keys. */
    refuse("{}", ERR_INPUT, "missing required key 'inputs'");
    refuse("{\"inputs\": {}}", ERR_INPUT, "missing required key 'inputs.population'");
    refuse("{\"inputs\": {\"population\": \"p.tif\", \"roads\": {\"layer\": \"lines\"}}}",
           ERR_INPUT, "missing required key 'inputs.roads.path'");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"sites\": {\"depots\": "
           "{\"id_field\": \"x\"}}}", ERR_INPUT, "missing required key 'sites.depots.path'");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"primary\": {\"walk_kmh\": 5}}}}", ERR_INPUT,
           "missing required key 'travel.road_speeds.primary.vehicle_kmh'");

    /* Wrong types. */
    refuse("{\"inputs\": {\"population\": 3}}", ERR_INPUT,
           "key 'inputs.population' must be a string, got 3");
    refuse("{\"inputs\": {\"population\": \"\"}}", ERR_INPUT,
           "key 'inputs.population' must not be an empty string");
    refuse("{\"inputs\": {\"population\": null}}", ERR_INPUT,
           "key 'inputs.population' must be a string, got null");
    refuse("{\"inputs\": \"pop.tif\"}", ERR_INPUT, "key 'inputs' must be an object {...}, got "
           "string \"pop.tif\"");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"bands_min\": \"30\"}}",
           ERR_INPUT, "key 'coverage.bands_min' must be an array of numbers, each in (0, 1440], "
           "got string");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"walk\": {\"slope\": "
           "\"yes\"}}}", ERR_INPUT, "key 'travel.walk.slope' must be true or false");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"primary\": 60}}}", ERR_INPUT,
           "key 'travel.road_speeds.primary' must be an object {...}, got 60");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"name\": 7}", ERR_INPUT,
           "key 'name' must be a string, got 7");

    /* Zero and negative speeds, and other ranges. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"walk\": {\"speed_kmh\": 0}}}",
           ERR_INPUT, "key 'travel.walk.speed_kmh' must be a number in (0, 20], got 0");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"walk\": {\"speed_kmh\": -5}}}",
           ERR_INPUT, "key 'travel.walk.speed_kmh' must be a number in (0, 20], got -5");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"walk\": {\"speed_kmh\": 25}}}",
           ERR_INPUT, "got 25");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"track\": {\"walk_kmh\": 0, \"vehicle_kmh\": 10}}}}", ERR_INPUT,
           "key 'travel.road_speeds.track.walk_kmh' must be a number in (0, 20], got 0");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"track\": {\"walk_kmh\": 4, \"vehicle_kmh\": -10}}}}", ERR_INPUT,
           "key 'travel.road_speeds.track.vehicle_kmh' must be a number in [0, 200], got -10");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"track\": {\"walk_kmh\": 4, \"vehicle_kmh\": 250}}}}", ERR_INPUT, "got 250");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"unknown_class\": "
           "{\"walk_kmh\": -1}}}", ERR_INPUT, "key 'travel.unknown_class.walk_kmh' must be a "
           "number in (0, 20], got -1");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"neighbours\": 4}}",
           ERR_INPUT, "key 'travel.neighbours' must be one of 8, 16, got 4");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"snap_tolerance_m\": 1001}}",
           ERR_INPUT, "key 'travel.snap_tolerance_m' must be a number in [0, 1000], got 1001");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"snap_tolerance_m\": -0.5}}",
           ERR_INPUT, "got -0.5");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"landcover_factors\": "
           "{\"10\": 2.5}}}", ERR_INPUT,
           "key 'travel.landcover_factors.10' must be a number in [0, 2], got 2.5");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"landcover_default\": -1}}",
           ERR_INPUT, "key 'travel.landcover_default' must be a number in [0, 2], got -1");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"limit_min\": 0}}",
           ERR_INPUT, "key 'coverage.limit_min' must be a number in (0, 1440], got 0");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"limit_min\": 1441}}",
           ERR_INPUT, "got 1441");

    /* Bands. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"bands_min\": "
           "[30, 60, 60, 120]}}", ERR_INPUT, "key 'coverage.bands_min[2]' must be greater than "
           "the value before it (60)");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"bands_min\": "
           "[30, 20]}}", ERR_INPUT, "'coverage.bands_min[1]'");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"bands_min\": "
           "[0, 20]}}", ERR_INPUT, "key 'coverage.bands_min[0]' must be a number in (0, 1440], "
           "got 0");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"bands_min\": []}}",
           ERR_INPUT, "key 'coverage.bands_min' must have 1 to 16 values, got 0");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"coverage\": {\"bands_min\": "
           "[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17]}}", ERR_INPUT, "got 17");

    /* Enumerations list what is allowed. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"mode\": \"bike\"}}",
           ERR_INPUT, "key 'travel.mode' must be one of \"walk\", \"vehicle\", got string "
           "\"bike\"");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"direction\": \"to_sites\"}}",
           ERR_INPUT, "must be one of \"to_site\", \"from_site\", got string \"to_sites\"; "
           "did you mean \"to_site\"?");

    /* Maps. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"landcover_factors\": "
           "{\"forest\": 0.5}}}", ERR_INPUT,
           "key 'travel.landcover_factors.forest' must be an integer");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"landcover_factors\": "
           "{\"10\": 0.5, \"010\": 1}}}", ERR_INPUT,
           "key 'travel.landcover_factors' gives land-cover class 10 twice");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"landcover_factors\": "
           "{\"10\": 0.5, \"10\": 1}}}", ERR_INPUT,
           "duplicate key 'travel.landcover_factors.10'");
    /* Class names that are not plain words are quoted in the path. */
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"gravel road\": {\"walk_kmh\": 0, \"vehicle_kmh\": 10}}}}", ERR_INPUT,
           "key 'travel.road_speeds[\"gravel road\"].walk_kmh' must be a number in (0, 20]");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": {}}}",
           ERR_INPUT, "key 'travel.road_speeds' must list at least one road class");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"\": {\"walk_kmh\": 4, \"vehicle_kmh\": 10}}}}", ERR_INPUT,
           "key 'travel.road_speeds' has an empty road class name");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"track\": {\"walk_kmh\": 4, \"vehicle_kmh\": 10, \"walkkmh\": 12}}}}", ERR_INPUT,
           "unknown key 'travel.road_speeds.track.walkkmh'; did you mean 'walk_kmh'?");
    refuse("{\"inputs\": {\"population\": \"p.tif\"}, \"travel\": {\"road_speeds\": "
           "{\"track\": {\"walk_kmh\": 4, \"vehicle_kmh\": 10, \"bike_kmh\": 12}}}}", ERR_INPUT,
           "unknown key 'travel.road_speeds.track.bike_kmh'; allowed here: walk_kmh, vehicle_kmh");

    /* No text at all is a programming error, not bad input. */
    {
        scen_t *s = NULL;
        err_t e = {0, ""};
        CHECK(scen_parse(NULL, "x.json", &s, &e) == ERR_INTERNAL && s == NULL);
    }
}

int main(void)
{
    test_full();
    test_defaults();
    test_files();
    test_refusals();
    return CHECK_DONE("test_scenario");
}

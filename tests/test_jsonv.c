/* test_jsonv: strict JSON reading helpers.
 * Syntax error positions are compared with Debian python3 3.11's json module
 * (json.JSONDecodeError lineno/colno), run by hand on the same texts and kept
 * live by tests/xcheck/jsonv_syntax.sh, which calls this program as
 * "test_jsonv --locate FILE" (prints "LINE COLUMN", or "ok"). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check.h"
#include "jsonv.h"

/* Parse 'text'; on a syntax error return its line and column from e.msg. */
static int locate(const char *text, int *line, int *col, err_t *e)
{
    cJSON *j = NULL;
    const char *at;
    int rc = jsonv_parse(text, "t.json", &j, e);

    cJSON_Delete(j);
    *line = *col = 0;
    if (rc != ERR_OK && (at = strstr(e->msg, "at line ")) != NULL)
        sscanf(at, "at line %d, column %d", line, col);
    return rc;
}

/* "--locate FILE": print where the syntax check puts the first error. */
static int locate_file(const char *path)
{
    FILE *f = fopen(path, "rb");
    char *buf;
    long n;
    int line, col, rc;
    err_t e = {0, ""};

    if (f == NULL) return 2;
    fseek(f, 0, SEEK_END);
    n = ftell(f);
    fseek(f, 0, SEEK_SET);
    buf = calloc((size_t)n + 1, 1);
    if (buf == NULL || fread(buf, 1, (size_t)n, f) != (size_t)n) {
        free(buf);
        fclose(f);
        return 2;
    }
    fclose(f);
    rc = locate(buf, &line, &col, &e);
    if (rc == ERR_OK) printf("ok\n");
    else printf("%d %d %s\n", line, col, e.msg);
    free(buf);
    return 0;
}

/* Expect a syntax error at line/col, with 'what' in the message. */
static void syntax_at(const char *text, int want_line, int want_col, const char *what)
{
    err_t e = {0, ""};
    int line, col;

    CHECK(locate(text, &line, &col, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "t.json: JSON syntax error at line");
    CHECK(line == want_line);
    CHECK(col == want_col);
    if (line != want_line || col != want_col)
        fprintf(stderr, "  got line %d column %d, want %d %d: %s\n", line, col, want_line,
                want_col, e.msg);
    CHECK_STR_HAS(e.msg, what);
}

static void test_line_col(void)
{
    int line, col;

    jsonv_line_col("ab\ncd", 4, &line, &col);
    CHECK(line == 2 && col == 2);
    jsonv_line_col("ab\ncd", 0, &line, &col);
    CHECK(line == 1 && col == 1);
    /* Two-byte UTF-8 characters count as one column each. */
    jsonv_line_col("\xc3\xa9\xc3\xa9x", 4, &line, &col);
    CHECK(line == 1 && col == 3);
    /* A byte order mark is not a column. */
    jsonv_line_col("\xEF\xBB\xBFx", 3, &line, &col);
    CHECK(line == 1 && col == 1);
    /* Windows line ends: the \r is the last column of its line. */
    jsonv_line_col("a\r\nb", 3, &line, &col);
    CHECK(line == 2 && col == 1);
}

static void test_distance(void)
{
    /* Textbook Levenshtein examples (from memory): kitten/sitting 3, flaw/lawn 2. */
    CHECK(jsonv_distance("kitten", "sitting") == 3);
    CHECK(jsonv_distance("flaw", "lawn") == 2);
    CHECK(jsonv_distance("", "abc") == 3);
    CHECK(jsonv_distance("abc", "abc") == 0);
    CHECK(jsonv_distance("sped_kmh", "speed_kmh") == 1);
}

static void test_syntax(void)
{
    cJSON *j = NULL;
    err_t e = {0, ""};
    int line, col;

    /* Every line/column below is what python3 3.11 json.loads reports for the
     * same text (JSONDecodeError.lineno/.colno), checked by hand. */
    syntax_at("{\n  \"name\": \"Lowmoor\",\n  \"inputs\": {\n    \"population\": \"pop.tif\"\n"
              "    \"roads\": {\"path\": \"roads.gpkg\"}\n  }\n}\n", 5, 5, "expected ',' or '}'");
    /* cJSON 1.7.15 alone points one character past the '}' here. */
    syntax_at("{\n  \"travel\": {\n    \"mode\": \"walk\",\n  },\n  \"coverage\": {}\n}\n", 4, 3,
              "remove the comma");
    syntax_at("{\n  \"coverage\": {\n    \"bands_min\": [30, 60, 120,]\n  }\n}\n", 3, 31,
              "remove the comma");
    /* cJSON 1.7.15 alone accepts a raw line break inside a string. */
    syntax_at("{\n  \"name\": \"Low\n moor\"\n}\n", 2, 15, "control character");
    /* Not UTF-8 inside a string (RFC 8259 section 8.1 asks for UTF-8): a Latin-1
     * byte, a lone continuation byte, an overlong '/', an encoded surrogate. The
     * column counts characters, so the bad byte's column is found by hand. */
    syntax_at("{\"name\": \"Caf\xe9\"}", 1, 14, "not UTF-8");
    syntax_at("{\"name\": \"a\x80\"}", 1, 12, "not UTF-8");
    syntax_at("{\"name\": \"\xc0\xaf\"}", 1, 11, "not UTF-8");
    syntax_at("{\"name\": \"\xed\xa0\x80\"}", 1, 11, "not UTF-8");
    /* Well-formed multi-byte characters still pass: é, €, U+1F600. */
    {
        cJSON *j8 = NULL;
        err_t e8 = {0};
        CHECK(jsonv_parse("{\"a\": \"\xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80\"}", "t.json",
                          &j8, &e8) == ERR_OK);
        cJSON_Delete(j8);
    }
    syntax_at("{\"a\": 1}\n\n  {\"b\": 2}\n", 3, 3, "after the end of the JSON value");
    syntax_at("{\n  \"a\" 1\n}", 2, 7, "expected ':'");
    syntax_at("{\n  \"a\": [1, 2, tru]\n}", 2, 15, "expected a value");
    syntax_at("{\n  \"n\xc3\xa9\": \"\xc3\xa9\xc3\xa9\", x\n}", 2, 15, "expected a key");
    syntax_at("{\n  \"a\": [1, 2\n}\n", 3, 1, "expected ',' or ']'");
    syntax_at("{\n  \"a\": 1,\n  b: 2\n}", 3, 3, "expected a key in double quotes");
    syntax_at("{\n  \"p\": \"C:\\data\"\n}", 2, 11, "invalid escape");

    /* Our own wording where python says something else or nothing. */
    syntax_at("{\"a\": \"\\uZZZZ\"}", 1, 8, "4 hex digits"); /* cJSON alone accepts it */
    syntax_at("{\"a\": \"x\\u0000y\"}", 1, 9, "\\u0000 is not allowed");
    syntax_at("{\"a\": \"\\uD800\"}", 1, 8, "high surrogate");
    syntax_at("{\"a\": \"\\uD800\\u0041\"}", 1, 8, "high surrogate");
    syntax_at("{\"a\": \"\\udc00\"}", 1, 8, "lone low surrogate");
    syntax_at("{\"a\": 07}", 1, 7, "leading zeros are not allowed");
    syntax_at("{\"a\": 1.}", 1, 9, "after the decimal point");
    syntax_at("{\"a\": 1e+}", 1, 10, "exponent");
    syntax_at("{\"a\": -x}", 1, 8, "expected a digit");
    syntax_at("{\"a\": 'x'}", 1, 7, "double quotes");
    syntax_at("{\"a\": 1 /* c */}", 1, 9, "expected ',' or '}'");
    syntax_at("{\"a\": /* c */ 1}", 1, 7, "comments are not allowed");
    syntax_at("{\"a\": NaN}", 1, 7, "expected a value");
    syntax_at("{\"a\": \"open", 1, 7, "not closed");
    syntax_at("{\"a\": ", 1, 7, "end of the text");
    syntax_at("\xEF\xBB\xBF{\"a\": x}", 1, 7, "expected a value");

    CHECK(locate("   \n ", &line, &col, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "t.json: is empty");

    /* Nesting deeper than cJSON's limit is refused before cJSON sees it. */
    {
        char deep[2 * 1002 + 1];
        for (int i = 0; i < 1001; i++) deep[i] = '[';
        for (int i = 0; i < 1001; i++) deep[1001 + i] = ']';
        deep[2002] = '\0';
        CHECK(jsonv_parse(deep, "t.json", &j, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "nested too deeply");
        CHECK(j == NULL);
    }

    /* A surrogate pair is one character (U+1F600, 4 bytes in UTF-8). */
    CHECK(jsonv_parse("{\"a\": \"\\ud83d\\ude00\"}", "t.json", &j, &e) == ERR_OK);
    CHECK(j != NULL && strcmp(cJSON_GetObjectItem(j, "a")->valuestring, "\xF0\x9F\x98\x80") == 0);
    cJSON_Delete(j);

    /* Valid texts, with a byte order mark, escapes and every kind of value. */
    CHECK(jsonv_parse("\xEF\xBB\xBF {\"a\": [1, -2.5e3, 0.0, true, false, null, \"x\\n\\u00e9\"],"
                      " \"b\": {}} \r\n", "t.json", &j, &e) == ERR_OK);
    CHECK(j != NULL && cJSON_GetArraySize(cJSON_GetObjectItem(j, "a")) == 7);
    CHECK_NEAR(cJSON_GetArrayItem(cJSON_GetObjectItem(j, "a"), 1)->valuedouble, -2500.0, 0);
    cJSON_Delete(j);
}

static void test_paths(void)
{
    char buf[JSONV_PATH_MAX], tiny[8];

    CHECK(jsonv_path(buf, sizeof buf, "travel.walk", "speed_kmh") == 0);
    CHECK(strcmp(buf, "travel.walk.speed_kmh") == 0);
    CHECK(jsonv_path(buf, sizeof buf, "", "travel") == 0 && strcmp(buf, "travel") == 0);
    CHECK(jsonv_path(buf, sizeof buf, "a", "x.y") == 0 && strcmp(buf, "a[\"x.y\"]") == 0);
    CHECK(jsonv_path_index(buf, sizeof buf, "coverage.bands_min", 3) == 0);
    CHECK(strcmp(buf, "coverage.bands_min[3]") == 0);
    CHECK(jsonv_path_index(buf, sizeof buf, "", 0) == 0 && strcmp(buf, "[0]") == 0);
    /* Too long: cut, flagged, still a string. */
    CHECK(jsonv_path(tiny, sizeof tiny, "travel", "walk") == 1);
    CHECK(strcmp(tiny, "travel.") == 0);
    CHECK(jsonv_path_index(tiny, sizeof tiny, "abcdef", 12) == 1 && strlen(tiny) == 7);
}

/* Parse 'text' into *doc and its root node; returns ERR_OK. */
static int doc(const char *text, cJSON **d, jsonv_node_t *root)
{
    err_t e = {0, ""};
    int rc = jsonv_parse(text, "s.json", d, &e);
    if (rc == ERR_OK) rc = jsonv_root(*d, "s.json", root, &e);
    if (rc != ERR_OK) fprintf(stderr, "unexpected: %s\n", e.msg);
    return rc;
}

static void test_keys(void)
{
    static const char *const walk_keys[] = {"speed_kmh", "slope", NULL};
    static const char *const top_keys[] = {"travel", "coverage", NULL};
    cJSON *d = NULL;
    jsonv_node_t root, walk, travel;
    err_t e = {0, ""};

    CHECK(doc("{\"travel\": {\"walk\": {\"sped_kmh\": 4}}}", &d, &root) == ERR_OK);
    jsonv_child(&root, "travel", &travel);
    CHECK(jsonv_object(&travel, "walk", 0, walk_keys, &walk, &e) == ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: unknown key 'travel.walk.sped_kmh'; did you mean 'speed_kmh'?");
    cJSON_Delete(d);

    CHECK(doc("{\"Travel\": 1}", &d, &root) == ERR_OK);
    CHECK(jsonv_check_keys(&root, top_keys, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "unknown key 'Travel'; did you mean 'travel'?");
    cJSON_Delete(d);

    /* Nothing close: list what is allowed. A 2-letter key is not "close" to
     * every other 2-letter key. */
    CHECK(doc("{\"zz\": 1}", &d, &root) == ERR_OK);
    CHECK(jsonv_check_keys(&root, top_keys, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: unknown key 'zz'; allowed here: travel, coverage");
    cJSON_Delete(d);

    /* Duplicates, even where any key is allowed. */
    CHECK(doc("{\"travel\": {\"a\": 1, \"b\": 2, \"a\": 3}}", &d, &root) == ERR_OK);
    jsonv_child(&root, "travel", &travel);
    CHECK(jsonv_check_keys(&travel, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: duplicate key 'travel.a'");
    cJSON_Delete(d);

    CHECK(doc("{\"x\": 1, \"y\": 2}", &d, &root) == ERR_OK);
    CHECK(jsonv_check_keys(&root, NULL, &e) == ERR_OK);
    cJSON_Delete(d);

    /* The top level must be an object. */
    CHECK(jsonv_parse("[1]", "s.json", &d, &e) == ERR_OK);
    CHECK(jsonv_root(d, "s.json", &root, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: the top level must be a JSON object");
    cJSON_Delete(d);
}

static void test_numbers(void)
{
    cJSON *d = NULL;
    jsonv_node_t root, absent;
    err_t e = {0, ""};
    double v;
    long l;
    int i;

    CHECK(doc("{\"zero\": 0, \"twenty\": 20, \"above\": 20.0000001, \"s\": \"5\", \"n\": null,"
              " \"big\": 1e999, \"half\": 2.5, \"eight\": 8, \"four\": 4, \"neg\": -3}",
              &d, &root) == ERR_OK);
    CHECK(jsonv_number(&root, "zero", 0, JSONV_OPEN_CLOSED(0, 20), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: key 'zero' must be a number in (0, 20], got 0");
    CHECK(jsonv_number(&root, "twenty", 0, JSONV_OPEN_CLOSED(0, 20), 5, &v, &e) == ERR_OK);
    CHECK(v == 20.0);
    CHECK(jsonv_number(&root, "twenty", 0, JSONV_CLOSED_OPEN(0, 20), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "in [0, 20), got 20");
    CHECK(jsonv_number(&root, "above", 0, JSONV_OPEN_CLOSED(0, 20), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "got 20.0000001");
    CHECK(jsonv_number(&root, "zero", 0, JSONV_CLOSED(0, 200), 5, &v, &e) == ERR_OK);
    CHECK(v == 0.0);
    CHECK(jsonv_number(&root, "zero", 0, JSONV_OPEN(0, 1), 5, &v, &e) == ERR_INPUT);
    CHECK(jsonv_number(&root, "neg", 0, JSONV_CLOSED(0, INFINITY), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "must be a number >= 0, got -3");
    CHECK(jsonv_number(&root, "neg", 0, JSONV_OPEN(-INFINITY, INFINITY), 5, &v, &e) == ERR_OK);
    CHECK(v == -3.0);
    CHECK(jsonv_number(&root, "big", 0, JSONV_OPEN(-INFINITY, INFINITY), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'big' must be a number, got inf");
    CHECK(jsonv_number(&root, "s", 0, JSONV_OPEN_CLOSED(0, 20), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 's' must be a number in (0, 20], got string \"5\"");
    /* null: an error unless JSONV_NULLABLE, which gives the default. */
    CHECK(jsonv_number(&root, "n", 0, JSONV_OPEN_CLOSED(0, 20), 5, &v, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "got null");
    CHECK(jsonv_number(&root, "n", JSONV_NULLABLE, JSONV_OPEN_CLOSED(0, 20), 5, &v, &e) == ERR_OK);
    CHECK(v == 5.0);
    CHECK(jsonv_number(&root, "gone", 0, JSONV_OPEN_CLOSED(0, 20), 7, &v, &e) == ERR_OK);
    CHECK(v == 7.0);
    e.code = ERR_OK;
    CHECK(jsonv_number(&root, "gone", JSONV_REQUIRED, JSONV_OPEN_CLOSED(0, 20), 7, &v, &e) ==
          ERR_INPUT);
    CHECK(e.code == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: missing required key 'gone'");
    /* Inside an absent object, even required keys give their defaults. */
    jsonv_child(&root, "nothing", &absent);
    CHECK(absent.json == NULL && strcmp(absent.path, "nothing") == 0);
    CHECK(jsonv_number(&absent, "x", JSONV_REQUIRED, JSONV_CLOSED(0, 1), 0.5, &v, &e) == ERR_OK);
    CHECK(v == 0.5);

    CHECK(jsonv_int(&root, "eight", 0, 1, 16, 3, &l, &e) == ERR_OK && l == 8);
    CHECK(jsonv_int(&root, "half", 0, 1, 16, 3, &l, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'half' must be an integer in [1, 16], got 2.5");
    CHECK(jsonv_int(&root, "neg", 0, 1, 16, 3, &l, &e) == ERR_INPUT);
    CHECK(jsonv_int(&root, "gone", 0, 1, 16, 3, &l, &e) == ERR_OK && l == 3);

    {
        static const int nb[] = {8, 16};
        CHECK(jsonv_int_choice(&root, "eight", 0, nb, 2, 16, &i, &e) == ERR_OK && i == 8);
        CHECK(jsonv_int_choice(&root, "four", 0, nb, 2, 16, &i, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "key 'four' must be one of 8, 16, got 4");
        CHECK(jsonv_int_choice(&root, "s", 0, nb, 2, 16, &i, &e) == ERR_INPUT);
        CHECK_STR_HAS(e.msg, "got string \"5\"");
        CHECK(jsonv_int_choice(&root, "gone", 0, nb, 2, 16, &i, &e) == ERR_OK && i == 16);
    }
    cJSON_Delete(d);
}

static void test_others(void)
{
    static const char *const modes[] = {"walk", "vehicle", NULL};
    cJSON *d = NULL;
    jsonv_node_t root, arr, m;
    err_t e = {0, ""};
    char *s = NULL;
    int b, k;
    size_t n;
    long l;

    CHECK(doc("{\"t\": true, \"yes\": \"yes\", \"empty\": \"\", \"str\": \"abc\", \"n\": null,"
              " \"mode\": \"bike\", \"Mode\": \"Walk\", \"num\": 3, \"arr\": [1, 2, 3],"
              " \"map\": {\"10\": 1, \"forest\": 2, \" 7\": 3, \"+5\": 4, \"-3\": 5},"
              " \"long\": \"abcdefghijklmnopqrstuvwxyzabcdefghijklmnopqrstuvwxyz\"}",
              &d, &root) == ERR_OK);
    CHECK(jsonv_bool(&root, "t", 0, 0, &b, &e) == ERR_OK && b == 1);
    CHECK(jsonv_bool(&root, "gone", 0, 1, &b, &e) == ERR_OK && b == 1);
    CHECK(jsonv_bool(&root, "yes", 0, 0, &b, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'yes' must be true or false, got string \"yes\"");

    CHECK(jsonv_string(&root, "str", 0, NULL, &s, &e) == ERR_OK && strcmp(s, "abc") == 0);
    free(s);
    CHECK(jsonv_string(&root, "gone", 0, "dflt", &s, &e) == ERR_OK && strcmp(s, "dflt") == 0);
    free(s);
    CHECK(jsonv_string(&root, "gone", 0, NULL, &s, &e) == ERR_OK && s == NULL);
    CHECK(jsonv_string(&root, "n", JSONV_NULLABLE, "dflt", &s, &e) == ERR_OK && s == NULL);
    CHECK(jsonv_string(&root, "n", 0, "dflt", &s, &e) == ERR_INPUT && s == NULL);
    CHECK_STR_HAS(e.msg, "key 'n' must be a string, got null");
    CHECK(jsonv_string(&root, "empty", 0, NULL, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'empty' must not be an empty string");
    CHECK(jsonv_string(&root, "empty", JSONV_EMPTY_OK, NULL, &s, &e) == ERR_OK && s && !*s);
    free(s);
    CHECK(jsonv_string(&root, "num", 0, NULL, &s, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'num' must be a string, got 3");
    CHECK(jsonv_bool(&root, "long", 0, 0, &b, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "got string \"abcdefghijklmnopqrstuvwxyzabcdefghijk...\"");

    CHECK(jsonv_enum(&root, "mode", 0, modes, 0, &k, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: key 'mode' must be one of \"walk\", \"vehicle\", got string "
                         "\"bike\"");
    CHECK(jsonv_enum(&root, "Mode", 0, modes, 0, &k, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "did you mean \"walk\"?");
    CHECK(jsonv_enum(&root, "num", 0, modes, 0, &k, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "got 3");
    CHECK(jsonv_enum(&root, "gone", 0, modes, 1, &k, &e) == ERR_OK && k == 1);

    CHECK(jsonv_array(&root, "arr", 0, 1, 3, &arr, &n, &e) == ERR_OK && n == 3);
    CHECK(strcmp(arr.path, "arr") == 0);
    CHECK(jsonv_array(&root, "arr", 0, 4, 5, &arr, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'arr' must have 4 to 5 values, got 3");
    CHECK(jsonv_array(&root, "arr", 0, 2, 2, &arr, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'arr' must have 2 values, got 3");
    CHECK(jsonv_array(&root, "str", 0, 0, 5, &arr, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'str' must be an array [...], got string");
    CHECK(jsonv_array(&root, "gone", 0, 1, 5, &arr, &n, &e) == ERR_OK && n == 0);
    CHECK(jsonv_array(&root, "gone", JSONV_REQUIRED, 1, 5, &arr, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "missing required key 'gone'");
    CHECK(jsonv_object(&root, "arr", 0, NULL, &arr, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'arr' must be an object {...}, got array");

    /* Map-like objects: keys that are integers. */
    CHECK(jsonv_object(&root, "map", 0, NULL, &arr, &e) == ERR_OK);
    {
        const cJSON *c = arr.json->child;
        static const char *const bad[] = {"map.forest", "map[\" 7\"]", "map[\"+5\"]"};
        jsonv_member(&arr, c, 0, &m);
        CHECK(strcmp(m.path, "map.10") == 0);
        CHECK(jsonv_key_int(&m, 0, 255, &l, &e) == ERR_OK && l == 10);
        for (int q = 0; q < 3; q++) {
            c = c->next;
            jsonv_member(&arr, c, (size_t)q + 1, &m);
            CHECK(jsonv_key_int(&m, 0, 255, &l, &e) == ERR_INPUT);
            CHECK_STR_HAS(e.msg, bad[q]);
            CHECK_STR_HAS(e.msg, "must be an integer in [0, 255] written as a string");
        }
        c = c->next;
        jsonv_member(&arr, c, 4, &m);
        CHECK(jsonv_key_int(&m, 0, 255, &l, &e) == ERR_INPUT);
        CHECK(jsonv_key_int(&m, -10, 255, &l, &e) == ERR_OK && l == -3);
    }
    /* Array elements get an index in their path. */
    jsonv_child(&root, "arr", &arr);
    jsonv_member(&arr, arr.json->child->next, 1, &m);
    CHECK(strcmp(m.path, "arr[1]") == 0);
    CHECK(jsonv_as_object(&m, NULL, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'arr[1]' must be an object {...}, got 2");
    cJSON_Delete(d);
}

static void test_number_arrays(void)
{
    static const double dflt[] = {30, 60, 120};
    cJSON *d = NULL;
    jsonv_node_t root, cov;
    err_t e = {0, ""};
    double buf[4];
    size_t n;

    CHECK(doc("{\"coverage\": {\"ok\": [15, 30.5], \"flat\": [30, 60, 60], \"down\": [30, 60, 45],"
              " \"neg\": [30, -1], \"str\": \"30\", \"mixed\": [1, \"2\"], \"many\": [1,2,3,4,5],"
              " \"none\": []}}", &d, &root) == ERR_OK);
    jsonv_child(&root, "coverage", &cov);
    CHECK(jsonv_numbers(&cov, "ok", JSONV_INCREASING, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt, 3,
                        buf, &n, &e) == ERR_OK);
    CHECK(n == 2 && buf[0] == 15 && buf[1] == 30.5);
    CHECK(jsonv_numbers(&cov, "gone", JSONV_INCREASING, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt,
                        3, buf, &n, &e) == ERR_OK);
    CHECK(n == 3 && buf[0] == 30 && buf[2] == 120);
    CHECK(jsonv_numbers(&cov, "flat", JSONV_INCREASING, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt,
                        3, buf, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "s.json: key 'coverage.flat[2]' must be greater than the value before "
                         "it (60)");
    CHECK(jsonv_numbers(&cov, "flat", 0, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt, 3, buf, &n,
                        &e) == ERR_OK && n == 3);
    CHECK(jsonv_numbers(&cov, "down", JSONV_INCREASING, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt,
                        3, buf, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "'coverage.down[2]'");
    CHECK_STR_HAS(e.msg, "got 45");
    CHECK(jsonv_numbers(&cov, "neg", JSONV_INCREASING, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt,
                        3, buf, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'coverage.neg[1]' must be a number in (0, 1440], got -1");
    CHECK(jsonv_numbers(&cov, "str", JSONV_INCREASING, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt,
                        3, buf, &n, &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'coverage.str' must be an array of numbers, each in (0, 1440], "
                         "got string");
    CHECK(jsonv_numbers(&cov, "mixed", 0, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt, 3, buf, &n,
                        &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'coverage.mixed[1]' must be a number in (0, 1440], got string");
    CHECK(jsonv_numbers(&cov, "many", 0, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt, 3, buf, &n,
                        &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "key 'coverage.many' must have 1 to 4 values, got 5");
    CHECK(jsonv_numbers(&cov, "none", 0, JSONV_OPEN_CLOSED(0, 1440), 1, 4, dflt, 3, buf, &n,
                        &e) == ERR_INPUT);
    CHECK_STR_HAS(e.msg, "got 0");
    cJSON_Delete(d);
}

int main(int argc, char **argv)
{
    if (argc == 3 && strcmp(argv[1], "--locate") == 0) return locate_file(argv[2]);
    test_line_col();
    test_distance();
    test_syntax();
    test_paths();
    test_keys();
    test_numbers();
    test_others();
    test_number_arrays();
    return CHECK_DONE("test_jsonv");
}

/* jsonv: strict reading of JSON settings files (see include/jsonv.h).
 * Parsing is two passes over the text: a small RFC 8259 syntax check of our
 * own, which knows exactly where and why a text is wrong (cJSON 1.7.15 accepts
 * raw control characters and bad \u escapes in strings and may point one
 * character past a trailing comma), then cJSON_ParseWithOpts to build the tree.
 * The getters add the key path and the file name to every message. */
#include "jsonv.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

/* ---------------------------------------------------------------- syntax */

/* State of the syntax check: the text, where we are, and the first error. */
typedef struct lex {
    const char *s;
    size_t pos;
    int depth;
    size_t err_pos;        /* byte offset of the error */
    const char *err_what;  /* static text */
} lex_t;

/* Same nesting limit as cJSON, so both passes agree on what is too deep. */
#define LEX_MAX_DEPTH CJSON_NESTING_LIMIT

static int lex_fail(lex_t *l, size_t pos, const char *what)
{
    l->err_pos = pos;
    l->err_what = what;
    return -1;
}

static void lex_ws(lex_t *l)
{
    while (l->s[l->pos] == ' ' || l->s[l->pos] == '\t' || l->s[l->pos] == '\n' ||
           l->s[l->pos] == '\r')
        l->pos++;
}

static int lex_value(lex_t *l);

/* Read 4 hex digits at 's' into *u; -1 when they are not there. */
static int hex4(const char *s, unsigned long *u)
{
    *u = 0;
    for (int k = 0; k < 4; k++) {
        if (!isxdigit((unsigned char)s[k])) return -1;
        int c = tolower((unsigned char)s[k]);
        *u = *u * 16 + (unsigned long)(isdigit(c) ? c - '0' : c - 'a' + 10);
    }
    return 0;
}

/* Length of the well-formed UTF-8 sequence at 's' (RFC 3629: no overlong
 * forms, no surrogates, nothing above U+10FFFF), or 0 when it is not one. */
static size_t utf8_len(const unsigned char *s)
{
    unsigned char c = s[0];
    size_t n;
    unsigned long u;

    if (c < 0x80) return 1;
    if (c >= 0xC2 && c <= 0xDF) n = 2, u = c & 0x1Fu;
    else if (c >= 0xE0 && c <= 0xEF) n = 3, u = c & 0x0Fu;
    else if (c >= 0xF0 && c <= 0xF4) n = 4, u = c & 0x07u;
    else return 0;
    for (size_t k = 1; k < n; k++) {
        if ((s[k] & 0xC0) != 0x80) return 0;
        u = (u << 6) | (s[k] & 0x3Fu);
    }
    if ((n == 3 && u < 0x800) || (n == 4 && (u < 0x10000 || u > 0x10FFFF)) ||
        (u >= 0xD800 && u <= 0xDFFF))
        return 0;
    return n;
}

static int lex_string(lex_t *l)
{
    size_t start = l->pos;

    l->pos++; /* opening quote */
    for (;;) {
        unsigned char c = (unsigned char)l->s[l->pos];
        if (c == '\0') return lex_fail(l, start, "string not closed with '\"'");
        if (c == '"') {
            l->pos++;
            return 0;
        }
        if (c < 0x20)
            return lex_fail(l, l->pos, "control character inside a string "
                                       "(write a line break as \\n, a tab as \\t)");
        if (c == '\\') {
            char x = l->s[l->pos + 1];
            if (x == 'u') {
                unsigned long u;
                if (hex4(l->s + l->pos + 2, &u) != 0)
                    return lex_fail(l, l->pos, "\\u must be followed by 4 hex digits");
                /* cJSON cuts a string at \u0000 and fails on unpaired
                 * surrogates; refuse both here, with a position. */
                if (u == 0) return lex_fail(l, l->pos, "\\u0000 is not allowed in a string");
                if (u >= 0xDC00 && u <= 0xDFFF)
                    return lex_fail(l, l->pos, "\\u escape of a lone low surrogate");
                if (u >= 0xD800 && u <= 0xDBFF) {
                    unsigned long lo;
                    if (l->s[l->pos + 6] != '\\' || l->s[l->pos + 7] != 'u' ||
                        hex4(l->s + l->pos + 8, &lo) != 0 || lo < 0xDC00 || lo > 0xDFFF)
                        return lex_fail(l, l->pos, "\\u escape of a high surrogate not followed "
                                                   "by a low one");
                    l->pos += 6;
                }
                l->pos += 6;
                continue;
            }
            if (x == '\0' || strchr("\"\\/bfnrt", x) == NULL)
                return lex_fail(l, l->pos, "invalid escape in a string (in paths write '/' "
                                           "or '\\\\' instead of '\\')");
            l->pos += 2;
            continue;
        }
        if (c >= 0x80) {
            /* Bad bytes would reach summary.json and the HTML report as they are. */
            size_t n = utf8_len((const unsigned char *)l->s + l->pos);
            if (n == 0)
                return lex_fail(l, l->pos, "bytes that are not UTF-8 inside a string (save "
                                           "the file as UTF-8)");
            l->pos += n;
            continue;
        }
        l->pos++;
    }
}

static int lex_digits(lex_t *l, const char *what)
{
    if (!isdigit((unsigned char)l->s[l->pos])) return lex_fail(l, l->pos, what);
    while (isdigit((unsigned char)l->s[l->pos])) l->pos++;
    return 0;
}

static int lex_number(lex_t *l)
{
    if (l->s[l->pos] == '-') l->pos++;
    if (l->s[l->pos] == '0') {
        l->pos++;
        if (isdigit((unsigned char)l->s[l->pos]))
            return lex_fail(l, l->pos - 1,
                            "leading zeros are not allowed in numbers (write 7, not 07)");
    } else if (lex_digits(l, "expected a digit") != 0) {
        return -1;
    }
    if (l->s[l->pos] == '.') {
        l->pos++;
        if (lex_digits(l, "expected a digit after the decimal point") != 0) return -1;
    }
    if (l->s[l->pos] == 'e' || l->s[l->pos] == 'E') {
        l->pos++;
        if (l->s[l->pos] == '+' || l->s[l->pos] == '-') l->pos++;
        if (lex_digits(l, "expected a digit in the exponent") != 0) return -1;
    }
    return 0;
}

/* Object or array: 'close' is '}' or ']'. */
static int lex_container(lex_t *l, char close)
{
    int is_obj = close == '}';

    if (++l->depth > LEX_MAX_DEPTH) return lex_fail(l, l->pos, "nested too deeply");
    l->pos++;
    lex_ws(l);
    if (l->s[l->pos] == close) {
        l->pos++;
        l->depth--;
        return 0;
    }
    for (;;) {
        if (is_obj) {
            if (l->s[l->pos] != '"')
                return lex_fail(l, l->pos, "expected a key in double quotes");
            if (lex_string(l) != 0) return -1;
            lex_ws(l);
            if (l->s[l->pos] != ':') return lex_fail(l, l->pos, "expected ':' after the key");
            l->pos++;
            lex_ws(l);
        }
        if (lex_value(l) != 0) return -1;
        lex_ws(l);
        if (l->s[l->pos] == close) {
            l->pos++;
            l->depth--;
            return 0;
        }
        if (l->s[l->pos] != ',')
            return lex_fail(l, l->pos, is_obj ? "expected ',' or '}'" : "expected ',' or ']'");
        l->pos++;
        lex_ws(l);
        if (l->s[l->pos] == close)
            return lex_fail(l, l->pos, "no value after the last ',' (remove the comma)");
    }
}

static int lex_value(lex_t *l)
{
    static const char *const words[] = {"true", "false", "null"};
    char c = l->s[l->pos];

    if (c == '{') return lex_container(l, '}');
    if (c == '[') return lex_container(l, ']');
    if (c == '"') return lex_string(l);
    if (c == '-' || isdigit((unsigned char)c)) return lex_number(l);
    for (size_t k = 0; k < sizeof words / sizeof words[0]; k++) {
        size_t n = strlen(words[k]);
        if (strncmp(l->s + l->pos, words[k], n) == 0) {
            l->pos += n;
            return 0;
        }
    }
    if (c == '\0') return lex_fail(l, l->pos, "expected a value, found the end of the text");
    if (c == '\'') return lex_fail(l, l->pos, "expected a value (strings take double quotes)");
    if (c == '/') return lex_fail(l, l->pos, "expected a value (comments are not allowed)");
    return lex_fail(l, l->pos, "expected a value");
}

/* Byte length of a UTF-8 byte order mark at the start of 's', or 0. */
static size_t bom_len(const char *s)
{
    return strncmp(s, "\xEF\xBB\xBF", 3) == 0 ? 3 : 0; /* strncmp: s may be shorter */
}

/* Line and column of byte 'offset' in 'text', both from 1; a leading byte
 * order mark is skipped and columns count UTF-8 characters, as editors do. */
void jsonv_line_col(const char *text, size_t offset, int *line, int *col)
{
    int ln = 1, cl = 1;

    for (size_t i = bom_len(text); i < offset && text[i] != '\0'; i++) {
        unsigned char c = (unsigned char)text[i];
        if (c == '\n') {
            ln++;
            cl = 1;
        } else if ((c & 0xC0) != 0x80) {
            cl++; /* count characters, not UTF-8 continuation bytes */
        }
    }
    *line = ln;
    *col = cl;
}

/* Parse 'text' strictly: our syntax check first (exact position and reason
 * of the first error), then cJSON builds the tree; caller frees *out with
 * cJSON_Delete. */
int jsonv_parse(const char *text, const char *file, cJSON **out, err_t *e)
{
    lex_t l = {text, 0, 0, 0, NULL};
    const char *end = NULL;
    int line, col;
    cJSON *j;

    *out = NULL;
    l.pos = bom_len(text);
    lex_ws(&l);
    if (text[l.pos] == '\0')
        return err_set(e, ERR_INPUT, "%s: is empty; expected a JSON object", file);
    if (lex_value(&l) == 0) {
        lex_ws(&l);
        if (text[l.pos] != '\0')
            lex_fail(&l, l.pos, "unexpected text after the end of the JSON value");
    }
    if (l.err_what != NULL) {
        jsonv_line_col(text, l.err_pos, &line, &col);
        return err_set(e, ERR_INPUT, "%s: JSON syntax error at line %d, column %d: %s", file,
                       line, col, l.err_what);
    }
    j = cJSON_ParseWithOpts(text, &end, 1);
    if (j == NULL) {
        /* The syntax check passed, so this is most likely cJSON running out
         * of memory; say where it stopped in case it is not. */
        size_t off = end != NULL ? (size_t)(end - text) : 0;
        jsonv_line_col(text, off, &line, &col);
        return err_set(e, ERR_INPUT, "%s: cJSON could not read the text (stopped at line %d, "
                       "column %d; out of memory?)", file, line, col);
    }
    *out = j;
    return ERR_OK;
}

/* ---------------------------------------------------------------- paths */

static int plain_word(const char *k)
{
    if (*k == '\0') return 0;
    for (; *k; k++) {
        if (!isalnum((unsigned char)*k) && *k != '_' && *k != '-') return 0;
    }
    return 1;
}

/* Append 'src' at buf[*len], keeping the NUL; returns 1 when it did not fit.
 * Done by hand because the compiler cannot prove snprintf fits and paths may
 * legitimately be cut (the message then still names the start of the path). */
static int append(char *buf, size_t size, size_t *len, const char *src)
{
    size_t n = strlen(src), room;
    int cut;

    if (size == 0) return 1;
    room = size - *len - 1;
    cut = n > room;
    if (cut) n = room;
    memcpy(buf + *len, src, n);
    *len += n;
    buf[*len] = '\0';
    return cut;
}

/* "prefix.key" into buf, or prefix["key"] when the key is not a plain word
 * (so a key with dots cannot be mistaken for nesting); 1 when cut short. */
int jsonv_path(char *buf, size_t size, const char *prefix, const char *key)
{
    size_t len = 0;
    int cut;

    buf[0] = '\0';
    cut = append(buf, size, &len, prefix);
    if (plain_word(key)) {
        if (*prefix) cut |= append(buf, size, &len, ".");
        cut |= append(buf, size, &len, key);
    } else {
        cut |= append(buf, size, &len, "[\"");
        cut |= append(buf, size, &len, key);
        cut |= append(buf, size, &len, "\"]");
    }
    return cut;
}

/* "prefix[i]" into buf; 1 when cut short. */
int jsonv_path_index(char *buf, size_t size, const char *prefix, size_t i)
{
    char idx[32];
    size_t len = 0;
    int cut;

    snprintf(idx, sizeof idx, "[%zu]", i);
    buf[0] = '\0';
    cut = append(buf, size, &len, prefix);
    cut |= append(buf, size, &len, idx);
    return cut;
}

/* Wrap the parsed document; sitereach files are objects at the top. */
int jsonv_root(const cJSON *json, const char *file, jsonv_node_t *out, err_t *e)
{
    out->json = json;
    out->file = file;
    out->path[0] = '\0';
    if (!cJSON_IsObject(json))
        return err_set(e, ERR_INPUT, "%s: the top level must be a JSON object {...}", file);
    return ERR_OK;
}

/* obj[key] with its path; out->json is NULL when the key (or obj) is absent. */
void jsonv_child(const jsonv_node_t *obj, const char *key, jsonv_node_t *out)
{
    out->file = obj->file;
    out->json = obj->json != NULL ? cJSON_GetObjectItemCaseSensitive(obj->json, key) : NULL;
    jsonv_path(out->path, sizeof out->path, obj->path, key);
}

/* A member of an object (path by key) or element of an array (path by index). */
void jsonv_member(const jsonv_node_t *parent, const cJSON *item, size_t i, jsonv_node_t *out)
{
    out->file = parent->file;
    out->json = item;
    if (cJSON_IsObject(parent->json) && item->string != NULL)
        jsonv_path(out->path, sizeof out->path, parent->path, item->string);
    else
        jsonv_path_index(out->path, sizeof out->path, parent->path, i);
}

/* ---------------------------------------------------------------- keys */

size_t jsonv_distance(const char *a, const char *b)
{
    /* Two-row dynamic programme; keys are short, so a fixed row suffices and
     * longer keys are simply "far" (no hint). */
    enum { MAXK = 64 };
    size_t la = strlen(a), lb = strlen(b), prev[MAXK + 1], cur[MAXK + 1];

    if (la > MAXK || lb > MAXK) return la > lb ? la : lb;
    for (size_t j = 0; j <= lb; j++) prev[j] = j;
    for (size_t i = 1; i <= la; i++) {
        cur[0] = i;
        for (size_t j = 1; j <= lb; j++) {
            size_t del = prev[j] + 1, ins = cur[j - 1] + 1;
            size_t sub = prev[j - 1] + (a[i - 1] != b[j - 1]);
            size_t m = del < ins ? del : ins;
            cur[j] = m < sub ? m : sub;
        }
        memcpy(prev, cur, (lb + 1) * sizeof prev[0]);
    }
    return prev[lb];
}

/* The allowed name closest to 'word' worth suggesting, or NULL: an equal name
 * ignoring case first, else the nearest within distance 2 that is not a
 * complete rewrite of a short name. */
static const char *closest(const char *word, const char *const *names)
{
    const char *best = NULL;
    size_t best_d = 3;

    for (size_t k = 0; names[k] != NULL; k++) {
        if (strcasecmp(word, names[k]) == 0) return names[k];
    }
    for (size_t k = 0; names[k] != NULL; k++) {
        size_t d = jsonv_distance(word, names[k]);
        if (d < best_d && d < strlen(names[k])) {
            best = names[k];
            best_d = d;
        }
    }
    return best;
}

/* Append "a, b, c" (quoted with 'q') to buf, stopping with "..." when full. */
static void list_names(char *buf, size_t size, const char *const *names, const char *q)
{
    size_t len = strlen(buf);

    for (size_t k = 0; names[k] != NULL; k++) {
        int n = snprintf(buf + len, size - len, "%s%s%s%s", k ? ", " : "", q, names[k], q);
        if (n < 0 || (size_t)n >= size - len) {
            if (size > 4) strcpy(buf + size - 4, "...");
            return;
        }
        len += (size_t)n;
    }
}

/* Refuse duplicate keys and keys outside 'allowed', with a did-you-mean hint
 * or the allowed list. Quadratic in the number of keys: fine for settings. */
int jsonv_check_keys(const jsonv_node_t *obj, const char *const *allowed, err_t *e)
{
    char path[JSONV_PATH_MAX];

    if (obj->json == NULL) return ERR_OK;
    for (const cJSON *c = obj->json->child; c != NULL; c = c->next) {
        jsonv_path(path, sizeof path, obj->path, c->string);
        /* cJSON keeps duplicates and lookups see only the first: refuse them. */
        for (const cJSON *d = obj->json->child; d != c; d = d->next) {
            if (strcmp(d->string, c->string) == 0)
                return err_set(e, ERR_INPUT, "%s: duplicate key '%s'", obj->file, path);
        }
        if (allowed == NULL) continue;
        int ok = 0;
        for (size_t k = 0; allowed[k] != NULL && !ok; k++) ok = strcmp(allowed[k], c->string) == 0;
        if (ok) continue;
        const char *hint = closest(c->string, allowed);
        if (hint != NULL)
            return err_set(e, ERR_INPUT, "%s: unknown key '%s'; did you mean '%s'?", obj->file,
                           path, hint);
        char names[300] = "";
        list_names(names, sizeof names, allowed, "");
        return err_set(e, ERR_INPUT, "%s: unknown key '%s'; allowed here: %s", obj->file, path,
                       names);
    }
    return ERR_OK;
}

/* ---------------------------------------------------------------- getters */

/* Shortest "%g" text that reads back as the same double. */
static void fmt_num(char *buf, size_t size, double v)
{
    snprintf(buf, size, "%.15g", v);
    if (strtod(buf, NULL) != v) snprintf(buf, size, "%.17g", v);
}

/* What the file holds, for "..., got X" (strings quoted and shortened). */
static void describe(const cJSON *j, char *buf, size_t size)
{
    if (cJSON_IsNumber(j)) fmt_num(buf, size, j->valuedouble);
    else if (cJSON_IsString(j) && strlen(j->valuestring) > 40)
        snprintf(buf, size, "string \"%.37s...\"", j->valuestring);
    else if (cJSON_IsString(j)) snprintf(buf, size, "string \"%s\"", j->valuestring);
    else if (cJSON_IsTrue(j)) snprintf(buf, size, "true");
    else if (cJSON_IsFalse(j)) snprintf(buf, size, "false");
    else if (cJSON_IsNull(j)) snprintf(buf, size, "null");
    else if (cJSON_IsArray(j)) snprintf(buf, size, "array");
    else if (cJSON_IsObject(j)) snprintf(buf, size, "object");
    else snprintf(buf, size, "an unreadable value");
}

/* " in (0, 20]", " >= 0", or "" for an unbounded range. */
static void fmt_range(char *buf, size_t size, jsonv_range_t r)
{
    char lo[40], hi[40];

    fmt_num(lo, sizeof lo, r.min);
    fmt_num(hi, sizeof hi, r.max);
    if (isfinite(r.min) && isfinite(r.max))
        snprintf(buf, size, " in %c%s, %s%c", r.min_open ? '(' : '[', lo, hi,
                 r.max_open ? ')' : ']');
    else if (isfinite(r.min)) snprintf(buf, size, " %s %s", r.min_open ? ">" : ">=", lo);
    else if (isfinite(r.max)) snprintf(buf, size, " %s %s", r.max_open ? "<" : "<=", hi);
    else buf[0] = '\0';
}

static int in_range(double v, jsonv_range_t r)
{
    if (!isfinite(v)) return 0;
    if (r.min_open ? !(v > r.min) : !(v >= r.min)) return 0;
    if (r.max_open ? !(v < r.max) : !(v <= r.max)) return 0;
    return 1;
}

/* Look up obj[key]: *has is 1 when a value is there to read and 0 when the
 * default applies; a missing required key is an error. */
static int lookup(const jsonv_node_t *obj, const char *key, int flags, jsonv_node_t *v,
                  int *has, err_t *e)
{
    *has = 0;
    jsonv_child(obj, key, v);
    if (obj->json == NULL) return ERR_OK; /* the whole object is absent: defaults */
    if (v->json == NULL) {
        if (flags & JSONV_REQUIRED)
            return err_set(e, ERR_INPUT, "%s: missing required key '%s'", obj->file, v->path);
        return ERR_OK;
    }
    if (cJSON_IsNull(v->json) && (flags & JSONV_NULLABLE)) return ERR_OK;
    *has = 1;
    return ERR_OK;
}

/* "FILE: key 'PATH' must be WHAT, got X". */
static int type_error(const jsonv_node_t *v, const char *what, err_t *e)
{
    char got[64];

    describe(v->json, got, sizeof got);
    return err_set(e, ERR_INPUT, "%s: key '%s' must be %s, got %s", v->file, v->path, what, got);
}

/* The value must be an object with only 'allowed' keys (NULL: any). */
int jsonv_as_object(const jsonv_node_t *v, const char *const *allowed, err_t *e)
{
    if (!cJSON_IsObject(v->json)) return type_error(v, "an object {...}", e);
    return jsonv_check_keys(v, allowed, e);
}

/* The value must be a finite number inside 'r'. */
int jsonv_as_number(const jsonv_node_t *v, jsonv_range_t r, double *out, err_t *e)
{
    char what[120];

    if (cJSON_IsNumber(v->json) && in_range(v->json->valuedouble, r)) {
        *out = v->json->valuedouble;
        return ERR_OK;
    }
    fmt_range(what + 8, sizeof what - 8, r);
    memcpy(what, "a number", 8);
    return type_error(v, what, e);
}

/* The value must be a string, non-empty unless JSONV_EMPTY_OK; the copy in
 * *out is the caller's to free. */
int jsonv_as_string(const jsonv_node_t *v, int flags, char **out, err_t *e)
{
    if (!cJSON_IsString(v->json)) return type_error(v, "a string", e);
    if (v->json->valuestring[0] == '\0' && !(flags & JSONV_EMPTY_OK))
        return err_set(e, ERR_INPUT, "%s: key '%s' must not be an empty string", v->file,
                       v->path);
    *out = strdup(v->json->valuestring);
    if (*out == NULL)
        return err_set(e, ERR_NOMEM, "%s: out of memory reading key '%s'", v->file, v->path);
    return ERR_OK;
}

/* The member's key as a plain decimal integer in [min, max]: "10", "-3";
 * not " 10", "+10" or "1e1". */
int jsonv_key_int(const jsonv_node_t *member, long min, long max, long *out, err_t *e)
{
    const char *k = member->json->string;
    char *end = NULL;
    long v;

    v = k != NULL ? strtol(k, &end, 10) : 0;
    /* strtol skips leading blanks and takes "+": accept only plain digits. */
    if (k == NULL || *k == '\0' || isspace((unsigned char)*k) || *k == '+' || *end != '\0' ||
        v < min || v > max)
        return err_set(e, ERR_INPUT, "%s: key '%s' must be an integer in [%ld, %ld] "
                       "written as a string, such as \"10\"", member->file, member->path, min,
                       max);
    *out = v;
    return ERR_OK;
}

/* obj[key] as an object checked against 'allowed'; out->json NULL when absent. */
int jsonv_object(const jsonv_node_t *obj, const char *key, int flags,
                 const char *const *allowed, jsonv_node_t *out, err_t *e)
{
    int has, rc = lookup(obj, key, flags, out, &has, e);

    if (rc != ERR_OK) return rc;
    if (has == 0) {
        out->json = NULL;
        return ERR_OK;
    }
    return jsonv_as_object(out, allowed, e);
}

/* obj[key] as an array of min_n..max_n elements; walk it with jsonv_member. */
int jsonv_array(const jsonv_node_t *obj, const char *key, int flags, size_t min_n,
                size_t max_n, jsonv_node_t *out, size_t *n, err_t *e)
{
    int has, rc = lookup(obj, key, flags, out, &has, e);
    size_t count;

    *n = 0;
    if (rc != ERR_OK) return rc;
    if (has == 0) {
        out->json = NULL;
        return ERR_OK;
    }
    if (!cJSON_IsArray(out->json)) return type_error(out, "an array [...]", e);
    count = (size_t)cJSON_GetArraySize(out->json);
    if (count < min_n || count > max_n) {
        if (min_n == max_n)
            return err_set(e, ERR_INPUT, "%s: key '%s' must have %zu values, got %zu", out->file,
                           out->path, min_n, count);
        return err_set(e, ERR_INPUT, "%s: key '%s' must have %zu to %zu values, got %zu",
                       out->file, out->path, min_n, max_n, count);
    }
    *n = count;
    return ERR_OK;
}

/* obj[key] as a number in 'r', in the file's units; 'dflt' when absent. */
int jsonv_number(const jsonv_node_t *obj, const char *key, int flags, jsonv_range_t r,
                 double dflt, double *out, err_t *e)
{
    jsonv_node_t v;
    int has, rc = lookup(obj, key, flags, &v, &has, e);

    if (rc != ERR_OK) return rc;
    if (has == 0) {
        *out = dflt;
        return ERR_OK;
    }
    return jsonv_as_number(&v, r, out, e);
}

/* obj[key] as an integral number in [min, max]; 'dflt' when absent. */
int jsonv_int(const jsonv_node_t *obj, const char *key, int flags, long min, long max,
              long dflt, long *out, err_t *e)
{
    jsonv_node_t v;
    int has, rc = lookup(obj, key, flags, &v, &has, e);
    char what[100];
    double d;

    if (rc != ERR_OK) return rc;
    if (has == 0) {
        *out = dflt;
        return ERR_OK;
    }
    if (cJSON_IsNumber(v.json)) {
        d = v.json->valuedouble;
        if (d == floor(d) && d >= (double)min && d <= (double)max) {
            *out = (long)d;
            return ERR_OK;
        }
    }
    snprintf(what, sizeof what, "an integer in [%ld, %ld]", min, max);
    return type_error(&v, what, e);
}

/* obj[key] as one of the n integers in 'allowed'; 'dflt' when absent. */
int jsonv_int_choice(const jsonv_node_t *obj, const char *key, int flags, const int *allowed,
                     size_t n, int dflt, int *out, err_t *e)
{
    jsonv_node_t v;
    int has, rc = lookup(obj, key, flags, &v, &has, e);
    char what[200] = "one of ";
    size_t len;

    if (rc != ERR_OK) return rc;
    if (has == 0) {
        *out = dflt;
        return ERR_OK;
    }
    for (size_t k = 0; k < n && cJSON_IsNumber(v.json); k++) {
        if (v.json->valuedouble == (double)allowed[k]) {
            *out = allowed[k];
            return ERR_OK;
        }
    }
    for (size_t k = 0; k < n; k++) {
        len = strlen(what);
        snprintf(what + len, sizeof what - len, "%s%d", k ? ", " : "", allowed[k]);
    }
    return type_error(&v, what, e);
}

/* obj[key] as true (1) or false (0); 'dflt' when absent. */
int jsonv_bool(const jsonv_node_t *obj, const char *key, int flags, int dflt, int *out,
               err_t *e)
{
    jsonv_node_t v;
    int has, rc = lookup(obj, key, flags, &v, &has, e);

    if (rc != ERR_OK) return rc;
    if (has == 0) {
        *out = dflt;
        return ERR_OK;
    }
    if (!cJSON_IsBool(v.json)) return type_error(&v, "true or false", e);
    *out = cJSON_IsTrue(v.json) ? 1 : 0;
    return ERR_OK;
}

/* obj[key] as a new string (caller frees); a copy of 'dflt' when absent, NULL
 * when 'dflt' is NULL or the value is null with JSONV_NULLABLE. */
int jsonv_string(const jsonv_node_t *obj, const char *key, int flags, const char *dflt,
                 char **out, err_t *e)
{
    jsonv_node_t v;
    int has, rc = lookup(obj, key, flags, &v, &has, e);

    *out = NULL;
    if (rc != ERR_OK) return rc;
    if (has == 0) {
        if (dflt == NULL || (v.json != NULL && cJSON_IsNull(v.json))) return ERR_OK;
        *out = strdup(dflt);
        if (*out == NULL)
            return err_set(e, ERR_NOMEM, "%s: out of memory reading key '%s'", obj->file, v.path);
        return ERR_OK;
    }
    return jsonv_as_string(&v, flags, out, e);
}

/* obj[key] as the index of one of 'names'; 'dflt' when absent. */
int jsonv_enum(const jsonv_node_t *obj, const char *key, int flags, const char *const *names,
               int dflt, int *out, err_t *e)
{
    jsonv_node_t v;
    int has, rc = lookup(obj, key, flags, &v, &has, e);
    char what[300] = "one of ", got[64];
    const char *hint;

    if (rc != ERR_OK) return rc;
    if (has == 0) {
        *out = dflt;
        return ERR_OK;
    }
    if (cJSON_IsString(v.json)) {
        for (int k = 0; names[k] != NULL; k++) {
            if (strcmp(names[k], v.json->valuestring) == 0) {
                *out = k;
                return ERR_OK;
            }
        }
    }
    list_names(what, sizeof what, names, "\"");
    describe(v.json, got, sizeof got);
    hint = cJSON_IsString(v.json) ? closest(v.json->valuestring, names) : NULL;
    if (hint != NULL)
        return err_set(e, ERR_INPUT, "%s: key '%s' must be %s, got %s; did you mean \"%s\"?",
                       v.file, v.path, what, got, hint);
    return err_set(e, ERR_INPUT, "%s: key '%s' must be %s, got %s", v.file, v.path, what, got);
}

/* obj[key] as 1..max_n numbers into buf (room for max_n); the defaults when
 * absent; with JSONV_INCREASING each must exceed the one before it. */
int jsonv_numbers(const jsonv_node_t *obj, const char *key, int flags, jsonv_range_t each,
                  size_t min_n, size_t max_n, const double *dflt, size_t n_dflt, double *buf,
                  size_t *n, err_t *e)
{
    jsonv_node_t arr, el;
    char what[120], before[40], got[40];
    size_t i = 0, count;
    int has, rc = lookup(obj, key, flags, &arr, &has, e);

    *n = 0;
    if (rc != ERR_OK) return rc;
    if (has == 0) {
        for (size_t k = 0; k < n_dflt && k < max_n; k++) buf[k] = dflt[k];
        *n = n_dflt < max_n ? n_dflt : max_n;
        return ERR_OK;
    }
    if (!cJSON_IsArray(arr.json)) {
        fmt_range(what, sizeof what, each);
        char full[160];
        snprintf(full, sizeof full, "an array of numbers%s%s", what[0] ? ", each" : "", what);
        return type_error(&arr, full, e);
    }
    count = (size_t)cJSON_GetArraySize(arr.json);
    if (count < min_n || count > max_n)
        return err_set(e, ERR_INPUT, "%s: key '%s' must have %zu to %zu values, got %zu",
                       arr.file, arr.path, min_n, max_n, count);
    for (const cJSON *c = arr.json->child; c != NULL; c = c->next, i++) {
        jsonv_member(&arr, c, i, &el);
        rc = jsonv_as_number(&el, each, &buf[i], e);
        if (rc != ERR_OK) return rc;
        if ((flags & JSONV_INCREASING) && i > 0 && !(buf[i] > buf[i - 1])) {
            fmt_num(before, sizeof before, buf[i - 1]);
            fmt_num(got, sizeof got, buf[i]);
            return err_set(e, ERR_INPUT, "%s: key '%s' must be greater than the value before it "
                           "(%s): the values must increase strictly, got %s", el.file, el.path,
                           before, got);
        }
    }
    *n = count;
    return ERR_OK;
}

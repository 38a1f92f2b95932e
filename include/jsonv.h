/* jsonv: strict reading of JSON settings files over cJSON, shared by every
 * module that reads a section of a scenario. A jsonv_node_t is a borrowed
 * cJSON value plus the file name and the key path ("travel.walk.speed_kmh",
 * "variants[2].closed") used in messages, so no state is global.
 * Every message starts with the file name and names the full key path.
 * Getters on an absent object (node.json == NULL) give their defaults without
 * error: a key is "required" only within an object that is present. */
#ifndef JSONV_H
#define JSONV_H

#include <stddef.h>

#include <cjson/cJSON.h>

#include "err.h"

#define JSONV_PATH_MAX 256

/* Flags for the getters; combine with '|'. */
enum {
    JSONV_OPTIONAL = 0,
    JSONV_REQUIRED = 1,   /* a missing key is an error */
    JSONV_NULLABLE = 2,   /* an explicit null is accepted: strings give NULL, others the default */
    JSONV_EMPTY_OK = 4,   /* strings: "" is accepted (otherwise an error) */
    JSONV_INCREASING = 8  /* number arrays: each value strictly greater than the one before */
};

/* A JSON value being read: borrowed, valid while the cJSON tree lives. */
typedef struct jsonv_node {
    const cJSON *json;           /* NULL when the key is absent */
    const char *file;            /* borrowed; starts every message */
    char path[JSONV_PATH_MAX];   /* "" for the top level */
} jsonv_node_t;

/* Allowed interval for numbers; +-INFINITY for an open end without a bound. */
typedef struct jsonv_range {
    double min, max;
    int min_open, max_open;      /* 1: the bound itself is excluded */
} jsonv_range_t;

#define JSONV_CLOSED(lo, hi) ((jsonv_range_t){(lo), (hi), 0, 0})      /* [lo, hi] */
#define JSONV_OPEN_CLOSED(lo, hi) ((jsonv_range_t){(lo), (hi), 1, 0}) /* (lo, hi] */
#define JSONV_CLOSED_OPEN(lo, hi) ((jsonv_range_t){(lo), (hi), 0, 1}) /* [lo, hi) */
#define JSONV_OPEN(lo, hi) ((jsonv_range_t){(lo), (hi), 1, 1})        /* (lo, hi) */

/* Parse 'text' strictly (RFC 8259: no comments, no trailing commas, no control
 * characters in strings, one value only). A syntax error is ERR_INPUT
 * "FILE: JSON syntax error at line L, column C: WHAT" (lines and columns from 1,
 * columns in characters). Caller frees *out with cJSON_Delete. */
int jsonv_parse(const char *text, const char *file, cJSON **out, err_t *e);
/* Line and column (from 1; columns count UTF-8 characters) of byte 'offset'. */
void jsonv_line_col(const char *text, size_t offset, int *line, int *col);
/* Edit distance (insertions, deletions, substitutions) between two keys. */
size_t jsonv_distance(const char *a, const char *b);

/* Path building into a caller buffer; returns 1 when it had to truncate.
 * jsonv_path gives "prefix.key" ("key" when prefix is empty; keys that are not
 * plain words are written prefix["key"]); jsonv_path_index gives "prefix[i]". */
int jsonv_path(char *buf, size_t size, const char *prefix, const char *key);
int jsonv_path_index(char *buf, size_t size, const char *prefix, size_t i);

/* The top level of a parsed document; it must be an object. */
int jsonv_root(const cJSON *json, const char *file, jsonv_node_t *out, err_t *e);
/* The value under 'key' (out->json NULL when absent); no checks. */
void jsonv_child(const jsonv_node_t *obj, const char *key, jsonv_node_t *out);
/* The i-th member of an object or element of an array, with its path. */
void jsonv_member(const jsonv_node_t *parent, const cJSON *item, size_t i, jsonv_node_t *out);

/* Reject duplicate keys, and keys not in 'allowed' (NULL-terminated; NULL
 * allows any key): "unknown key 'a.b'; did you mean 'c'?" when one allowed key
 * is within edit distance 2 or equal ignoring case, else the allowed list. */
int jsonv_check_keys(const jsonv_node_t *obj, const char *const *allowed, err_t *e);

/* Typed getters for obj[key]. Absent (or null with JSONV_NULLABLE) gives the
 * default; absent with JSONV_REQUIRED is "missing required key 'a.b'". */
int jsonv_object(const jsonv_node_t *obj, const char *key, int flags,
                 const char *const *allowed, jsonv_node_t *out, err_t *e);
/* An array with min_n..max_n elements; *n is 0 when absent. */
int jsonv_array(const jsonv_node_t *obj, const char *key, int flags, size_t min_n,
                size_t max_n, jsonv_node_t *out, size_t *n, err_t *e);
int jsonv_number(const jsonv_node_t *obj, const char *key, int flags, jsonv_range_t r,
                 double dflt, double *out, err_t *e);
/* An integral number in [min, max]. */
int jsonv_int(const jsonv_node_t *obj, const char *key, int flags, long min, long max,
              long dflt, long *out, err_t *e);
/* An integer from the list 'allowed' (n values). */
int jsonv_int_choice(const jsonv_node_t *obj, const char *key, int flags, const int *allowed,
                     size_t n, int dflt, int *out, err_t *e);
int jsonv_bool(const jsonv_node_t *obj, const char *key, int flags, int dflt, int *out,
               err_t *e);
/* A string copied into *out (caller frees with free); 'dflt' (may be NULL) is
 * copied when absent. */
int jsonv_string(const jsonv_node_t *obj, const char *key, int flags, const char *dflt,
                 char **out, err_t *e);
/* One of the strings in 'names' (NULL-terminated); *out is its index. */
int jsonv_enum(const jsonv_node_t *obj, const char *key, int flags, const char *const *names,
               int dflt, int *out, err_t *e);
/* An array of min_n..max_n numbers, each in 'each', into buf (room for max_n);
 * when absent, the n_dflt values of 'dflt' are copied. JSONV_INCREASING applies. */
int jsonv_numbers(const jsonv_node_t *obj, const char *key, int flags, jsonv_range_t each,
                  size_t min_n, size_t max_n, const double *dflt, size_t n_dflt, double *buf,
                  size_t *n, err_t *e);

/* The same checks on a value already in hand (an array element or a member
 * of a map-like object), for loops over jsonv_member. */
int jsonv_as_object(const jsonv_node_t *v, const char *const *allowed, err_t *e);
int jsonv_as_number(const jsonv_node_t *v, jsonv_range_t r, double *out, err_t *e);
int jsonv_as_string(const jsonv_node_t *v, int flags, char **out, err_t *e);
/* The key of an object member read as an integer in [min, max] ("10" -> 10). */
int jsonv_key_int(const jsonv_node_t *member, long min, long max, long *out, err_t *e);

#endif

/* err: error values handed back to callers, and a list of warnings.
 * Every call that can fail returns int (ERR_OK = 0) and fills an err_t with
 * one sentence that names the file, layer, feature or key at fault.
 * Only the command layer turns an err_t into text and an exit status. */
#ifndef ERR_H
#define ERR_H

#include <stddef.h>

enum {
    ERR_OK = 0,
    ERR_INPUT,    /* bad input data or scenario: exit 1 */
    ERR_IO,       /* file missing, unreadable or unwritable: exit 1 */
    ERR_USAGE,    /* bad command line: exit 2 */
    ERR_GRAPH,    /* igraph failure: exit 3 */
    ERR_SOLVER,   /* GLPK failure: exit 3 */
    ERR_NOMEM,    /* out of memory: exit 3 */
    ERR_INTERNAL  /* a bug: exit 3 */
};

/* Exit statuses documented in README.md and docs/sitereach.1. */
enum { EXIT_OK = 0, EXIT_INPUT = 1, EXIT_USAGE = 2, EXIT_INTERNAL = 3 };

typedef struct err {
    int code;        /* ERR_* */
    char msg[512];   /* one sentence, no newline */
} err_t;

/* Fill 'e' (may be NULL) with code and a printf-style message; returns code. */
int err_set(err_t *e, int code, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
/* Prefix the message already in 'e' with more context ("reading x: ..."). */
int err_prefix(err_t *e, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* Exit status for an error code. */
int err_exit_status(int code);
/* Short name of a code, e.g. "input". */
const char *err_code_name(int code);

/* Warnings gathered while loading inputs; reported by 'check' and summaries. */
typedef struct warn_list {
    char **items;   /* owned strings */
    size_t n, cap;
} warn_list_t;

void warn_init(warn_list_t *w);
void warn_destroy(warn_list_t *w);               /* NULL-safe */
/* Append a formatted warning; silently drops it if memory runs out. */
void warn_add(warn_list_t *w, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

#endif

/* err: error values and warning lists (see include/err.h). */
#include "err.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int err_set(err_t *e, int code, const char *fmt, ...)
{
    if (e != NULL) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(e->msg, sizeof e->msg, fmt, ap);
        va_end(ap);
        /* Keep the one-line promise even if a library message had a newline. */
        for (char *p = e->msg; *p; p++) {
            if (*p == '\n' || *p == '\r') *p = ' ';
        }
        e->code = code;
    }
    return code;
}

int err_prefix(err_t *e, const char *fmt, ...)
{
    char head[256], old[sizeof e->msg];
    size_t hl;
    va_list ap;

    if (e == NULL) return ERR_INTERNAL;
    va_start(ap, fmt);
    vsnprintf(head, sizeof head, fmt, ap);
    va_end(ap);
    memcpy(old, e->msg, sizeof old);
    /* Truncate by hand: the context first, then as much of the old text as fits. */
    hl = strlen(head);
    if (hl > sizeof e->msg - 3) hl = sizeof e->msg - 3;
    memcpy(e->msg, head, hl);
    e->msg[hl] = ':';
    e->msg[hl + 1] = ' ';
    {
        size_t room = sizeof e->msg - hl - 3, ol = strlen(old);
        if (ol > room) ol = room;
        memcpy(e->msg + hl + 2, old, ol);
        e->msg[hl + 2 + ol] = '\0';
    }
    return e->code;
}

int err_exit_status(int code)
{
    switch (code) {
    case ERR_OK: return EXIT_OK;
    case ERR_INPUT:
    case ERR_IO: return EXIT_INPUT;
    case ERR_USAGE: return EXIT_USAGE;
    default: return EXIT_INTERNAL;
    }
}

const char *err_code_name(int code)
{
    static const char *const names[] = {"ok", "input", "io", "usage", "graph",
                                        "solver", "memory", "internal"};
    if (code < 0 || code > ERR_INTERNAL) return "unknown";
    return names[code];
}

void warn_init(warn_list_t *w)
{
    w->items = NULL;
    w->n = w->cap = 0;
}

void warn_destroy(warn_list_t *w)
{
    if (w == NULL) return;
    for (size_t i = 0; i < w->n; i++) free(w->items[i]);
    free(w->items);
    warn_init(w);
}

void warn_add(warn_list_t *w, const char *fmt, ...)
{
    char buf[512];
    va_list ap;
    char *s;

    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    if (w->n == w->cap) {
        size_t cap = w->cap ? w->cap * 2 : 8;
        char **items = realloc(w->items, cap * sizeof *items);
        if (items == NULL) return;
        w->items = items;
        w->cap = cap;
    }
    s = strdup(buf);
    if (s == NULL) return;
    w->items[w->n++] = s;
}

/* table: a small column-typed table (text, integer or real columns) that the
 * writers turn into CSV, GeoPackage attributes and JSON, so every output of a
 * command is described once. */
#ifndef TABLE_H
#define TABLE_H

#include <stddef.h>

#include "err.h"

enum { TABLE_TEXT = 0, TABLE_INT = 1, TABLE_REAL = 2 };

typedef struct table table_t;

/* A new empty table with the given columns ("name:type" not needed: pass
 * names and types). Caller frees with table_free. NULL when out of memory. */
table_t *table_new(size_t n_cols, const char *const *names, const int *types);
void table_free(table_t *t);   /* NULL-safe */

/* Append a row; returns its index or -1 when out of memory. */
long table_add_row(table_t *t);
/* Set a cell (the row must exist). Text is copied. */
void table_set_text(table_t *t, size_t row, size_t col, const char *s);
void table_set_num(table_t *t, size_t row, size_t col, double v);

size_t table_rows(const table_t *t);
size_t table_cols(const table_t *t);
const char *table_col_name(const table_t *t, size_t col);
int table_col_type(const table_t *t, size_t col);
const char *table_text(const table_t *t, size_t row, size_t col);  /* "" when unset */
double table_num(const table_t *t, size_t row, size_t col);       /* NAN when unset */

/* Write as CSV (RFC 4180 quoting, '.' decimals, header row). Atomic. Reals are
 * printed with up to 'digits' significant digits. */
int table_write_csv(const table_t *t, const char *path, int digits, err_t *e);
/* The outputs' usual form: 'dir/name', reals with 10 significant digits. */
int table_save(const table_t *t, const char *dir, const char *name, err_t *e);

#endif

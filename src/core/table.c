/* table: column-typed tables and their CSV form (see include/table.h). */
#include "table.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "output.h"

struct table {
    size_t n_cols, n_rows, cap;
    char **names;
    int *types;
    char **text;    /* n_rows * n_cols, NULL where unset or numeric */
    double *num;    /* n_rows * n_cols */
};

table_t *table_new(size_t n_cols, const char *const *names, const int *types)
{
    table_t *t = calloc(1, sizeof *t);
    if (t == NULL) return NULL;
    t->n_cols = n_cols;
    t->names = calloc(n_cols, sizeof *t->names);
    t->types = calloc(n_cols, sizeof *t->types);
    if (t->names == NULL || t->types == NULL) {
        table_free(t);
        return NULL;
    }
    for (size_t c = 0; c < n_cols; c++) {
        t->names[c] = strdup(names[c]);
        t->types[c] = types[c];
        if (t->names[c] == NULL) {
            table_free(t);
            return NULL;
        }
    }
    return t;
}

void table_free(table_t *t)
{
    if (t == NULL) return;
    if (t->text != NULL)
        for (size_t i = 0; i < t->n_rows * t->n_cols; i++) free(t->text[i]);
    if (t->names != NULL)
        for (size_t c = 0; c < t->n_cols; c++) free(t->names[c]);
    free(t->names);
    free(t->types);
    free(t->text);
    free(t->num);
    free(t);
}

long table_add_row(table_t *t)
{
    if (t->n_rows == t->cap) {
        size_t cap = t->cap ? t->cap * 2 : 16;
        char **text = realloc(t->text, cap * t->n_cols * sizeof *text);
        double *num;
        if (text == NULL) return -1;
        t->text = text;
        num = realloc(t->num, cap * t->n_cols * sizeof *num);
        if (num == NULL) return -1;
        t->num = num;
        t->cap = cap;
    }
    for (size_t c = 0; c < t->n_cols; c++) {
        t->text[t->n_rows * t->n_cols + c] = NULL;
        t->num[t->n_rows * t->n_cols + c] = NAN;
    }
    return (long)t->n_rows++;
}

void table_set_text(table_t *t, size_t row, size_t col, const char *s)
{
    char **slot = &t->text[row * t->n_cols + col];
    free(*slot);
    *slot = s ? strdup(s) : NULL;
}

void table_set_num(table_t *t, size_t row, size_t col, double v)
{
    t->num[row * t->n_cols + col] = v;
}

size_t table_rows(const table_t *t) { return t->n_rows; }
size_t table_cols(const table_t *t) { return t->n_cols; }
const char *table_col_name(const table_t *t, size_t col) { return t->names[col]; }
int table_col_type(const table_t *t, size_t col) { return t->types[col]; }

const char *table_text(const table_t *t, size_t row, size_t col)
{
    const char *s = t->text[row * t->n_cols + col];
    return s ? s : "";
}

double table_num(const table_t *t, size_t row, size_t col)
{
    return t->num[row * t->n_cols + col];
}

static void put_text(FILE *f, const char *s)
{
    if (strpbrk(s, ",\"\n\r") == NULL) {
        fputs(s, f);
        return;
    }
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"') fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

int table_write_csv(const table_t *t, const char *path, int digits, err_t *e)
{
    out_file_t of;
    int rc = out_file_open(&of, path, e);

    if (rc != ERR_OK) return rc;
    for (size_t c = 0; c < t->n_cols; c++) {
        if (c) fputc(',', of.f);
        put_text(of.f, t->names[c]);
    }
    fputc('\n', of.f);
    for (size_t r = 0; r < t->n_rows; r++) {
        for (size_t c = 0; c < t->n_cols; c++) {
            double v = table_num(t, r, c);
            if (c) fputc(',', of.f);
            if (t->types[c] == TABLE_TEXT) put_text(of.f, table_text(t, r, c));
            else if (isnan(v)) continue;                 /* empty = not applicable */
            else if (isinf(v)) fputs(v > 0 ? "inf" : "-inf", of.f);
            else if (t->types[c] == TABLE_INT) fprintf(of.f, "%.0f", v);
            else fprintf(of.f, "%.*g", digits, v);
        }
        fputc('\n', of.f);
    }
    return out_file_commit(&of, e);
}

int table_save(const table_t *t, const char *dir, const char *name, err_t *e)
{
    char *path = out_join(dir, name);
    int rc;

    if (path == NULL) return err_set(e, ERR_NOMEM, "out of memory writing %s", name);
    rc = table_write_csv(t, path, 10, e);
    free(path);
    return rc;
}

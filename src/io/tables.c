/* tables: CSV inputs for the models (see tables.h and docs/tables.md).
 * A small reader splits each line on commas (no quoting: ids may not contain
 * commas), trims blanks and a trailing CR, skips blank lines, and finds columns
 * by header name so extra columns are ignored. Ids are mapped to indices with an
 * open-addressing hash table. Shortest paths use igraph (Dijkstra), the only
 * place in the table path that touches igraph. */
#include "tables.h"

#include <errno.h>
#include <igraph.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---- a whole CSV file split into lines and fields ---- */

typedef struct csv {
    const char *path;
    char *buf;              /* file contents, modified in place */
    char **field;           /* all fields, row-major */
    size_t *row_start;      /* first field of each row (n_rows + 1) */
    size_t *line;           /* file line number of each row */
    size_t n_rows;          /* rows including the header */
} csv_t;

static void csv_destroy(csv_t *c)
{
    free(c->buf);
    free(c->field);
    free(c->row_start);
    free(c->line);
    memset(c, 0, sizeof *c);
}

static char *trim(char *s)
{
    char *end;
    while (*s == ' ' || *s == '\t') s++;
    end = s + strlen(s);
    while (end > s && (end[-1] == ' ' || end[-1] == '\t' || end[-1] == '\r')) *--end = '\0';
    return s;
}

static int csv_read(const char *path, const char *what, csv_t *c, err_t *e)
{
    FILE *f = NULL;
    long size;
    size_t nf = 0, nr = 0, cap_f = 0, cap_r = 0, lineno = 0;
    int rc = ERR_OK;
    char *s, *next;

    memset(c, 0, sizeof *c);
    c->path = path;
    f = fopen(path, "rb");
    if (f == NULL) {
        rc = err_set(e, ERR_IO, "cannot open %s table '%s': %s", what, path, strerror(errno));
        goto done;
    }
    if (fseek(f, 0, SEEK_END) != 0 || (size = ftell(f)) < 0 || fseek(f, 0, SEEK_SET) != 0) {
        rc = err_set(e, ERR_IO, "cannot read %s table '%s': %s", what, path, strerror(errno));
        goto done;
    }
    c->buf = malloc((size_t)size + 1);
    if (c->buf == NULL) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading '%s' (%ld bytes)", path, size);
        goto done;
    }
    if (fread(c->buf, 1, (size_t)size, f) != (size_t)size) {
        rc = err_set(e, ERR_IO, "cannot read %s table '%s': short read", what, path);
        goto done;
    }
    c->buf[size] = '\0';
    for (s = c->buf; s != NULL; s = next) {
        char *nl = strchr(s, '\n');
        next = nl ? nl + 1 : NULL;
        if (nl) *nl = '\0';
        lineno++;
        if (*trim(s) == '\0') continue;
        if (nr + 2 > cap_r) {
            cap_r = cap_r ? 2 * cap_r : 256;
            size_t *a = realloc(c->row_start, cap_r * sizeof *a);
            if (a) c->row_start = a;
            size_t *b = realloc(c->line, cap_r * sizeof *b);
            if (b) c->line = b;
            if (!a || !b) {
                rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
                goto done;
            }
        }
        c->row_start[nr] = nf;
        c->line[nr] = lineno;
        nr++;
        for (char *fs = s;;) {
            char *comma = strchr(fs, ',');
            if (comma) *comma = '\0';
            if (nf + 1 > cap_f) {
                cap_f = cap_f ? 2 * cap_f : 1024;
                char **t = realloc(c->field, cap_f * sizeof *t);
                if (t == NULL) {
                    rc = err_set(e, ERR_NOMEM, "out of memory reading '%s'", path);
                    goto done;
                }
                c->field = t;
            }
            c->field[nf++] = trim(fs);
            if (!comma) break;
            fs = comma + 1;
        }
    }
    if (nr == 0) {
        rc = err_set(e, ERR_INPUT, "%s table '%s' is empty; it needs a header row", what, path);
        goto done;
    }
    c->row_start[nr] = nf;
    c->n_rows = nr;
done:
    if (f) fclose(f);
    if (rc != ERR_OK) csv_destroy(c);
    return rc;
}

static size_t csv_nf(const csv_t *c, size_t row) { return c->row_start[row + 1] - c->row_start[row]; }

static const char *csv_get(const csv_t *c, size_t row, int col)
{
    if (col < 0 || (size_t)col >= csv_nf(c, row)) return "";
    return c->field[c->row_start[row] + (size_t)col];
}

/* Column index of 'name' in the header, or -1. */
static int csv_col(const csv_t *c, const char *name)
{
    for (size_t k = 0; k < csv_nf(c, 0); k++)
        if (strcmp(c->field[k], name) == 0) return (int)k;
    return -1;
}

static int need_cols(const csv_t *c, const char *what, const char *const *names, int *cols,
                     const char *expect, err_t *e)
{
    for (int k = 0; names[k] != NULL; k++) {
        cols[k] = csv_col(c, names[k]);
        if (cols[k] < 0)
            return err_set(e, ERR_INPUT, "%s table '%s' line %zu: bad header, no column '%s' "
                           "(expected %s)", what, c->path, c->line[0], names[k], expect);
    }
    return ERR_OK;
}

/* A number in a cell; 'dflt' when the cell is empty and dflt is not NAN. */
static int cell_num(const csv_t *c, size_t row, int col, const char *name, double dflt,
                    int allow_inf, double *out, err_t *e)
{
    const char *s = csv_get(c, row, col);
    char *end;
    if (*s == '\0') {
        if (!isnan(dflt)) {
            *out = dflt;
            return ERR_OK;
        }
        return err_set(e, ERR_INPUT, "'%s' line %zu, column '%s': empty; a number is needed",
                       c->path, c->line[row], name);
    }
    errno = 0;
    *out = strtod(s, &end);
    if (*end != '\0' || end == s)
        return err_set(e, ERR_INPUT, "'%s' line %zu, column '%s': '%s' is not a number",
                       c->path, c->line[row], name, s);
    if (isnan(*out) || (!allow_inf && isinf(*out)))
        return err_set(e, ERR_INPUT, "'%s' line %zu, column '%s': '%s' is not a finite number",
                       c->path, c->line[row], name, s);
    if (*out < 0)
        return err_set(e, ERR_INPUT, "'%s' line %zu, column '%s': %s is negative; it must be "
                       ">= 0", c->path, c->line[row], name, s);
    return ERR_OK;
}

/* ---- id -> index hash table ---- */

typedef struct idmap {
    const char **key;   /* borrowed strings */
    int *val;
    size_t cap, n;
} idmap_t;

static size_t hash_str(const char *s)
{
    size_t h = 1469598103934665603ULL;   /* FNV-1a, 64-bit */
    for (; *s; s++) h = (h ^ (unsigned char)*s) * 1099511628211ULL;
    return h;
}

static void idmap_destroy(idmap_t *m)
{
    free(m->key);
    free(m->val);
    memset(m, 0, sizeof *m);
}

static int idmap_grow(idmap_t *m, err_t *e)
{
    idmap_t n = {0};
    n.cap = m->cap ? 2 * m->cap : 1024;
    n.key = calloc(n.cap, sizeof *n.key);
    n.val = malloc(n.cap * sizeof *n.val);
    if (!n.key || !n.val) {
        idmap_destroy(&n);
        return err_set(e, ERR_NOMEM, "out of memory indexing ids");
    }
    for (size_t k = 0; k < m->cap; k++) {
        if (m->key[k] == NULL) continue;
        size_t h = hash_str(m->key[k]) & (n.cap - 1);
        while (n.key[h] != NULL) h = (h + 1) & (n.cap - 1);
        n.key[h] = m->key[k];
        n.val[h] = m->val[k];
    }
    n.n = m->n;
    idmap_destroy(m);
    *m = n;
    return ERR_OK;
}

/* Index of 'id', or -1. */
static int idmap_find(const idmap_t *m, const char *id)
{
    if (m->cap == 0) return -1;
    size_t h = hash_str(id) & (m->cap - 1);
    while (m->key[h] != NULL) {
        if (strcmp(m->key[h], id) == 0) return m->val[h];
        h = (h + 1) & (m->cap - 1);
    }
    return -1;
}

/* Insert id with value v; *had = existing value (or -1 if new). */
static int idmap_put(idmap_t *m, const char *id, int v, int *had, err_t *e)
{
    if ((m->n + 1) * 2 > m->cap && idmap_grow(m, e) != ERR_OK) return e->code;
    size_t h = hash_str(id) & (m->cap - 1);
    while (m->key[h] != NULL) {
        if (strcmp(m->key[h], id) == 0) {
            *had = m->val[h];
            return ERR_OK;
        }
        h = (h + 1) & (m->cap - 1);
    }
    m->key[h] = id;
    m->val[h] = v;
    m->n++;
    *had = -1;
    return ERR_OK;
}

/* ---- demand and site tables ---- */

static int read_ids(const csv_t *c, const char *what, int idcol, idmap_t *map, err_t *e)
{
    for (size_t r = 1; r < c->n_rows; r++) {
        const char *id = csv_get(c, r, idcol);
        int had;
        if (*id == '\0')
            return err_set(e, ERR_INPUT, "'%s' line %zu, column 'id': empty id in the %s table",
                           c->path, c->line[r], what);
        if (idmap_put(map, id, (int)(r - 1), &had, e) != ERR_OK) return e->code;
        if (had >= 0)
            return err_set(e, ERR_INPUT, "'%s' line %zu, column 'id': duplicate id '%s' (first "
                           "on line %zu)", c->path, c->line[r], id, c->line[had + 1]);
    }
    return ERR_OK;
}

/* Read demand and site tables into a new problem; fills the id maps. */
static int load_units_sites(const char *demand_csv, const char *sites_csv, csv_t *dc, csv_t *sc,
                            idmap_t *dmap, idmap_t *smap, loc_problem_t **out, err_t *e)
{
    static const char *const dnames[] = {"id", "weight", NULL};
    static const char *const snames[] = {"id", NULL};
    int dcol[2], scol[1], ccap, cfix, cstate;
    loc_problem_t *p = NULL;
    int rc;

    *out = NULL;
    if ((rc = csv_read(demand_csv, "demand", dc, e)) != ERR_OK) return rc;
    if ((rc = need_cols(dc, "demand", dnames, dcol, "id,weight", e)) != ERR_OK) return rc;
    if ((rc = csv_read(sites_csv, "site", sc, e)) != ERR_OK) return rc;
    if ((rc = need_cols(sc, "site", snames, scol, "id[,capacity][,fixed_cost][,state]", e)))
        return rc;
    if (sc->n_rows < 2)
        return err_set(e, ERR_INPUT, "site table '%s' has no candidates; add at least one row",
                       sites_csv);
    if ((rc = read_ids(dc, "demand", dcol[0], dmap, e)) != ERR_OK) return rc;
    if ((rc = read_ids(sc, "site", scol[0], smap, e)) != ERR_OK) return rc;
    if ((rc = loc_new(dc->n_rows - 1, sc->n_rows - 1, &p, e)) != ERR_OK) return rc;
    for (size_t r = 1; r < dc->n_rows; r++) {
        if ((rc = cell_num(dc, r, dcol[1], "weight", NAN, 0, &p->weight[r - 1], e))) goto done;
        if ((rc = loc_set_unit_id(p, r - 1, csv_get(dc, r, dcol[0]), e))) goto done;
    }
    ccap = csv_col(sc, "capacity");
    cfix = csv_col(sc, "fixed_cost");
    cstate = csv_col(sc, "state");
    for (size_t r = 1; r < sc->n_rows; r++) {
        size_t i = r - 1;
        if ((rc = loc_set_site_id(p, i, csv_get(sc, r, scol[0]), e))) goto done;
        if (ccap >= 0 && (rc = cell_num(sc, r, ccap, "capacity", INFINITY, 1, &p->capacity[i], e)))
            goto done;
        if (cfix >= 0 && (rc = cell_num(sc, r, cfix, "fixed_cost", 0, 0, &p->fixed_cost[i], e)))
            goto done;
        if (cstate >= 0) {
            const char *s = csv_get(sc, r, cstate);
            if (*s == '\0' || strcmp(s, "candidate") == 0) p->state[i] = LOC_CANDIDATE;
            else if (strcmp(s, "open") == 0) p->state[i] = LOC_FIXED_OPEN;
            else if (strcmp(s, "may_close") == 0) p->state[i] = LOC_MAY_CLOSE;
            else {
                rc = err_set(e, ERR_INPUT, "'%s' line %zu, column 'state': '%s' is not one of "
                             "candidate, open, may_close", sc->path, sc->line[r], s);
                goto done;
            }
        }
    }
    *out = p;
    p = NULL;
done:
    loc_free(p);
    return rc;
}

int tables_load_matrix(const char *matrix_csv, const char *demand_csv, const char *sites_csv,
                       loc_problem_t **out, err_t *e)
{
    static const char *const mnames[] = {"demand_id", "site_id", "cost", NULL};
    csv_t dc = {0}, sc = {0}, mc = {0};
    idmap_t dmap = {0}, smap = {0};
    loc_problem_t *p = NULL;
    int mcol[3], rc;

    *out = NULL;
    if ((rc = load_units_sites(demand_csv, sites_csv, &dc, &sc, &dmap, &smap, &p, e))) goto done;
    if ((rc = csv_read(matrix_csv, "cost matrix", &mc, e)) != ERR_OK) goto done;
    if ((rc = need_cols(&mc, "cost matrix", mnames, mcol, "demand_id,site_id,cost", e))) goto done;
    for (size_t r = 1; r < mc.n_rows; r++) {
        const char *did = csv_get(&mc, r, mcol[0]), *sid = csv_get(&mc, r, mcol[1]);
        int j = idmap_find(&dmap, did), i = idmap_find(&smap, sid);
        double cost;
        if (j < 0) {
            rc = err_set(e, ERR_INPUT, "'%s' line %zu, column 'demand_id': '%s' is not in the "
                         "demand table '%s'", matrix_csv, mc.line[r], did, demand_csv);
            goto done;
        }
        if (i < 0) {
            rc = err_set(e, ERR_INPUT, "'%s' line %zu, column 'site_id': '%s' is not in the "
                         "site table '%s'", matrix_csv, mc.line[r], sid, sites_csv);
            goto done;
        }
        if ((rc = cell_num(&mc, r, mcol[2], "cost", NAN, 0, &cost, e))) goto done;
        if ((rc = loc_add_pair(p, (size_t)j, (size_t)i, cost, e))) goto done;
    }
    /* A pair listed twice is an error: which cost is meant cannot be guessed. */
    {
        size_t n = p->n_pairs;
        if ((rc = loc_finish(p, e)) != ERR_OK) goto done;
        if (p->n_pairs != n) {
            rc = err_set(e, ERR_INPUT, "cost matrix '%s' lists %zu (demand_id, site_id) pairs "
                         "more than once; keep one row per pair", matrix_csv, n - p->n_pairs);
            goto done;
        }
    }
    *out = p;
    p = NULL;
done:
    loc_free(p);
    csv_destroy(&dc);
    csv_destroy(&sc);
    csv_destroy(&mc);
    idmap_destroy(&dmap);
    idmap_destroy(&smap);
    return rc;
}

int tables_load_network(const char *edges_csv, int directed, const char *demand_csv,
                        const char *sites_csv, double limit, loc_problem_t **out, err_t *e)
{
    static const char *const enames[] = {"from", "to", "cost", NULL};
    csv_t dc = {0}, sc = {0}, ec = {0};
    idmap_t dmap = {0}, smap = {0}, nmap = {0};
    loc_problem_t *p = NULL;
    igraph_t graph;
    igraph_vector_int_t edges;
    igraph_vector_t weights;
    igraph_vector_int_t from;
    igraph_matrix_t dist;
    int graph_ok = 0, edges_ok = 0, w_ok = 0, from_ok = 0, dist_ok = 0;
    int *unit_node = NULL, *site_node = NULL;
    int ecol[3], rc;
    size_t n_nodes = 0;

    *out = NULL;
    if ((rc = load_units_sites(demand_csv, sites_csv, &dc, &sc, &dmap, &smap, &p, e))) goto done;
    if ((rc = csv_read(edges_csv, "edge list", &ec, e)) != ERR_OK) goto done;
    if ((rc = need_cols(&ec, "edge list", enames, ecol, "from,to,cost", e))) goto done;
    if (igraph_vector_int_init(&edges, 0) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading edge list '%s'", edges_csv);
        goto done;
    }
    edges_ok = 1;
    if (igraph_vector_init(&weights, 0) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "out of memory reading edge list '%s'", edges_csv);
        goto done;
    }
    w_ok = 1;
    for (size_t r = 1; r < ec.n_rows; r++) {
        double cost;
        int ends[2];
        for (int k = 0; k < 2; k++) {
            const char *id = csv_get(&ec, r, ecol[k]);
            int had;
            if (*id == '\0') {
                rc = err_set(e, ERR_INPUT, "'%s' line %zu, column '%s': empty node id", edges_csv,
                             ec.line[r], enames[k]);
                goto done;
            }
            if ((rc = idmap_put(&nmap, id, (int)n_nodes, &had, e))) goto done;
            ends[k] = had >= 0 ? had : (int)n_nodes++;
        }
        if ((rc = cell_num(&ec, r, ecol[2], "cost", NAN, 0, &cost, e))) goto done;
        if (igraph_vector_int_push_back(&edges, ends[0]) != IGRAPH_SUCCESS ||
            igraph_vector_int_push_back(&edges, ends[1]) != IGRAPH_SUCCESS ||
            igraph_vector_push_back(&weights, cost) != IGRAPH_SUCCESS) {
            rc = err_set(e, ERR_NOMEM, "out of memory reading edge list '%s'", edges_csv);
            goto done;
        }
    }
    unit_node = malloc((p->n_units + 1) * sizeof *unit_node);
    site_node = malloc((p->n_sites + 1) * sizeof *site_node);
    if (!unit_node || !site_node) {
        rc = err_set(e, ERR_NOMEM, "out of memory matching ids to nodes");
        goto done;
    }
    for (size_t j = 0; j < p->n_units; j++)
        if ((unit_node[j] = idmap_find(&nmap, p->unit_id[j])) < 0) {
            rc = err_set(e, ERR_INPUT, "'%s' line %zu: demand id '%s' is not a node of the edge "
                         "list '%s'", demand_csv, dc.line[j + 1], p->unit_id[j], edges_csv);
            goto done;
        }
    for (size_t i = 0; i < p->n_sites; i++)
        if ((site_node[i] = idmap_find(&nmap, p->site_id[i])) < 0) {
            rc = err_set(e, ERR_INPUT, "'%s' line %zu: site id '%s' is not a node of the edge "
                         "list '%s'", sites_csv, sc.line[i + 1], p->site_id[i], edges_csv);
            goto done;
        }
    if (igraph_create(&graph, &edges, (igraph_integer_t)n_nodes, directed ? IGRAPH_DIRECTED
                                                                           : IGRAPH_UNDIRECTED)) {
        rc = err_set(e, ERR_GRAPH, "igraph could not build the network from '%s'", edges_csv);
        goto done;
    }
    graph_ok = 1;
    if (igraph_vector_int_init(&from, 0) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "out of memory for shortest paths");
        goto done;
    }
    from_ok = 1;
    if (igraph_matrix_init(&dist, 0, 0) != IGRAPH_SUCCESS) {
        rc = err_set(e, ERR_NOMEM, "out of memory for shortest paths");
        goto done;
    }
    dist_ok = 1;
    /* Sites in blocks so the dense |block| x |nodes| result stays small. Costs run
     * from the unit to the site: on a directed network, search edges backwards. */
    for (size_t i0 = 0; i0 < p->n_sites; i0 += 64) {
        size_t nb = p->n_sites - i0 < 64 ? p->n_sites - i0 : 64;
        igraph_error_t ie;
        igraph_vector_int_clear(&from);
        for (size_t q = 0; q < nb; q++)
            if (igraph_vector_int_push_back(&from, site_node[i0 + q]) != IGRAPH_SUCCESS) {
                rc = err_set(e, ERR_NOMEM, "out of memory for shortest paths");
                goto done;
            }
        ie = igraph_distances_dijkstra(&graph, &dist, igraph_vss_vector(&from), igraph_vss_all(),
                                       &weights, directed ? IGRAPH_IN : IGRAPH_ALL);
        if (ie != IGRAPH_SUCCESS) {
            rc = err_set(e, ERR_GRAPH, "shortest paths on '%s' failed: %s", edges_csv,
                         igraph_strerror(ie));
            goto done;
        }
        for (size_t q = 0; q < nb; q++)
            for (size_t j = 0; j < p->n_units; j++) {
                double d = MATRIX(dist, q, unit_node[j]);
                if (isfinite(d) && d <= limit &&
                    (rc = loc_add_pair(p, j, i0 + q, d, e)) != ERR_OK)
                    goto done;
            }
    }
    if ((rc = loc_finish(p, e)) != ERR_OK) goto done;
    *out = p;
    p = NULL;
done:
    if (dist_ok) igraph_matrix_destroy(&dist);
    if (from_ok) igraph_vector_int_destroy(&from);
    if (graph_ok) igraph_destroy(&graph);
    if (w_ok) igraph_vector_destroy(&weights);
    if (edges_ok) igraph_vector_int_destroy(&edges);
    free(unit_node);
    free(site_node);
    loc_free(p);
    csv_destroy(&dc);
    csv_destroy(&sc);
    csv_destroy(&ec);
    idmap_destroy(&dmap);
    idmap_destroy(&smap);
    idmap_destroy(&nmap);
    return rc;
}

/* output: atomic writers (see include/output.h). */
#include "output.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <gdal.h>
#include <cpl_error.h>
#include <cpl_string.h>
#include <openssl/evp.h>

int out_mkdir(const char *dir, err_t *e)
{
    char buf[4096];
    size_t n = strlen(dir);

    if (n == 0 || n >= sizeof buf) return err_set(e, ERR_IO, "bad output folder name '%s'", dir);
    memcpy(buf, dir, n + 1);
    for (size_t i = 1; i <= n; i++) {
        if (buf[i] == '/' || buf[i] == '\0') {
            char c = buf[i];
            buf[i] = '\0';
            if (mkdir(buf, 0777) != 0 && errno != EEXIST)
                return err_set(e, ERR_IO, "cannot create output folder '%s': %s", buf,
                               strerror(errno));
            buf[i] = c;
        }
    }
    {
        struct stat st;
        if (stat(dir, &st) != 0 || !S_ISDIR(st.st_mode))
            return err_set(e, ERR_IO, "output path '%s' exists and is not a folder", dir);
    }
    return ERR_OK;
}

char *out_join(const char *dir, const char *name)
{
    size_t a = strlen(dir), b = strlen(name);
    char *s = malloc(a + b + 2);
    if (s == NULL) return NULL;
    memcpy(s, dir, a);
    s[a] = '/';
    memcpy(s + a + 1, name, b + 1);
    return s;
}

char *out_tmp_name(const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *base = slash ? slash + 1 : path;
    size_t dl = slash ? (size_t)(slash - path) + 1 : 0;
    size_t n = strlen(path) + 32;
    char *s = malloc(n);
    if (s == NULL) return NULL;
    /* ".NAME.tmp-PID.EXT" keeps the extension last. */
    {
        const char *dot = strrchr(base, '.');
        size_t stem = dot ? (size_t)(dot - base) : strlen(base);
        snprintf(s, n, "%.*s.%.*s.tmp%ld%s", (int)dl, path, (int)stem, base, (long)getpid(),
                 dot ? dot : "");
    }
    return s;
}

int out_rename(const char *tmp, const char *final, err_t *e)
{
    if (rename(tmp, final) != 0) {
        int er = errno;
        unlink(tmp);
        return err_set(e, ERR_IO, "cannot move finished output into place as '%s': %s", final,
                       strerror(er));
    }
    return ERR_OK;
}

int out_file_open(out_file_t *of, const char *path, err_t *e)
{
    of->f = NULL;
    of->final = strdup(path);
    of->tmp = out_tmp_name(path);
    if (of->final == NULL || of->tmp == NULL) {
        out_file_abort(of);
        return err_set(e, ERR_NOMEM, "out of memory opening '%s'", path);
    }
    of->f = fopen(of->tmp, "w");
    if (of->f == NULL) {
        int er = errno;
        out_file_abort(of);
        return err_set(e, ERR_IO, "cannot write '%s': %s", path, strerror(er));
    }
    return ERR_OK;
}

int out_file_commit(out_file_t *of, err_t *e)
{
    int bad = ferror(of->f);
    int rc;

    bad |= fclose(of->f) != 0;
    of->f = NULL;
    if (bad) {
        rc = err_set(e, ERR_IO, "error while writing '%s' (disk full?)", of->final);
        out_file_abort(of);
        return rc;
    }
    rc = out_rename(of->tmp, of->final, e);
    free(of->tmp);
    free(of->final);
    of->tmp = of->final = NULL;
    return rc;
}

void out_file_abort(out_file_t *of)
{
    if (of == NULL) return;
    if (of->f != NULL) fclose(of->f);
    if (of->tmp != NULL) unlink(of->tmp);
    free(of->tmp);
    free(of->final);
    of->f = NULL;
    of->tmp = of->final = NULL;
}

int out_write_json(const char *path, const cJSON *j, err_t *e)
{
    out_file_t of;
    char *text = cJSON_Print(j);
    int rc;

    if (text == NULL) return err_set(e, ERR_NOMEM, "out of memory printing '%s'", path);
    rc = out_file_open(&of, path, e);
    if (rc == ERR_OK) {
        fputs(text, of.f);
        fputc('\n', of.f);
        rc = out_file_commit(&of, e);
    }
    cJSON_free(text);
    return rc;
}

static int write_tif(const char *path, const grid_t *g, GDALDataType type, const void *v,
                     double nodata, const char *description, err_t *e)
{
    GDALDriverH drv = GDALGetDriverByName("GTiff");
    GDALDatasetH ds = NULL;
    GDALRasterBandH b;
    char **opts = NULL;
    char *tmp = out_tmp_name(path);
    int rc = ERR_OK;

    if (tmp == NULL) return err_set(e, ERR_NOMEM, "out of memory writing '%s'", path);
    if (drv == NULL) {
        rc = err_set(e, ERR_INTERNAL, "GDAL has no GTiff driver");
        goto done;
    }
    opts = CSLSetNameValue(opts, "COMPRESS", "DEFLATE");
    opts = CSLSetNameValue(opts, "TILED", "YES");
    opts = CSLSetNameValue(opts, "BIGTIFF", "IF_SAFER");
    ds = GDALCreate(drv, tmp, g->nx, g->ny, 1, type, opts);
    if (ds == NULL) {
        rc = err_set(e, ERR_IO, "cannot create '%s': %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    GDALSetGeoTransform(ds, (double *)g->gt);
    GDALSetProjection(ds, g->wkt);
    b = GDALGetRasterBand(ds, 1);
    GDALSetRasterNoDataValue(b, nodata);
    if (description != NULL) GDALSetDescription(b, description);
    if (GDALRasterIO(b, GF_Write, 0, 0, g->nx, g->ny, (void *)v, g->nx, g->ny, type, 0, 0) !=
        CE_None) {
        rc = err_set(e, ERR_IO, "cannot write '%s': %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    GDALClose(ds);
    ds = NULL;
    if (CPLGetLastErrorType() == CE_Failure) {
        rc = err_set(e, ERR_IO, "cannot finish '%s': %s", path, CPLGetLastErrorMsg());
        goto done;
    }
    rc = out_rename(tmp, path, e);
done:
    if (ds != NULL) GDALClose(ds);
    if (rc != ERR_OK) unlink(tmp);
    CSLDestroy(opts);
    free(tmp);
    return rc;
}

int out_write_tif_f32(const char *path, const grid_t *g, const float *v, float nodata,
                      const char *description, err_t *e)
{
    CPLErrorReset();
    return write_tif(path, g, GDT_Float32, v, nodata, description, e);
}

int out_write_tif_i32(const char *path, const grid_t *g, const int32_t *v, int32_t nodata,
                      const char *description, err_t *e)
{
    CPLErrorReset();
    return write_tif(path, g, GDT_Int32, v, nodata, description, e);
}

int out_sha256_file(const char *path, char hex[65], long long *size, err_t *e)
{
    unsigned char buf[1 << 16], md[EVP_MAX_MD_SIZE];
    unsigned int mdlen = 0;
    EVP_MD_CTX *ctx = NULL;
    FILE *f = fopen(path, "rb");
    long long total = 0;
    size_t n;
    int rc = ERR_OK;

    if (f == NULL) return err_set(e, ERR_IO, "cannot read '%s': %s", path, strerror(errno));
    ctx = EVP_MD_CTX_new();
    if (ctx == NULL || EVP_DigestInit_ex(ctx, EVP_sha256(), NULL) != 1) {
        rc = err_set(e, ERR_INTERNAL, "cannot start SHA-256 for '%s'", path);
        goto done;
    }
    while ((n = fread(buf, 1, sizeof buf, f)) > 0) {
        EVP_DigestUpdate(ctx, buf, n);
        total += (long long)n;
    }
    if (ferror(f)) {
        rc = err_set(e, ERR_IO, "error reading '%s'", path);
        goto done;
    }
    EVP_DigestFinal_ex(ctx, md, &mdlen);
    for (unsigned int i = 0; i < mdlen && i < 32; i++) snprintf(hex + 2 * i, 3, "%02x", md[i]);
    hex[64] = '\0';
    if (size != NULL) *size = total;
done:
    EVP_MD_CTX_free(ctx);
    fclose(f);
    return rc;
}

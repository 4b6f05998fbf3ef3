/* map_file.c - the map file (docs/formats.md, "Map file") and mapped vector files. */
#include <isthmus/align.h>
#include <isthmus/filekind.h>

#include <errno.h>
#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "align_int.h"
#include "alloc_int.h"
#include "error_int.h"
#include "hash_int.h"
#include "json_int.h"
#include "matrix_int.h"
#include "ofile_int.h"

#define MAP_MAGIC "ISTHMUSM"
#define MAP_VERSION 1u
#define MAP_HEADER 24u
#define MAP_MAX_META (16u << 20)

typedef struct buf {
    unsigned char *p;
    size_t len, cap;
    bool failed;
} buf;

static void
put(buf *b, const void *data, size_t n)
{
    if (b->failed)
        return;
    if (b->len + n > b->cap) {
        size_t nc = b->cap ? b->cap : 4096;
        while (nc < b->len + n)
            nc *= 2;
        unsigned char *np = ist_realloc(b->p, nc);
        if (!np) {
            b->failed = true;
            return;
        }
        b->p = np;
        b->cap = nc;
    }
    memcpy(b->p + b->len, data, n);
    b->len += n;
}

static void
put_u64(buf *b, uint64_t v)
{
    unsigned char x[8];
    for (int i = 0; i < 8; i++)
        x[i] = (unsigned char)(v >> (8 * i));
    put(b, x, 8);
}

static void
put_u32(buf *b, uint32_t v)
{
    unsigned char x[4];
    for (int i = 0; i < 4; i++)
        x[i] = (unsigned char)(v >> (8 * i));
    put(b, x, 4);
}

static void
put_f64(buf *b, double d)
{
    uint64_t u;
    memcpy(&u, &d, 8);
    put_u64(b, u);
}

static uint64_t
get_u64(const unsigned char *p)
{
    uint64_t v = 0;
    for (int i = 7; i >= 0; i--)
        v = (v << 8) | p[i];
    return v;
}

static double
get_f64(const unsigned char *p)
{
    uint64_t u = get_u64(p);
    double d;
    memcpy(&d, &u, 8);
    return d;
}

static void
hex64(char *out, uint64_t v)
{
    snprintf(out, 17, "%016" PRIx64, v);
}

static void
write_side(ist_jw *w, const char *key, uint64_t fp, size_t rows, const ist_norm *n)
{
    char hx[17];
    hex64(hx, fp);
    ist_jw_obj_begin(w, key);
    ist_jw_str(w, "fingerprint", hx);
    ist_jw_uint(w, "rows", rows);
    ist_jw_str(w, "standardise", ist_norm_spec(n));
    ist_jw_arr_begin(w, "steps");
    for (size_t i = 0; i < ist_norm_steps(n); i++)
        ist_jw_str(w, NULL, ist_norm_step_kind(n, i) == IST_NORM_UNIT ? "length" : "mean");
    ist_jw_arr_end(w);
    ist_jw_obj_end(w);
}

static ist_status
meta_json(const ist_map *m, bool with_seeds, char **out, ist_error *err)
{
    ist_jw w;
    char hx[17];

    ist_jw_init(&w, with_seeds);   /* file metadata indented; the summary compact */
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "format", "isthmus map");
    ist_jw_uint(&w, "version", MAP_VERSION);
    ist_jw_uint(&w, "dim", m->dim);
    write_side(&w, "source", m->fp_s, m->rows_s, m->ns);
    write_side(&w, "target", m->fp_t, m->rows_t, m->nt);
    ist_jw_obj_begin(&w, "seeds");
    ist_jw_uint(&w, "pairs", m->seed_n);
    hex64(hx, m->seed_ck);
    ist_jw_str(&w, "checksum", hx);
    if (with_seeds && m->seeds) {
        ist_jw_arr_begin(&w, "list");
        for (size_t i = 0; i < ist_pairs_count(m->seeds); i++) {
            ist_jw_arr_begin(&w, NULL);
            ist_jw_str(&w, NULL, ist_pairs_source(m->seeds, i));
            ist_jw_str(&w, NULL, ist_pairs_target(m->seeds, i));
            ist_jw_arr_end(&w);
        }
        ist_jw_arr_end(&w);
    }
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "seed_fit");
    ist_jw_num(&w, "orthogonality_error", m->fit0.orth_error);
    ist_jw_num(&w, "mean_cosine", m->fit0.seed_cos);
    ist_jw_num(&w, "residual", m->fit0.residual);
    ist_jw_num(&w, "singular_value_min", m->fit0.sv_min);
    ist_jw_num(&w, "singular_value_max", m->fit0.sv_max);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "refinement");
    ist_jw_uint(&w, "vocabulary", m->refine_vocab);
    ist_jw_uint(&w, "neighbourhood", m->neighbourhood);
    ist_jw_arr_begin(&w, "rounds");
    for (size_t i = 0; i < m->nrounds; i++) {
        const ist_align_round *r = &m->rounds[i];
        ist_jw_obj_begin(&w, NULL);
        ist_jw_uint(&w, "round", r->round);
        ist_jw_uint(&w, "pairs", r->pairs);
        ist_jw_num(&w, "mean_csls", r->mean_csls);
        ist_jw_num(&w, "mean_cosine", r->seed_cos);
        ist_jw_num(&w, "orthogonality_error", r->orth_error);
        ist_jw_bool(&w, "kept", r->kept);
        ist_jw_obj_end(&w);
    }
    ist_jw_arr_end(&w);
    ist_jw_obj_end(&w);
    ist_jw_arr_begin(&w, "matrices");
    ist_jw_str(&w, NULL, "refined");
    ist_jw_str(&w, NULL, "seed");
    ist_jw_arr_end(&w);
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, out, err);
}

static void
put_matrix(buf *b, const ist_matrix *w)
{
    for (size_t i = 0; i < w->rows; i++)
        for (size_t j = 0; j < w->cols; j++)
            put_f64(b, w->data[i * w->stride + j]);
}

static void
put_means(buf *b, const ist_norm *n)
{
    for (size_t i = 0; i < ist_norm_steps(n); i++)
        if (ist_norm_step_kind(n, i) == IST_NORM_CENTRE) {
            const double *mean = ist_norm_step_mean(n, i);
            for (size_t j = 0; j < ist_norm_dim(n); j++)
                put_f64(b, mean[j]);
        }
}

ist_status
ist_map_describe(const ist_map *m, char **json, ist_error *err)
{
    return meta_json(m, false, json, err);
}

void
ist_map_free_text(char *text)
{
    ist_free(text);
}

ist_status
ist_map_save(const ist_map *m, const char *path, ist_error *err)
{
    char *meta = NULL;
    buf b = {0};
    ist_status rc = meta_json(m, true, &meta, err);
    static const unsigned char zero[8] = {0};

    if (rc != IST_OK)
        return rc;
    size_t ml = strlen(meta);
    put(&b, MAP_MAGIC, 8);
    put_u32(&b, MAP_VERSION);
    put_u32(&b, (uint32_t)m->dim);
    put_u64(&b, ml);
    put(&b, meta, ml);
    put(&b, zero, (8 - (MAP_HEADER + ml) % 8) % 8);
    put_matrix(&b, m->w);
    put_matrix(&b, m->w0);
    put_means(&b, m->ns);
    put_means(&b, m->nt);
    put_u64(&b, b.failed ? 0 : ist_hash_bytes(b.p, b.len));
    ist_free(meta);
    if (b.failed) {
        ist_free(b.p);
        return ist_error_nomem(err);
    }
    rc = ist_ofile_write_all(path, b.p, b.len, err);
    ist_free(b.p);
    return rc;
}

static ist_status
read_whole(const char *path, unsigned char **out, size_t *len, ist_error *err)
{
    FILE *f = fopen(path, "rb");
    unsigned char *p = NULL;
    size_t cap = 0, n = 0;

    *len = 0;

    *out = NULL;
    if (!f)
        return ist_error_sys(err, IST_ERR_IO, path, "cannot open the map file");
    for (;;) {
        if (n == cap) {
            size_t nc = cap ? cap * 2 : 1 << 20;
            unsigned char *np = ist_realloc(p, nc);
            if (!np) {
                ist_free(p);
                fclose(f);
                return ist_error_nomem(err);
            }
            p = np;
            cap = nc;
        }
        size_t got = fread(p + n, 1, cap - n, f);
        n += got;
        if (got == 0)
            break;
    }
    if (ferror(f)) {
        ist_free(p);
        fclose(f);
        return ist_error_sys(err, IST_ERR_IO, path, "cannot read the map file");
    }
    fclose(f);
    *out = p;
    *len = n;
    return IST_OK;
}

/* A count in the metadata: absent is 0; otherwise a whole number from 0 to 2^53 (a plain
 * cast of a negative or huge double to size_t is undefined behaviour). */
static ist_status
get_count(const ist_jv *v, const char *path, const char *what, size_t *out, ist_error *err)
{
    double d = ist_jv_num(v, 0);

    *out = 0;
    if (v && ist_jv_type(v) != IST_JNUM)
        return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(v),
                            "map metadata: %s: expected a number", what);
    if (!(d >= 0 && d <= 9007199254740992.0) || d != floor(d))
        return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(v),
                            "map metadata: %s: expected a whole number from 0 to 2^53, found %g",
                            what, d);
    *out = (size_t)d;
    return IST_OK;
}

static ist_status
read_side(const ist_jv *side, const char *path, const char *name, size_t dim,
          const unsigned char **means, const unsigned char *end, uint64_t *fp, size_t *rows,
          ist_norm **plan, ist_error *err)
{
    const ist_jv *steps = ist_jv_get(side, "steps");
    const char *fps = ist_jv_str(ist_jv_get(side, "fingerprint"), NULL);
    ist_norm_kind kinds[IST_MAP_MAX_STEPS];
    size_t n = ist_jv_len(steps), nc = 0;
    double *mv;
    ist_status rc;

    if (!side || !steps || !fps || n > IST_MAP_MAX_STEPS)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "map metadata: expected '%s' with a fingerprint and steps", name);
    *fp = strtoull(fps, NULL, 16);
    if ((rc = get_count(ist_jv_get(side, "rows"), path, "rows", rows, err)) != IST_OK)
        return rc;
    for (size_t i = 0; i < n; i++) {
        const char *k = ist_jv_str(ist_jv_at(steps, i), "");
        /* maps written before the steps were renamed say "unit" and "centre" */
        if (strcmp(k, "length") == 0 || strcmp(k, "unit") == 0)
            kinds[i] = IST_NORM_UNIT;
        else if (strcmp(k, "mean") == 0 || strcmp(k, "centre") == 0)
            kinds[i] = IST_NORM_CENTRE, nc++;
        else
            return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                                "map metadata: %s step %zu: expected length or mean, found '%s'",
                                name, i + 1, k);
    }
    if ((size_t)(end - *means) < nc * dim * 8)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0, "map file is truncated");
    mv = ist_malloc((nc * dim + 1) * sizeof *mv);
    if (!mv)
        return ist_error_nomem(err);
    for (size_t i = 0; i < nc * dim; i++) {
        mv[i] = get_f64(*means + 8 * i);
        if (!isfinite(mv[i])) {
            ist_free(mv);
            return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                                "map %s mean holds a number that is not finite", name);
        }
    }
    *means += nc * dim * 8;
    rc = ist_norm_from_steps(dim, kinds, n, mv, plan, err);
    ist_free(mv);
    return rc;
}

/* False when an entry is not a finite float32 (NaN, infinite, or beyond float range). */
static bool
read_matrix(ist_matrix *w, const unsigned char *p)
{
    for (size_t i = 0; i < w->rows; i++)
        for (size_t j = 0; j < w->cols; j++) {
            double d = get_f64(p + 8 * (i * w->cols + j));
            if (!isfinite(d) || fabs(d) > 3.4e38)
                return false;
            w->data[i * w->stride + j] = (float)d;
        }
    return true;
}

static ist_status
read_rounds(ist_map *m, const ist_jv *meta, const char *path, ist_error *err)
{
    const ist_jv *ref = ist_jv_get(meta, "refinement"), *rounds = ist_jv_get(ref, "rounds");
    const ist_jv *fit = ist_jv_get(meta, "seed_fit");
    ist_status rc;

    if ((rc = get_count(ist_jv_get(ref, "vocabulary"), path, "vocabulary", &m->refine_vocab,
                        err)) != IST_OK ||
        (rc = get_count(ist_jv_get(ref, "neighbourhood"), path, "neighbourhood",
                        &m->neighbourhood, err)) != IST_OK)
        return rc;
    for (size_t i = 0; i < ist_jv_len(rounds) && i < IST_MAP_MAX_ROUNDS; i++) {
        const ist_jv *r = ist_jv_at(rounds, i);
        ist_align_round *d = &m->rounds[m->nrounds++];
        if ((rc = get_count(ist_jv_get(r, "round"), path, "round", &d->round, err)) != IST_OK ||
            (rc = get_count(ist_jv_get(r, "pairs"), path, "pairs", &d->pairs, err)) != IST_OK)
            return rc;
        d->mean_csls = ist_jv_num(ist_jv_get(r, "mean_csls"), NAN);
        d->seed_cos = ist_jv_num(ist_jv_get(r, "mean_cosine"), NAN);
        d->orth_error = ist_jv_num(ist_jv_get(r, "orthogonality_error"), NAN);
        d->kept = ist_jv_bool(ist_jv_get(r, "kept"), true);
    }
    m->fit0.orth_error = ist_jv_num(ist_jv_get(fit, "orthogonality_error"), NAN);
    m->fit0.seed_cos = ist_jv_num(ist_jv_get(fit, "mean_cosine"), NAN);
    m->fit0.residual = ist_jv_num(ist_jv_get(fit, "residual"), NAN);
    m->fit0.sv_min = ist_jv_num(ist_jv_get(fit, "singular_value_min"), NAN);
    m->fit0.sv_max = ist_jv_num(ist_jv_get(fit, "singular_value_max"), NAN);
    const ist_jv *list = ist_jv_get(ist_jv_get(meta, "seeds"), "list");
    if (ist_pairs_new(&m->seeds, err) != IST_OK)
        return ist_error_nomem(err);
    for (size_t i = 0; i < ist_jv_len(list); i++) {
        const ist_jv *pr = ist_jv_at(list, i);
        const char *a = ist_jv_str(ist_jv_at(pr, 0), NULL), *b = ist_jv_str(ist_jv_at(pr, 1), NULL);
        if (!a || !b)
            return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(pr),
                                "map metadata: seed %zu: expected two words", i + 1);
        if (ist_pairs_add(m->seeds, a, b, err) != IST_OK)
            return IST_ERR_NOMEM;
    }
    if ((rc = get_count(ist_jv_get(ist_jv_get(meta, "seeds"), "pairs"), path, "seed pairs",
                        &m->seed_n, err)) != IST_OK)
        return rc;
    m->seed_ck = strtoull(ist_jv_str(ist_jv_get(ist_jv_get(meta, "seeds"), "checksum"), "0"),
                          NULL, 16);
    return IST_OK;
}

static ist_status
parse_map(const unsigned char *p, size_t len, const char *path, ist_map *m, ist_error *err)
{
    ist_jv *meta = NULL;
    ist_status rc;

    if (len < MAP_HEADER + 8 || memcmp(p, MAP_MAGIC, 8) != 0) {
        ist_file_kind k = ist_file_classify(p, len < 8192 ? len : 8192);
        if (k == IST_FILE_VECTORS || k == IST_FILE_PREPARED || k == IST_FILE_RESULT ||
            k == IST_FILE_VERDICT || k == IST_FILE_CANDIDATES)
            return ist_error_at(err, IST_ERR_FORMAT, path, 0, "this is %s (%s), not a map file",
                                ist_file_kind_name(k), ist_file_kind_use(k));
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "expected an isthmus map file (magic %s), found other bytes",
                            MAP_MAGIC);
    }
    uint32_t ver = (uint32_t)get_u64(p + 8) & 0xffffffffu;
    uint32_t dim = (uint32_t)(get_u64(p + 8) >> 32);
    uint64_t ml = get_u64(p + 16);
    if (ver != MAP_VERSION)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "map file version %u, this isthmus reads version %u", ver,
                            MAP_VERSION);
    if (ist_hash_bytes(p, len - 8) != get_u64(p + len - 8))
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "map file checksum does not match: the file is damaged");
    size_t pad = (8 - (MAP_HEADER + ml) % 8) % 8;
    if (dim == 0 || dim > 100000 || ml > MAP_MAX_META ||
        MAP_HEADER + ml + pad + 2 * (uint64_t)dim * dim * 8 + 8 > len)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "map file sizes do not agree (dimension %u, %zu bytes)", dim, len);
    rc = ist_json_parse((const char *)p + MAP_HEADER, ml, path, &meta, err);
    if (rc != IST_OK)
        return rc;
    m->dim = dim;
    const unsigned char *mat = p + MAP_HEADER + ml + pad, *means = mat + 2 * (size_t)dim * dim * 8;
    const unsigned char *end = p + len - 8;
    if ((rc = ist_matrix_new(dim, dim, &m->w, err)) != IST_OK ||
        (rc = ist_matrix_new(dim, dim, &m->w0, err)) != IST_OK)
        goto done;
    if (!read_matrix(m->w, mat) || !read_matrix(m->w0, mat + (size_t)dim * dim * 8)) {
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0,
                          "map matrix holds a number that is not finite");
        goto done;
    }
    rc = read_side(ist_jv_get(meta, "source"), path, "source", dim, &means, end, &m->fp_s,
                   &m->rows_s, &m->ns, err);
    if (rc == IST_OK)
        rc = read_side(ist_jv_get(meta, "target"), path, "target", dim, &means, end, &m->fp_t,
                       &m->rows_t, &m->nt, err);
    if (rc == IST_OK && means != end)
        rc = ist_error_at(err, IST_ERR_FORMAT, path, 0,
                          "map file holds %zu bytes more than its metadata describes",
                          (size_t)(end - means));
    if (rc == IST_OK)
        rc = read_rounds(m, meta, path, err);
done:
    ist_jv_free(meta);
    return rc;
}

ist_status
ist_map_load(const char *path, ist_map **out, ist_error *err)
{
    unsigned char *p;
    size_t len;
    ist_map *m;
    ist_status rc;

    *out = NULL;
    if ((rc = read_whole(path, &p, &len, err)) != IST_OK)
        return rc;
    m = ist_calloc(1, sizeof *m);
    if (!m) {
        ist_free(p);
        return ist_error_nomem(err);
    }
    rc = parse_map(p, len, path, m, err);
    ist_free(p);
    if (rc != IST_OK) {
        ist_map_free(m);
        return rc;
    }
    *out = m;
    return IST_OK;
}

ist_status
ist_map_save_mapped(const ist_map *m, const ist_store *src, const ist_matrix *xs,
                    const char *path, ist_error *err)
{
    ist_store *out = NULL;
    char *prov = NULL, hx[17];
    ist_jw w;
    ist_status rc;

    if (xs->rows != ist_store_rows(src) || xs->cols != m->dim)
        return ist_error_set(err, IST_ERR_INVALID,
                             "mapped vectors: expected %zu x %zu, found %zu x %zu",
                             ist_store_rows(src), m->dim, xs->rows, xs->cols);
    rc = ist_store_new(xs->rows, xs->cols, &out, err);
    for (size_t i = 0; rc == IST_OK && i < xs->rows; i++) {
        memcpy(ist_store_row_mut(out, i), xs->data + i * xs->stride, xs->cols * sizeof(float));
        rc = ist_store_set_word(out, i, ist_store_word(src, i), ist_store_count(src, i), err);
    }
    if (rc == IST_OK) {
        ist_jw_init(&w, false);
        ist_jw_obj_begin(&w, NULL);
        ist_jw_str(&w, "producer", "isthmus align");
        ist_jw_str(&w, "content", "source vectors, normalised and mapped onto the target space");
        hex64(hx, m->fp_s);
        ist_jw_str(&w, "source_fingerprint", hx);
        hex64(hx, m->fp_t);
        ist_jw_str(&w, "target_fingerprint", hx);
        ist_jw_str(&w, "normalise", ist_norm_spec(m->ns));
        const char *sp = ist_store_provenance(src);
        if (sp[0])
            ist_jw_raw(&w, "source_provenance", sp);
        ist_jw_obj_end(&w);
        rc = ist_jw_finish(&w, &prov, err);
    }
    if (rc == IST_OK)
        rc = ist_store_set_provenance(out, prov, err);
    if (rc == IST_OK)
        rc = ist_store_save(out, path, NULL, err);
    ist_free(prov);
    ist_store_free(out);
    return rc;
}

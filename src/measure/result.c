/* result.c - the result record: release it and write it as the result JSON
 * (docs/formats.md, "Result JSON"). Member names come from result_keys_int.h. */
#include <isthmus/result.h>

#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "diag_int.h"
#include "error_int.h"
#include "json_int.h"
#include "ofile_int.h"
#include "result_int.h"
#include "result_keys_int.h"

void
ist_result_hex(uint64_t v, char buf[17])
{
    snprintf(buf, 17, "%016" PRIx64, v);
}

static void
release_run(ist_result_run *r)
{
    ist_free(r->label);
    ist_metrics_release(&r->m);
    for (size_t i = 0; r->query_source && i < r->nper_query; i++)
        ist_free(r->query_source[i]);
    ist_free(r->query_source);
    ist_free(r->query_band);
}

static void
release_list(ist_result_list *l)
{
    ist_free(l->path);
    ist_free(l->label);
}

void
ist_result_free(ist_result *r)
{
    if (!r)
        return;
    for (size_t i = 0; r->runs && i < r->nruns; i++)
        release_run(&r->runs[i]);
    ist_free(r->runs);
    ist_free(r->command);
    ist_free(r->source.path);
    ist_free(r->target.path);
    ist_free(r->source.provenance);
    ist_free(r->target.provenance);
    ist_free(r->map_path);
    release_list(&r->seeds);
    release_list(&r->test.list);
    ist_free((char *)r->options.fit.normalise);
    ist_free(r->map_json);
    ist_diag_free(r->diagnostics);
    ist_free(r->name);
    ist_free(r);
}

const char *
ist_result_methods_name(unsigned methods)
{
    return methods == (IST_RESULT_COSINE | IST_RESULT_CSLS) ? RK_BOTH
           : methods == IST_RESULT_CSLS                      ? RK_CSLS
                                                             : RK_COSINE;
}

const char *
ist_result_stages_name(unsigned stages)
{
    return stages == (IST_STAGE_SEED | IST_STAGE_REFINED) ? RK_BOTH
           : stages == IST_STAGE_SEED                      ? RK_STAGE_SEED
                                                           : RK_STAGE_REFINED;
}

static void
hex(ist_jw *w, const char *key, bool has, uint64_t v)
{
    char b[17];
    if (!has) {
        ist_jw_null(w, key);
        return;
    }
    ist_result_hex(v, b);
    ist_jw_str(w, key, b);
}

static void
write_figures(ist_jw *w, const size_t *hits, const double *p)
{
    char key[16];
    ist_jw_obj_begin(w, RK_PRECISION);
    for (size_t i = 0; i < IST_METRICS_NK; i++) {
        snprintf(key, sizeof key, RK_PRECISION_FMT, ist_metrics_k(i));
        ist_jw_num(w, key, p[i]);
    }
    ist_jw_obj_end(w);
    ist_jw_obj_begin(w, RK_HITS);
    for (size_t i = 0; i < IST_METRICS_NK; i++) {
        snprintf(key, sizeof key, RK_HITS_FMT, ist_metrics_k(i));
        ist_jw_uint(w, key, hits[i]);
    }
    ist_jw_obj_end(w);
}

static void
write_ci(ist_jw *w, const ist_ci_opts *o, const double *lo, const double *hi)
{
    char key[16];
    ist_jw_obj_begin(w, RK_CI);
    ist_jw_num(w, RK_LEVEL, o->level);
    ist_jw_uint(w, RK_RESAMPLES, o->resamples);
    ist_jw_uint(w, RK_SEED, o->seed);
    for (size_t j = 0; j < IST_METRICS_NK; j++) {
        if (isnan(lo[j]))
            continue;   /* a loaded result without this interval */
        snprintf(key, sizeof key, RK_PRECISION_FMT, ist_metrics_k(j));
        ist_jw_arr_begin(w, key);
        ist_jw_num(w, NULL, lo[j]);
        ist_jw_num(w, NULL, hi[j]);
        ist_jw_arr_end(w);
    }
    ist_jw_obj_end(w);
}

static void
write_per_query(ist_jw *w, const ist_result_run *r)
{
    ist_jw_arr_begin(w, RK_PER_QUERY);
    for (size_t i = 0; i < r->nper_query; i++) {
        uint8_t place = r->m.query_place[i];
        ist_jw_obj_begin(w, NULL);
        if (r->query_source && r->query_source[i])
            ist_jw_str(w, RK_SOURCE, r->query_source[i]);
        ist_jw_uint(w, RK_RANK, place < IST_CI_MISS ? (uint64_t)place + 1 : 0);
        ist_jw_uint(w, RK_BAND, r->query_band[i]);
        if (r->has_rows)
            ist_jw_uint(w, RK_FREQ_RANK, (uint64_t)r->m.query_row[i] + 1);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
}

static void
write_run(ist_jw *w, const ist_result_run *r)
{
    const ist_metrics *m = &r->m;
    ist_jw_obj_begin(w, NULL);
    ist_jw_str(w, RK_LABEL, r->label);
    ist_jw_str(w, RK_RETRIEVAL, ist_retrieval_name(m->method));
    ist_jw_uint(w, RK_NEIGHBOURHOOD, m->neighbourhood);
    ist_jw_uint(w, RK_SOURCES, m->sources);
    ist_jw_uint(w, RK_QUERIES, m->queries);
    ist_jw_num(w, RK_COVERAGE, m->coverage);
    write_figures(w, m->hits, m->p);
    ist_jw_arr_begin(w, RK_BANDS);
    for (size_t b = 0; b < m->nbands; b++) {
        ist_jw_obj_begin(w, NULL);
        ist_jw_uint(w, RK_RANK_FROM, m->band[b].lo);
        if (m->band[b].hi)
            ist_jw_uint(w, RK_RANK_TO, m->band[b].hi);
        else
            ist_jw_null(w, RK_RANK_TO);
        ist_jw_uint(w, RK_QUERIES, m->band[b].queries);
        write_figures(w, m->band[b].hits, m->band[b].p);
        if (r->band_has_ci[b])
            write_ci(w, &r->ci_opts, r->ci.band_lo[b], r->ci.band_hi[b]);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
    if (r->has_ci)
        write_ci(w, &r->ci_opts, r->ci.lo, r->ci.hi);
    if (r->nper_query)
        write_per_query(w, r);
    ist_jw_obj_end(w);
}

static void
write_list(ist_jw *w, const char *key, const ist_result_list *l, const char *ck_key)
{
    ist_jw_obj_begin(w, key);
    ist_jw_str(w, RK_PATH, l->path);
    ist_jw_str(w, RK_LABEL, l->label);
    hex(w, ck_key, l->has_checksum, l->checksum);
    ist_jw_obj_end(w);
}

static void
write_coverage(ist_jw *w, const ist_pairs_coverage *c)
{
    ist_jw_obj_begin(w, RK_COVERAGE);
    ist_jw_uint(w, RK_PAIRS_READ, c->read);
    ist_jw_uint(w, RK_PAIRS_KEPT, c->kept);
    ist_jw_uint(w, RK_DUPLICATES, c->duplicates);
    ist_jw_uint(w, RK_MISSING_SOURCE, c->missing_source);
    ist_jw_uint(w, RK_MISSING_TARGET, c->missing_target);
    ist_jw_uint(w, RK_MISSING_BOTH, c->missing_both);
    ist_jw_uint(w, RK_SOURCES_READ, c->sources_read);
    ist_jw_uint(w, RK_SOURCES_KEPT, c->sources_kept);
    ist_jw_str(w, RK_SOURCE_MATCHING, c->source_exact ? RK_MATCH_EXACT : RK_MATCH_NORMALISED);
    ist_jw_str(w, RK_TARGET_MATCHING, c->target_exact ? RK_MATCH_EXACT : RK_MATCH_NORMALISED);
    ist_jw_obj_end(w);
}

static void
write_test(ist_jw *w, const ist_result_test *t)
{
    ist_jw_obj_begin(w, RK_TEST);
    ist_jw_str(w, RK_PATH, t->list.path);
    ist_jw_str(w, RK_LABEL, t->list.label);
    if (t->has_kept) {
        hex(w, RK_CHECKSUM, true, t->kept_checksum);
        hex(w, RK_SOURCES_HASH, true, t->sources_hash);
        ist_jw_uint(w, RK_SOURCE_WORDS, t->source_words);
    }
    if (t->list.has_checksum)
        hex(w, RK_LIST_CHECKSUM, true, t->list.checksum);
    if (t->has_coverage)
        write_coverage(w, &t->coverage);
    if (t->has_overlap) {
        ist_jw_uint(w, RK_OVERLAP, t->overlap);
        ist_jw_bool(w, RK_OVERLAP_ALLOWED, t->overlap_allowed);
    }
    ist_jw_obj_end(w);
}

static void
write_options(ist_jw *w, const ist_result_options *o)
{
    ist_jw_obj_begin(w, RK_OPTIONS);
    ist_jw_str(w, RK_RANK_BY, ist_result_methods_name(o->methods));
    ist_jw_uint(w, RK_CSLS_K, o->neighbourhood);
    ist_jw_uint(w, RK_MEMORY, o->memory_bytes);
    ist_jw_uint(w, RK_THREADS, o->threads);
    ist_jw_bool(w, RK_ALLOW_OVERLAP, o->allow_overlap);
    ist_jw_arr_begin(w, RK_BANDS);
    for (size_t i = 0; i < o->nedges; i++)
        ist_jw_uint(w, NULL, o->band_edges[i]);
    ist_jw_arr_end(w);
    if (o->has_fit) {
        const ist_result_fit *f = &o->fit;
        ist_jw_str(w, RK_NORMALISE, f->normalise);
        ist_jw_uint(w, RK_REFINE_ROUNDS, f->refine_rounds);
        ist_jw_uint(w, RK_REFINE_VOCAB, f->refine_vocab);
        ist_jw_bool(w, RK_IDENT, f->identical_seeds);
        ist_jw_uint(w, RK_IDENT_MIN, f->identical_min_count);
        ist_jw_bool(w, RK_IDENT_MARKED, f->identical_marked);
        ist_jw_num(w, RK_HOLD_OUT, f->hold_out);
        ist_jw_uint(w, RK_SPLIT_SEED, f->split_seed);
        ist_jw_bool(w, RK_KEEP_SEEDS, f->refine_keep_seeds);
    }
    if (o->stages)
        ist_jw_str(w, RK_STAGE, ist_result_stages_name(o->stages));
    ist_jw_obj_end(w);
}

ist_status
ist_result_render(const ist_result *r, char **text, ist_error *err)
{
    ist_jw w;

    ist_jw_init(&w, true);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, RK_FORMAT, RK_FORMAT_NAME);
    ist_jw_int(&w, RK_VERSION, IST_RESULT_VERSION);
    ist_jw_str(&w, RK_COMMAND, r->command);
    ist_jw_obj_begin(&w, RK_INPUTS);
    ist_jw_obj_begin(&w, RK_SOURCE);
    ist_jw_str(&w, RK_PATH, r->source.path);
    hex(&w, RK_FINGERPRINT, r->source.has_fingerprint, r->source.fingerprint);
    if (r->source.provenance)
        ist_jw_raw(&w, RK_PROVENANCE, r->source.provenance);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, RK_TARGET);
    ist_jw_str(&w, RK_PATH, r->target.path);
    hex(&w, RK_FINGERPRINT, r->target.has_fingerprint, r->target.fingerprint);
    if (r->target.provenance)
        ist_jw_raw(&w, RK_PROVENANCE, r->target.provenance);
    ist_jw_obj_end(&w);
    ist_jw_str(&w, RK_MAP, r->map_path);
    write_list(&w, RK_SEEDS, &r->seeds, RK_CHECKSUM);
    ist_jw_obj_end(&w);
    if (r->test.present)
        write_test(&w, &r->test);
    if (r->options.present)
        write_options(&w, &r->options);
    if (r->map_json)
        ist_jw_raw(&w, RK_MAP, r->map_json);
    ist_jw_arr_begin(&w, RK_RUNS);
    for (size_t i = 0; i < r->nruns; i++)
        write_run(&w, &r->runs[i]);
    ist_jw_arr_end(&w);
    if (r->diagnostics)
        ist_result_write_diag(&w, r->diagnostics);
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, text, err);
}

void
ist_result_free_text(char *text)
{
    ist_free(text);
}

ist_status
ist_result_write(const ist_result *r, const char *path, ist_error *err)
{
    char *text = NULL;
    ist_status rc = ist_result_render(r, &text, err);
    if (rc != IST_OK)
        return rc;
    rc = ist_ofile_write_text(path, text, err);
    ist_free(text);
    return rc;
}

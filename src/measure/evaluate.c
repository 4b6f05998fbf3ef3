/* evaluate.c - one scoring run from a map to its result record: apply each stage's map
 * once, score every retrieval method, draw the intervals, diagnose, and record the
 * inputs and options. */
#include <isthmus/result.h>

#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "result_int.h"
#include "result_keys_int.h"

#define OVERLAP_NAMED 8

void
ist_evaluate_opts_init(ist_evaluate_opts *o)
{
    memset(o, 0, sizeof *o);
    ist_eval_opts_init(&o->eval);
    o->methods = IST_RESULT_COSINE | IST_RESULT_CSLS;
    o->stages = IST_STAGE_REFINED;
    o->record_stages = true;
    o->diagnostics = true;
    ist_diag_opts_init(&o->diag);
    ist_ci_opts_init(&o->ci);
    o->command = "score";
}

static ist_status
dup_into(char **dst, const char *s, ist_error *err)
{
    *dst = NULL;
    if (s && !(*dst = ist_strdup(s)))
        return ist_error_nomem(err);
    return IST_OK;
}

/* A store's provenance as compact JSON when it is a JSON object (text tables have none). */
static ist_status
record_provenance(char **dst, const ist_store *s, ist_error *err)
{
    const char *p = s ? ist_store_provenance(s) : NULL;
    ist_jv *root = NULL;
    ist_status rc = IST_OK;

    *dst = NULL;
    if (!p || !*p || ist_json_parse(p, strlen(p), "provenance", &root, NULL) != IST_OK)
        return IST_OK;
    if (ist_jv_type(root) == IST_JOBJ)
        rc = ist_json_text(root, dst, err);
    ist_jv_free(root);
    return rc;
}

static ist_status
record_inputs(ist_result *r, const ist_map *map, const ist_store *src, const ist_store *tgt,
              const ist_evaluate_opts *o, ist_error *err)
{
    ist_status rc;
    r->version = IST_RESULT_VERSION;
    r->source.has_fingerprint = r->target.has_fingerprint = true;
    r->source.fingerprint = ist_map_source_fingerprint(map);
    r->target.fingerprint = ist_map_target_fingerprint(map);
    r->seeds.has_checksum = true;
    r->seeds.checksum = ist_map_seed_checksum(map);
    if ((rc = dup_into(&r->command, o->command, err)) != IST_OK ||
        (rc = dup_into(&r->name, o->name ? o->name : o->command, err)) != IST_OK ||
        (rc = dup_into(&r->source.path, o->source_path, err)) != IST_OK ||
        (rc = dup_into(&r->target.path, o->target_path, err)) != IST_OK ||
        (rc = dup_into(&r->map_path, o->map_path, err)) != IST_OK ||
        (rc = dup_into(&r->seeds.path, o->seeds_path, err)) != IST_OK ||
        (rc = dup_into(&r->seeds.label, o->seeds_label ? o->seeds_label : o->seeds_path, err)) !=
            IST_OK)
        return rc;
    if ((rc = record_provenance(&r->source.provenance, src, err)) != IST_OK ||
        (rc = record_provenance(&r->target.provenance, tgt, err)) != IST_OK)
        return rc;
    return ist_map_describe(map, &r->map_json, err);
}

static ist_status
record_options(ist_result *r, const ist_evaluate_opts *o, ist_error *err)
{
    ist_result_options *p = &r->options;
    p->present = true;
    p->methods = o->methods;
    p->neighbourhood = o->eval.search.csls_k;
    p->memory_bytes = o->eval.search.retrieve.budget;
    p->threads = o->eval.search.retrieve.threads;
    p->allow_overlap = o->allow_overlap;
    p->nedges = o->eval.nedges;
    memcpy(p->band_edges, o->eval.band_edges, sizeof p->band_edges);
    p->stages = o->record_stages ? o->stages : 0;
    if (!o->fit)
        return IST_OK;
    p->has_fit = true;
    p->fit = *o->fit;
    p->fit.normalise = NULL;
    return dup_into((char **)&p->fit.normalise, o->fit->normalise, err);
}

/* The test list's identity, coverage and overlap with the seeds; refuses an overlap that is
 * not allowed before anything is scored. */
static ist_status
record_test(ist_result *r, const ist_map *map, const ist_pairs *test,
            const ist_pairs_coverage *cov, const ist_evaluate_opts *o, ist_error *err)
{
    ist_result_test *t = &r->test;
    const char *first[OVERLAP_NAMED];
    ist_status rc;

    t->present = true;
    t->list.has_checksum = ist_pairs_list_checksum(test, &t->list.checksum);
    if ((rc = dup_into(&t->list.path, ist_pairs_path(test), err)) != IST_OK ||
        (rc = dup_into(&t->list.label, ist_pairs_label(test), err)) != IST_OK ||
        (rc = ist_pairs_checksum(test, &t->kept_checksum, err)) != IST_OK ||
        (rc = ist_pairs_sources_hash(test, &t->sources_hash, err)) != IST_OK)
        return rc;
    t->has_kept = true;
    if (cov) {
        t->has_coverage = true;
        t->coverage = *cov;
        t->source_words = cov->sources_kept;
    }
    if ((rc = ist_pairs_overlap(ist_map_seeds(map), test, first, OVERLAP_NAMED, &t->overlap,
                                err)) != IST_OK)
        return rc;
    t->has_overlap = true;
    t->overlap_allowed = o->allow_overlap;
    if (t->overlap == 0 || o->allow_overlap)
        return IST_OK;
    char words[256] = "";
    for (size_t i = 0; i < t->overlap && i < OVERLAP_NAMED; i++) {
        size_t at = strlen(words);
        snprintf(words + at, sizeof words - at, "%s%s", i ? " " : "", first[i]);
    }
    return ist_error_set(err, IST_ERR_INVALID,
                         "%zu test source word%s also seed source word%s (%s%s); refusing to "
                         "score a test list that shares words with the seeds",
                         t->overlap, t->overlap == 1 ? " is" : "s are",
                         t->overlap == 1 ? "" : "s", words,
                         t->overlap > OVERLAP_NAMED ? " ..." : "");
}

/* Intervals and the per-query outcomes (with their source words) of a scored run. */
static ist_status
fill_queries(ist_result_run *run, const ist_store *src, const ist_evaluate_opts *o,
             ist_error *err)
{
    ist_metrics *m = &run->m;
    ist_status rc;

    run->ci_opts = o->ci;
    if (!m->query_row || !m->query_place)
        return IST_OK;
    if ((rc = ist_metrics_ci_compute(m, &o->ci, &run->ci, err)) != IST_OK)
        return rc;
    run->has_ci = true;
    for (size_t b = 0; b < m->nbands; b++)
        run->band_has_ci[b] = true;
    run->query_source = ist_calloc(m->queries + 1, sizeof *run->query_source);
    run->query_band = ist_calloc(m->queries + 1, sizeof *run->query_band);
    if (!run->query_source || !run->query_band)
        return ist_error_nomem(err);
    run->nper_query = m->queries;
    run->has_rows = true;
    for (size_t i = 0; i < m->queries; i++) {
        size_t row = m->query_row[i];
        run->query_band[i] = ist_metrics_band_of(m, row + 1);
        if (row < ist_store_rows(src) && !(run->query_source[i] = ist_strdup(ist_store_word(src, row))))
            return ist_error_nomem(err);
    }
    return IST_OK;
}

static ist_status
score_stage(ist_result *r, const char *label, ist_cmatview xs, ist_cmatview zt,
            const ist_store *src, const ist_pairs *test, const ist_evaluate_opts *o,
            ist_error *err)
{
    for (int k = 0; k < 2; k++) {
        if (!(o->methods & (k ? IST_RESULT_CSLS : IST_RESULT_COSINE)))
            continue;
        ist_eval_opts eo = o->eval;
        eo.method = k ? IST_RETRIEVAL_CSLS : IST_RETRIEVAL_COSINE;
        ist_result_run *run = &r->runs[r->nruns++];
        ist_status rc;
        if (!(run->label = ist_strdup(label)))
            return ist_error_nomem(err);
        if ((rc = ist_eval_run(xs, zt, test, &eo, &run->m, err)) != IST_OK ||
            (rc = fill_queries(run, src, o, err)) != IST_OK)
            return rc;
    }
    return IST_OK;
}

static ist_status
diagnose(ist_result *r, ist_cmatview xs, ist_cmatview zt, const ist_store *tgt,
         const ist_pairs *test, const ist_evaluate_opts *o, ist_error *err)
{
    ist_diag_opts d = o->diag;
    d.search = o->eval.search;
    return ist_diag_run(xs, zt, tgt, test, &d, &r->diagnostics, err);
}

/* Score each stage asked for: the seed-only map, then the refined one (applied once, or
 * taken from the options), and diagnose the last stage scored. */
static ist_status
score_all(ist_result *r, const ist_map *map, const ist_store *src, const ist_store *tgt,
          const ist_pairs *test, const ist_evaluate_opts *o, ist_error *err)
{
    ist_status rc = IST_OK;

    if (!(r->runs = ist_calloc(4, sizeof *r->runs)))
        return ist_error_nomem(err);
    for (int s = 0; rc == IST_OK && s < 2; s++) {
        unsigned stage = s ? IST_STAGE_REFINED : IST_STAGE_SEED;
        bool last = s == 1 || !(o->stages & IST_STAGE_REFINED);
        ist_map *seed_only = NULL;
        ist_matrix *xs = NULL, *zt = NULL;
        const char *label = s && ist_map_rounds(map) ? RK_RUN_REFINED : RK_RUN_SEED;
        if (!(o->stages & stage))
            continue;
        if (!s)
            rc = ist_map_seed_only(map, &seed_only, err);
        bool given = s && o->refined_xs && o->refined_zt;
        if (rc == IST_OK && !given)
            rc = ist_map_apply(s ? map : seed_only, src, tgt, &xs, &zt, err);
        if (rc == IST_OK) {
            ist_cmatview vx = ist_matrix_cview(given ? o->refined_xs : xs);
            ist_cmatview vz = ist_matrix_cview(given ? o->refined_zt : zt);
            rc = score_stage(r, label, vx, vz, src, test, o, err);
            if (rc == IST_OK && last && o->diagnostics)
                rc = diagnose(r, vx, vz, tgt, test, o, err);
        }
        ist_matrix_free(xs);
        ist_matrix_free(zt);
        ist_map_free(seed_only);
    }
    return rc;
}

ist_status
ist_evaluate(const ist_map *map, const ist_store *src, const ist_store *tgt,
             const ist_pairs *test, const ist_pairs_coverage *cov, const ist_evaluate_opts *opts,
             ist_result **out, ist_error *err)
{
    ist_evaluate_opts dflt;
    ist_result *r;
    ist_status rc;

    *out = NULL;
    if (!opts) {
        ist_evaluate_opts_init(&dflt);
        opts = &dflt;
    }
    if (!(r = ist_calloc(1, sizeof *r)))
        return ist_error_nomem(err);
    rc = record_inputs(r, map, src, tgt, opts, err);
    if (rc == IST_OK)
        rc = record_options(r, opts, err);
    if (rc == IST_OK && test)
        rc = record_test(r, map, test, cov, opts, err);
    if (rc == IST_OK && test)
        rc = score_all(r, map, src, tgt, test, opts, err);
    if (rc == IST_OK && r->nruns)
        r->test.source_words = r->runs[0].m.queries;   /* distinct covered source words */
    if (rc == IST_OK && r->nruns && opts->eval.bands_auto) {
        /* the edges the vocabulary's size gave, not the fixed ones that were not used */
        const ist_metrics *m = &r->runs[0].m;
        r->options.nedges = m->nbands ? m->nbands - 1 : 0;
        for (size_t i = 0; i < r->options.nedges; i++)
            r->options.band_edges[i] = m->band[i].hi;
    }
    if (rc != IST_OK) {
        ist_result_free(r);
        return rc;
    }
    *out = r;
    return IST_OK;
}

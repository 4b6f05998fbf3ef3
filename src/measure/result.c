/* result.c - the result JSON of align and score (docs/formats.md, "Result JSON"). */
#include <isthmus/metrics.h>

#include <inttypes.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "diag_int.h"
#include "error_int.h"
#include "json_int.h"
#include "ofile_int.h"
#include "result_ci_int.h"

#define RESULT_FORMAT_VERSION 1

static void
hex(ist_jw *w, const char *key, uint64_t v)
{
    char b[17];
    snprintf(b, sizeof b, "%016" PRIx64, v);
    ist_jw_str(w, key, b);
}

static void
write_precision(ist_jw *w, const size_t *hits, const double *p)
{
    ist_jw_obj_begin(w, "precision");
    for (size_t i = 0; i < IST_METRICS_NK; i++) {
        char key[16];
        snprintf(key, sizeof key, "p@%zu", ist_metrics_k(i));
        ist_jw_num(w, key, p[i]);
    }
    ist_jw_obj_end(w);
    ist_jw_obj_begin(w, "hits");
    for (size_t i = 0; i < IST_METRICS_NK; i++) {
        char key[16];
        snprintf(key, sizeof key, "@%zu", ist_metrics_k(i));
        ist_jw_uint(w, key, hits[i]);
    }
    ist_jw_obj_end(w);
}

static void
write_run(ist_jw *w, const ist_result_run *r, const ist_store *src, const ist_ci_opts *ci)
{
    const ist_metrics *m = &r->m;
    ist_jw_obj_begin(w, NULL);
    ist_jw_str(w, "label", r->label);
    ist_jw_str(w, "retrieval", ist_retrieval_name(m->method));
    ist_jw_uint(w, "neighbourhood", m->neighbourhood);
    ist_jw_uint(w, "sources", m->sources);
    ist_jw_uint(w, "queries", m->queries);
    ist_jw_num(w, "coverage", m->coverage);
    write_precision(w, m->hits, m->p);
    ist_jw_arr_begin(w, "bands");
    for (size_t b = 0; b < m->nbands; b++) {
        ist_jw_obj_begin(w, NULL);
        ist_jw_uint(w, "rank_from", m->band[b].lo);
        if (m->band[b].hi)
            ist_jw_uint(w, "rank_to", m->band[b].hi);
        else
            ist_jw_null(w, "rank_to");
        ist_jw_uint(w, "queries", m->band[b].queries);
        write_precision(w, m->band[b].hits, m->band[b].p);
        ist_result_ci_band(w, m, b, ci);
        ist_jw_obj_end(w);
    }
    ist_jw_arr_end(w);
    ist_result_ci_run(w, m, src, ci);
    ist_jw_obj_end(w);
}

static void
write_coverage(ist_jw *w, const ist_pairs_coverage *c)
{
    ist_jw_obj_begin(w, "coverage");
    ist_jw_uint(w, "pairs_read", c->read);
    ist_jw_uint(w, "pairs_kept", c->kept);
    ist_jw_uint(w, "duplicates", c->duplicates);
    ist_jw_uint(w, "missing_source", c->missing_source);
    ist_jw_uint(w, "missing_target", c->missing_target);
    ist_jw_uint(w, "missing_both", c->missing_both);
    ist_jw_uint(w, "sources_read", c->sources_read);
    ist_jw_uint(w, "sources_kept", c->sources_kept);
    ist_jw_str(w, "source_matching", c->source_exact ? "exact" : "normalised");
    ist_jw_str(w, "target_matching", c->target_exact ? "exact" : "normalised");
    ist_jw_obj_end(w);
}

ist_status
ist_result_render(const ist_result_info *in, const ist_result_run *runs, size_t nruns,
                  const ist_ci_opts *ci, char **text, ist_error *err)
{
    ist_jw w;

    ist_jw_init(&w, true);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "format", "isthmus result");
    ist_jw_int(&w, "version", RESULT_FORMAT_VERSION);
    ist_jw_str(&w, "command", in->command);
    ist_jw_obj_begin(&w, "inputs");
    ist_jw_obj_begin(&w, "source");
    ist_jw_str(&w, "path", in->source_path);
    hex(&w, "fingerprint", in->source_fingerprint);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "target");
    ist_jw_str(&w, "path", in->target_path);
    hex(&w, "fingerprint", in->target_fingerprint);
    ist_jw_obj_end(&w);
    ist_jw_str(&w, "map", in->map_path);
    ist_jw_obj_begin(&w, "seeds");
    ist_jw_str(&w, "path", in->seeds_path);
    hex(&w, "checksum", in->seeds_checksum);
    ist_jw_obj_end(&w);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "test");
    ist_jw_str(&w, "path", in->test_path);
    hex(&w, "checksum", in->test_checksum);
    hex(&w, "source_words_hash", in->test_sources_hash);
    ist_jw_uint(&w, "source_words", in->test_sources);
    ist_result_ci_test(&w, in);
    write_coverage(&w, &in->test_coverage);
    ist_jw_uint(&w, "overlap_with_seeds", in->overlap);
    ist_jw_bool(&w, "overlap_allowed", in->overlap_allowed);
    ist_jw_obj_end(&w);
    if (in->options_json)
        ist_jw_raw(&w, "options", in->options_json);
    if (in->map_json)
        ist_jw_raw(&w, "map", in->map_json);
    ist_jw_arr_begin(&w, "runs");
    for (size_t i = 0; i < nruns; i++)
        write_run(&w, &runs[i], in->source, ci);
    ist_jw_arr_end(&w);
    if (in->diagnostics)
        ist_result_write_diag(&w, in->diagnostics);
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, text, err);
}

void
ist_result_free_text(char *text)
{
    ist_free(text);
}

ist_status
ist_result_write(const char *path, const ist_result_info *in, const ist_result_run *runs,
                 size_t nruns, ist_error *err)
{
    char *text = NULL;
    ist_status rc = ist_result_render(in, runs, nruns, NULL, &text, err);
    if (rc != IST_OK)
        return rc;
    ist_ofile *f;
    rc = ist_ofile_open(path, false, &f, err);
    if (rc == IST_OK) {
        rc = ist_ofile_write(f, text, strlen(text), err);
        if (rc == IST_OK)
            rc = ist_ofile_write(f, "\n", 1, err);
        if (rc == IST_OK)
            rc = ist_ofile_commit(f, err);
        else
            ist_ofile_abort(f);
    }
    ist_free(text);
    return rc;
}

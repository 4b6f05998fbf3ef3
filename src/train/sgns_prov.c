/* sgns_prov.c - the provenance record of trained vectors (what, from what, how). */
#include <isthmus/isthmus.h>

#include "alloc_int.h"
#include "train_prov_int.h"

ist_status
ist_sgns_provenance_json(const ist_sgns_opts *o, const ist_sgns_result *res,
                         const char *text_json, const char *sources_json, uint64_t tokens,
                         size_t types, char **json, ist_error *err)
{
    ist_jw w;

    *json = NULL;
    ist_train_prov_begin(&w, text_json, sources_json, tokens, types);
    ist_jw_obj_begin(&w, "training");
    ist_jw_str(&w, "method", "skip-gram negative sampling");
    ist_jw_uint(&w, "dimension", o->dim);
    ist_jw_uint(&w, "context", o->window);
    ist_jw_uint(&w, "noise_samples", o->negatives);
    ist_jw_num(&w, "noise_power", 0.75);
    ist_jw_uint(&w, "passes", o->epochs);
    ist_jw_num(&w, "rate", o->lr0);
    ist_jw_num(&w, "rate_floor", o->lr_floor);
    ist_jw_num(&w, "subsample", o->subsample);
    ist_jw_uint(&w, "threads", o->threads);
    ist_jw_uint(&w, "seed", o->seed);
    ist_jw_str(&w, "kernel", o->kernel == IST_SGNS_REFERENCE ? "reference" : "fast");
    ist_jw_str(&w, "simd", ist_sgns_simd_name(o->simd));
    ist_jw_bool(&w, "keep_context", o->keep_context);
    if (res && res->thread_copies) {
        ist_jw_str(&w, "threads_train", "own copies");
        ist_jw_uint(&w, "combinations_per_pass", o->exchanges ? o->exchanges : 1);
        ist_jw_str(&w, "merge", o->merge == IST_SGNS_MERGE_MEAN ? "mean" : "changes");
    } else if (o->threads > 1) {
        ist_jw_str(&w, "threads_train", "shared vectors");
    }
    if (res && res->ranks > 1) {
        ist_jw_uint(&w, "ranks", res->ranks);
        ist_jw_uint(&w, "exchanges_per_pass", o->exchanges);
        ist_jw_str(&w, "merge", o->merge == IST_SGNS_MERGE_MEAN ? "mean" : "changes");
    }
    ist_jw_obj_end(&w);
    if (res) {
        ist_jw_obj_begin(&w, "result");
        ist_jw_uint(&w, "words_seen", res->words_seen);
        ist_jw_uint(&w, "words_trained", res->words_trained);
        ist_jw_uint(&w, "pairs", res->pairs);
        ist_jw_num(&w, "final_loss", res->final_loss);
        ist_jw_obj_end(&w);
    }
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, json, err);
}

void
ist_sgns_free(void *p)
{
    ist_free(p);
}

size_t
ist_sgns_auto_passes(uint64_t tokens)
{
    if (tokens == 0)
        return 20;
    double p = 16e6 / (double)tokens, floor = 80e6 / (double)tokens;
    if (floor > 20)
        floor = 20;
    if (floor < 5)
        floor = 5;
    if (p < floor)
        p = floor;
    if (p > 20)
        p = 20;
    return (size_t)(p + 0.5);
}

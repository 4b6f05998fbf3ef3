/* ppmi_prov.c - the provenance record of count-based vectors (what, from what, how). */
#include <isthmus/isthmus.h>

#include "alloc_int.h"
#include "train_prov_int.h"

ist_status
ist_ppmi_provenance_json(const ist_ppmi_opts *o, const ist_ppmi_result *res,
                         const char *text_json, const char *sources_json, uint64_t tokens,
                         size_t types, char **json, ist_error *err)
{
    ist_jw w;

    *json = NULL;
    ist_train_prov_begin(&w, text_json, sources_json, tokens, types);
    ist_jw_obj_begin(&w, "training");
    ist_jw_str(&w, "method", "PPMI truncated SVD");
    ist_jw_uint(&w, "dimension", o->dim);
    ist_jw_uint(&w, "context", o->window);
    ist_jw_str(&w, "weighting", o->weighting == IST_PPMI_FLAT ? "flat" : "linear");
    ist_jw_num(&w, "smoothing", o->alpha);
    ist_jw_num(&w, "shift", o->shift);
    ist_jw_num(&w, "singular_power", o->power);
    ist_jw_uint(&w, "oversample", o->oversample);
    ist_jw_uint(&w, "power_iterations", o->power_iters);
    ist_jw_uint(&w, "threads", o->threads);
    ist_jw_uint(&w, "seed", o->seed);
    ist_jw_obj_end(&w);
    if (res) {
        ist_jw_obj_begin(&w, "result");
        ist_jw_uint(&w, "nonzeros", res->nonzeros);
        ist_jw_uint(&w, "positive", res->positive);
        ist_jw_uint(&w, "rank", res->rank);
        ist_jw_num(&w, "sv_max", res->sv_max);
        ist_jw_num(&w, "sv_min", res->sv_min);
        ist_jw_obj_end(&w);
    }
    ist_jw_obj_end(&w);
    return ist_jw_finish(&w, json, err);
}

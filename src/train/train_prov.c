/* train_prov.c - the common beginning of a trained vector file's provenance record. */
#include <isthmus/isthmus.h>

#include <stdio.h>

#include "train_prov_int.h"

void
ist_train_prov_begin(ist_jw *w, const char *text_json, const char *sources_json,
                     uint64_t tokens, size_t types)
{
    char producer[64];

    snprintf(producer, sizeof producer, "isthmus %s", ist_version());
    ist_jw_init(w, false);
    ist_jw_obj_begin(w, NULL);
    ist_jw_str(w, "producer", producer);
    ist_jw_str(w, "command", "train");
    if (text_json)
        ist_jw_raw(w, "text", text_json);
    else
        ist_jw_null(w, "text");
    ist_jw_obj_begin(w, "corpus");
    if (sources_json)
        ist_jw_raw(w, "sources", sources_json);
    else
        ist_jw_null(w, "sources");
    ist_jw_uint(w, "tokens", tokens);
    ist_jw_uint(w, "types", types);
    ist_jw_obj_end(w);
}

/* train_prov_int.h - what the provenance records of both trainers begin with. */
#ifndef ISTHMUS_TRAIN_PROV_INT_H
#define ISTHMUS_TRAIN_PROV_INT_H

#include <stddef.h>
#include <stdint.h>

#include "json_int.h"

/* Start w (ist_jw_init) and the record's object, and write its common members: "producer"
 * (this library's version), "command":"train", "text" (text_json, raw, or null) and
 * "corpus":{"sources": sources_json (raw, or null), "tokens", "types"}. The caller adds
 * "training" and "result", closes the object and finishes w. */
void ist_train_prov_begin(ist_jw *w, const char *text_json, const char *sources_json,
                          uint64_t tokens, size_t types);

#endif

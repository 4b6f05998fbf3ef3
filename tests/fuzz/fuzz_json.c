/* fuzz_json.c - the JSON reader on any bytes: a tree or a message, never a crash. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "json_int.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void
walk(const ist_jv *v, int depth)
{
    if (depth > 70)
        abort();   /* the reader promises at most 64 levels */
    for (size_t i = 0; i < ist_jv_len(v); i++) {
        if (ist_jv_type(v) == IST_JOBJ && ist_jv_key(v, i) == NULL)
            abort();
        walk(ist_jv_at(v, i), depth + 1);
    }
    (void)ist_jv_str(v, NULL);
    (void)ist_jv_num(v, 0);
}

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    ist_jv *root;
    ist_error e;

    if (ist_json_parse((const char *)data, size, "fuzz.json", &root, &e) == IST_OK) {
        walk(root, 0);
        ist_jv_free(root);
    } else if (root != NULL || e.msg[0] == '\0') {
        abort();
    }
    return 0;
}

/* fuzz_corpus.c - any bytes given as a prepared-corpus file are opened consistently or
 * refused with a message; never a crash or a leak. When the bytes start with the magic,
 * the trailer checksum is recomputed first, so the fuzzer reaches the section checks
 * behind it instead of stopping at the checksum. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <zlib.h>

#include <isthmus/corpus.h>

#include "fuzz_file.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[FUZZ_PATH_CAP];
    ist_corpus *c;
    ist_error e;
    uint8_t *copy = malloc(size ? size : 1);

    if (!copy)
        return 0;
    memcpy(copy, data, size);
    if (size >= 136 && memcmp(copy, "ISTPREP\x1a", 8) == 0) {
        uint32_t crc = (uint32_t)crc32(0, copy, (uInt)(size - 8));
        for (int i = 0; i < 4; i++)
            copy[size - 8 + i] = (uint8_t)(crc >> (8 * i));
    }
    int ok = fuzz_write_file(path, sizeof path, copy, size);
    free(copy);
    if (!ok)
        return 0;
    if (ist_corpus_open(path, &c, &e) == IST_OK) {
        size_t n;
        const uint32_t *ids = ist_corpus_ids(c, &n);
        size_t v = ist_vocab_size(ist_corpus_vocab(c));
        for (size_t i = 0; i < n; i++)
            if (ids[i] != IST_CORPUS_EOL && ids[i] >= v)
                abort();
        for (size_t i = 0; i < v; i++)
            (void)ist_vocab_word(ist_corpus_vocab(c), (uint32_t)i);
        for (size_t i = 0; i < ist_corpus_n_sources(c); i++) {
            ist_corpus_source s;
            if (ist_corpus_source_get(c, i, &s, NULL) != IST_OK || !s.path)
                abort();
        }
        if (!ist_corpus_sources_json(c))
            abort();
        ist_corpus_free(c);
    } else if (e.msg[0] == '\0') {
        abort();
    }
    unlink(path);
    return 0;
}

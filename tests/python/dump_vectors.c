/* dump_vectors.c - print what the C reader sees in a vector file, for the Python tests:
 * a first line "fingerprint HEX16 rows R dim D", then one line per row: the word, its count,
 * and the bits of every component as 8 hex digits. Exit 1 with the library's message when
 * the file does not open.
 * usage: dump_vectors FILE */
#include <inttypes.h>
#include <stdio.h>
#include <string.h>

#include <isthmus/isthmus.h>

int
main(int argc, char **argv)
{
    ist_store_opts o;
    ist_store *s = NULL;
    ist_error err;
    char msg[1024];

    if (argc != 2) {
        fprintf(stderr, "usage: dump_vectors FILE\n");
        return 2;
    }
    ist_store_opts_init(&o);
    o.verify = true;
    if (ist_store_open(argv[1], &o, &s, &err) != IST_OK) {
        fprintf(stderr, "%s\n", ist_error_format(&err, msg, sizeof msg));
        return 1;
    }
    printf("fingerprint %016" PRIx64 " rows %zu dim %zu\n", ist_store_fingerprint(s),
           ist_store_rows(s), ist_store_dim(s));
    for (size_t i = 0; i < ist_store_rows(s); i++) {
        const float *r = ist_store_row(s, i);
        printf("%s %" PRIu64, ist_store_word(s, i), ist_store_count(s, i));
        for (size_t j = 0; j < ist_store_dim(s); j++) {
            uint32_t bits;
            memcpy(&bits, &r[j], sizeof bits);
            printf(" %08" PRIx32, bits);
        }
        putchar('\n');
    }
    ist_store_free(s);
    return 0;
}

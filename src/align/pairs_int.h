/* pairs_int.h - word normalisation for pair lists, kept behind one small
 * interface so that the text module's normaliser plugs in at one place. */
#ifndef ISTHMUS_PAIRS_INT_H
#define ISTHMUS_PAIRS_INT_H

#include <stdbool.h>
#include <stddef.h>

#include <isthmus/error.h>
#include <isthmus/store.h>

typedef struct ist_pairs_norm ist_pairs_norm;

/* A normaliser doing to words what was done to the vocabulary of s, read
 * from its provenance. When the provenance says nothing about text options,
 * *exact is set and *out is NULL: words are then used as they are. */
ist_status ist_pairs_norm_open(const ist_store *s, ist_pairs_norm **out, bool *exact,
                               ist_error *err);
/* *out is borrowed until the next call. */
ist_status ist_pairs_norm_word(ist_pairs_norm *nz, const char *in, size_t len, const char **out,
                               size_t *out_len, ist_error *err);
void ist_pairs_norm_close(ist_pairs_norm *nz);

/* True when the word holds a decimal digit or an upper-case letter. */
bool ist_pairs_word_marked(const char *w);

#endif

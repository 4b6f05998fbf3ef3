/* align_int.h - the map struct, shared by align.c (fitting) and map_file.c (I/O). */
#ifndef ISTHMUS_ALIGN_INT_H
#define ISTHMUS_ALIGN_INT_H

#include <isthmus/align.h>

#define IST_MAP_MAX_ROUNDS 64
#define IST_MAP_MAX_STEPS 128

struct ist_map {
    size_t dim;
    ist_matrix *w;          /* final map */
    ist_matrix *w0;         /* Procrustes on the seeds, before refinement */
    ist_norm *ns, *nt;
    uint64_t fp_s, fp_t, seed_ck;
    size_t rows_s, rows_t, seed_n;
    size_t refine_vocab, neighbourhood;
    ist_procrustes_info fit0;
    ist_align_round rounds[IST_MAP_MAX_ROUNDS];
    size_t nrounds;
    ist_pairs *seeds;       /* the kept seed pairs (words only), for leakage checks */
};

/* Copy a store's matrix into a new own matrix. */
ist_status ist_align_copy_store(const ist_store *s, ist_matrix **out, ist_error *err);

#endif

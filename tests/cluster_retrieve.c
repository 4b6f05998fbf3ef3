/* cluster_retrieve.c - retrieval on synthetic spaces with many ties, written to a file.
 *   cluster_retrieve OUT [EXPECT-RANKS]
 * Run once alone and once under mpirun: the two files must be equal byte for byte
 * (tests/check_cluster.sh). The scores are computed in 32 KiB of tiles, so the 3001
 * target rows make dozens of target blocks and every rank gets several; every
 * seventh target row repeats a row from the far end of the table, so equal scores
 * fall on different ranks and the merge must break the ties the way one process does
 * (the lower row first). Rank 0 writes: top-10 rows and scores by cosine, then by
 * CSLS, then the CSLS neighbourhood terms. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/isthmus.h>

#define NQ 257
#define NT 3001
#define DIM 24
#define K 10

static uint64_t state = 0x2545f4914f6cdd1dULL;

static float
uniform(void)
{
    state ^= state << 13;
    state ^= state >> 7;
    state ^= state << 17;
    return (float)((double)(state >> 11) / 9007199254740992.0) - 0.5f;
}

static void
fill(ist_matrix *m, size_t rows, int ties)
{
    ist_matview v = ist_matrix_view(m);
    for (size_t i = 0; i < rows; i++) {
        float *r = v.data + i * v.stride;
        double len = 0;
        for (size_t j = 0; j < DIM; j++) {
            r[j] = uniform();
            len += (double)r[j] * r[j];
        }
        for (size_t j = 0; j < DIM; j++)
            r[j] = (float)(r[j] / sqrt(len));
    }
    for (size_t i = 3; ties && i < rows / 2; i += 7)
        memcpy(v.data + i * v.stride, v.data + (rows - 1 - i) * v.stride, DIM * sizeof(float));
}

static int
put(FILE *f, const ist_topk *tk)
{
    for (size_t i = 0; i < ist_topk_rows(tk); i++)
        if (fwrite(ist_topk_index(tk, i), sizeof(uint32_t), K, f) != K ||
            fwrite(ist_topk_score(tk, i), sizeof(float), K, f) != K)
            return -1;
    return 0;
}

int
main(int argc, char **argv)
{
    ist_matrix *q = NULL, *t = NULL;
    ist_topk *cos = NULL, *csls = NULL;
    ist_retrieve_opts ro;
    float r[NQ];
    ist_error err;
    char buf[1024];
    int rc = 1;

    if (ist_cluster_init(&argc, &argv, &err) != IST_OK) {
        fprintf(stderr, "cluster_retrieve: %s\n", ist_error_format(&err, buf, sizeof buf));
        return 1;
    }
    if (argc < 2) {
        fprintf(stderr, "usage: cluster_retrieve OUT [EXPECT-RANKS]\n");
        goto done;
    }
    if (argc > 2 && ist_cluster_size() != (unsigned)atoi(argv[2])) {
        fprintf(stderr, "cluster_retrieve: expected %s ranks, found %u\n", argv[2],
                ist_cluster_size());
        goto done;
    }
    if (ist_matrix_new(NQ, DIM, &q, &err) != IST_OK || ist_matrix_new(NT, DIM, &t, &err))
        goto fail;
    fill(q, NQ, 0);
    fill(t, NT, 1);
    ist_retrieve_opts_init(&ro);
    ro.budget = 32 << 10;
    ro.threads = 2;
    if (ist_retrieve_rank(ist_matrix_cview(q), ist_matrix_cview(q), ist_matrix_cview(t),
                          IST_RETRIEVAL_COSINE, K, 0, &ro, &cos, &err) != IST_OK ||
        ist_retrieve_rank(ist_matrix_cview(q), ist_matrix_cview(q), ist_matrix_cview(t),
                          IST_RETRIEVAL_CSLS, K, 10, &ro, &csls, &err) != IST_OK ||
        ist_retrieve_neighbourhood(ist_matrix_cview(q), ist_matrix_cview(t), 10, &ro, r,
                                   &err) != IST_OK)
        goto fail;
    if (ist_cluster_rank() == 0) {
        FILE *f = fopen(argv[1], "wb");
        if (!f || put(f, cos) || put(f, csls) || fwrite(r, sizeof r, 1, f) != 1 || fclose(f)) {
            perror(argv[1]);
            goto done;
        }
    }
    rc = 0;
    goto done;
fail:
    fprintf(stderr, "cluster_retrieve: %s\n", ist_error_format(&err, buf, sizeof buf));
done:
    ist_topk_free(cos);
    ist_topk_free(csls);
    ist_matrix_free(q);
    ist_matrix_free(t);
    ist_cluster_finalize();
    return rc;
}

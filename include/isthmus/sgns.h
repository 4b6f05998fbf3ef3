/* isthmus/sgns.h - skip-gram with negative sampling: word vectors from a token-id stream.
 *
 * Owns nothing between calls: ist_sgns_train() reads an id stream and its counts and returns
 * two new matrices. The methods, each with its source (formulas in docs/methods.md):
 *
 * - Skip-gram with negative sampling (Mikolov et al. 2013, "Distributed Representations of
 *   Words and Phrases and their Compositionality", eq. 4): for an input word w and a context
 *   word c the loss is  -log s(v_c . u_w) - sum_{i=1..k} log s(-v_ni . u_w),  s(x) = 1/(1+e^-x),
 *   with the k noise words n_i drawn from P_n.
 * - Noise distribution (same paper, section 2.2): P_n(w) = count(w)^0.75 / sum_v count(v)^0.75.
 *   Drawn in O(1) from an alias table (Walker 1977; Vose 1991) of 8 bytes per word, exact
 *   rather than quantised, and small enough to stay in cache for vocabularies of ~100k words.
 * - Subsampling of frequent words (same paper, eq. 5): each occurrence of w is discarded with
 *   probability  P(discard w) = 1 - sqrt(t / f(w)),  f(w) = count(w) / total count, so it is kept
 *   with probability min(1, sqrt(t / f(w))). Discarded words are removed before the windows
 *   are formed, so the context reaches further.
 * - Dynamic window (Mikolov et al. 2013; analysed by Levy, Goldberg & Dagan 2015): for each
 *   position the window radius is drawn uniformly from 1..window. Windows never cross a line
 *   end (IST_CORPUS_EOL).
 * - Learning rate decays linearly from lr0 to lr0 * lr_floor over all epochs:
 *   lr = lr0 * max(lr_floor, 1 - words_done / (epochs * words_per_epoch)).
 * - Initialisation: input vectors uniform in [-0.5/dim, 0.5/dim], output vectors zero.
 * - SGNS factorises the shifted PMI matrix: at the optimum w . c = PMI(w, c) - log k
 *   (Levy & Goldberg 2014, "Neural Word Embedding as Implicit Matrix Factorization").
 * - Threads (`parallel`): each trains its own copy of both matrices and the copies are
 *   combined `exchanges` times per pass, the model averaging below done inside one process
 *   (deterministic); or all update the shared matrices without locks ("Hogwild", Recht et
 *   al. 2011).
 * - Several MPI ranks (isthmus/cluster.h): data-parallel training with model averaging
 *   (iterative parameter mixing, McDonald, Hall & Mann 2010; parallel SGD, Zinkevich,
 *   Weimer, Smola & Li 2010). Each rank trains on its share of the stream (split on line
 *   ends) from the same start; `exchanges` times per pass all ranks replace both matrices by
 *   their mean. The learning rate follows the words done by all ranks together.
 * - The FAST kernel shares one set of k noise words across all contexts of a window, so that a
 *   window's updates become small dense matrix products (Ji et al. 2016, shared- and
 *   distributed-memory parallel SGNS, arXiv 1604.04661): with X the rows of the
 *   window's context words and Y the rows of [centre word; noise words],
 *   S = X Y^T, G = lr (L - s(S)) (L = 1 in the first column, 0 elsewhere),
 *   dX = G Y, dY = G^T X. The REFERENCE kernel is the plain per-pair loop with fresh noise
 *   words for every pair. Both optimise the same objective.
 */
#ifndef ISTHMUS_SGNS_H
#define ISTHMUS_SGNS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <isthmus/corpus.h>            /* IST_CORPUS_EOL */
#include <isthmus/error.h>
#include <isthmus/matrix.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_sgns_kernel {
    IST_SGNS_FAST = 0,       /* shared noise words per window, vectorised products */
    IST_SGNS_REFERENCE       /* plain per-pair update loop */
} ist_sgns_kernel;

#define IST_SGNS_MERGE_CHANGES 0
#define IST_SGNS_MERGE_MEAN 1

/** How the threads of one process share the two parameter matrices. */
typedef enum ist_sgns_parallel {
    /* COPIES when threads >= 2, the job is one process and the copies fit in
     * IST_SGNS_COPIES_BUDGET bytes; SHARED otherwise */
    IST_SGNS_PARALLEL_AUTO = 0,
    /* every thread trains its own copy of both matrices; `exchanges` times per pass the
     * threads wait for each other and the copies are combined as `merge` says, in thread
     * order (deterministic: reruns with the same seed and thread count are bit-identical) */
    IST_SGNS_PARALLEL_COPIES,
    /* the threads update the shared matrices without locks (Hogwild, Recht et al. 2011);
     * reruns with two threads or more differ in their bits */
    IST_SGNS_PARALLEL_SHARED
} ist_sgns_parallel;

/** The most memory AUTO gives the threads' copies: threads x 2 x vocabulary x padded
 *  dimension x 4 bytes (1 GiB). */
#define IST_SGNS_COPIES_BUDGET ((uint64_t)1 << 30)

/** What the progress callback sees. */
typedef struct ist_sgns_progress {
    double fraction;         /* of all epochs, 0..1 */
    double words_per_sec;    /* stream words (before subsampling) per second, all threads */
    double lr;               /* current learning rate */
    double loss;             /* mean SGNS loss per (input, output) pair since the last call */
    double eta_sec;          /* estimated seconds left */
    uint64_t words_done;     /* stream words done, all epochs */
} ist_sgns_progress;

typedef struct ist_sgns_opts {
    size_t dim;              /* vector dimension [default 100] */
    size_t window;           /* largest context radius [default 10] */
    size_t negatives;        /* noise words k per positive pair [default 5] */
    size_t epochs;           /* passes over the stream [default 5] */
    double lr0;              /* start learning rate [default 0.025] */
    double lr_floor;         /* the rate never falls below lr0 * lr_floor [default 1e-4] */
    double subsample;        /* t in the discard formula; 0 = off [default 1e-4] */
    size_t threads;          /* worker threads [default 1] */
    /* In a job of several MPI ranks (isthmus/cluster.h): each rank trains on its share
     * of the stream and the ranks average both parameter matrices this many times per
     * pass (model averaging; docs/cluster.md). With parallel = COPIES: the times per pass
     * the threads' copies are combined [default 4]. */
    size_t exchanges;
    /* How an exchange combines the ranks: IST_SGNS_MERGE_CHANGES adds up every rank's
     * changes since the last exchange (the average change times the rank count), so that
     * a word met by one rank moves as far as in one process; IST_SGNS_MERGE_MEAN replaces
     * the vectors by their mean (plain model averaging) [default CHANGES]. */
    int merge;
    uint64_t seed;           /* random seed [default 1] */
    ist_sgns_kernel kernel;  /* [default IST_SGNS_FAST] */
    const char *simd;        /* instruction set of the FAST kernel: "portable", "avx2" or
                                "avx512" (one the CPU lacks falls back to the best it has);
                                NULL: the best this CPU has [default NULL] */
    bool keep_context;       /* also return the output (context) vectors [default false] */
    /* Called from the calling thread about every 0.25 s; return non-zero to cancel
     * (ist_sgns_train then returns IST_ERR_CANCELLED). May be NULL. */
    int (*progress)(void *ctx, const struct ist_sgns_progress *p);
    void *progress_ctx;
    ist_sgns_parallel parallel; /* how the threads share the matrices [default AUTO] */
    /* A design kept for measurement (docs/performance.md, "Threads"): with parallel =
     * SHARED and two threads or more, each thread trains the hot_rows most frequent words
     * on private copies of their rows, merged into the shared rows every hot_merge
     * publications (0..65536 words; 0 = none [default 0]; hot_merge 1..1000, 0 = 1). */
    size_t hot_rows;
    size_t hot_merge;
} ist_sgns_opts;

/** Fill o with the defaults above. */
IST_API void ist_sgns_opts_init(ist_sgns_opts *o);

typedef struct ist_sgns_result {
    uint64_t words_seen;     /* stream words read, all epochs, before subsampling */
    uint64_t words_trained;  /* words kept by subsampling and used as window centres */
    uint64_t pairs;          /* (input, output) pairs updated: dot products done */
    double seconds;          /* wall-clock training time */
    double words_per_sec;    /* words_seen / seconds */
    double final_loss;       /* mean loss per pair over the last epoch */
    unsigned ranks;          /* ranks that trained together (1: one process) */
    uint64_t exchange_count; /* parameter averages done */
    double exchange_seconds; /* wall-clock time spent averaging (this rank's) */
    double wait_seconds;     /* time this rank waited for the others before exchanges */
    uint64_t exchange_bytes; /* parameter bytes each rank sends in one exchange */
    bool thread_copies;      /* the threads trained copies of their own (parallel = COPIES);
                              * exchange_count and exchange_seconds then count and time the
                              * combinations of the copies */
} ist_sgns_result;

/** Train skip-gram vectors.
 *  ids[n_ids]: the token stream; IST_CORPUS_EOL separates lines. counts[vocab_size]: corpus
 *  count of every id (drives subsampling and the noise distribution).
 *  Success: *in_vectors is a new vocab_size x dim matrix (row = id) owned by the caller
 *  (ist_matrix_free); *ctx_vectors likewise when o->keep_context, else NULL (ctx_vectors may
 *  be NULL when keep_context is false). res (may be NULL) gets the counts and timings.
 *  Errors: IST_ERR_INVALID for options out of range, an empty stream, an id >= vocab_size or
 *  all counts zero; IST_ERR_NOMEM; IST_ERR_CANCELLED when ist_cancel_requested() or the
 *  progress callback asked to stop (nothing is returned then); IST_ERR_NUMERIC when the
 *  vectors diverged (NaN). Runs on one thread, and runs whose threads train copies of their
 *  own (parallel), are bit-for-bit reproducible for a seed and thread count.
 *  In a job of several ranks the call is collective; every rank returns the same vectors,
 *  and a rank that fails or is stopped makes all return its error, naming it. */
IST_API ist_status ist_sgns_train(const uint32_t *ids, size_t n_ids, const uint64_t *counts,
                                  size_t vocab_size, const ist_sgns_opts *o,
                                  ist_matrix **in_vectors, ist_matrix **ctx_vectors,
                                  ist_sgns_result *res, ist_error *err);

/** Provenance text for vectors trained by ist_sgns_train(): a JSON object
 *  {"producer":"isthmus <version>","command":"train","text":<text_json>,
 *   "corpus":{"sources":<sources_json>,"tokens":..,"types":..},
 *   "training":{"method":"skip-gram negative sampling","dimension":..,"context":..,
 *   "noise_samples":..,"noise_power":0.75,"passes":..,"rate":..,"subsample":..,"threads":..,
 *   "seed":..,"kernel":"fast"|"reference","simd":..,"keep_context":..
 *   [,"threads_train":"own copies","combinations_per_pass":..,"merge":.. when the threads
 *   trained copies of their own | ,"threads_train":"shared vectors" with two threads or more
 *   updating the shared vectors]
 *   [,"ranks":..,"exchanges_per_pass":..,"merge":.. when trained by several ranks]},
 *  "result":{"words_seen":..,"words_trained":..,"pairs":..,"final_loss":..}}.
 *  text_json and sources_json are inserted as they are (valid JSON, or NULL for null);
 *  res may be NULL. *json is owned by the caller: release with ist_sgns_free(). */
IST_API ist_status ist_sgns_provenance_json(const ist_sgns_opts *o, const ist_sgns_result *res,
                                            const char *text_json, const char *sources_json,
                                            uint64_t tokens, size_t types, char **json,
                                            ist_error *err);

/** Release memory returned by this module. NULL: no-op. */
IST_API void ist_sgns_free(void *p);

/** Passes for a corpus of this many tokens when the user gives none: 16 M / tokens, kept
 *  within a floor and 20. The floor is 20 below 4 M tokens (on the 0.8 M-token real-data
 *  check 10 passes lost ~10 points of precision@1 and 5 passes were unusable:
 *  docs/defaults.md), then falls as 80 M / tokens, never below 5. */
IST_API size_t ist_sgns_auto_passes(uint64_t tokens);

/** Name of the vector instruction set the FAST kernel uses on this machine ("avx512",
 *  "avx2", "portable") when ist_sgns_opts.simd is request (NULL: the best it has). The
 *  library reads no environment variable; the isthmus program sets the option from
 *  ISTHMUS_SIMD. */
IST_API const char *ist_sgns_simd_name(const char *request);

#ifdef __cplusplus
}
#endif
#endif

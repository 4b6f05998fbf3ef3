/* propose.c - candidate pairs for review: CSLS retrieval for the frequent
 * unlisted source words, margins, mutual neighbours, the review order, and the
 * candidate list file (docs/formats.md "Candidate list"). */
#include <isthmus/propose.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/cancel.h>
#include <isthmus/text.h>

#include "alloc_int.h"
#include "error_int.h"
#include "ofile_int.h"
#include "pairs_int.h"

/* How many extra neighbours are fetched per source word when gold targets of
 * the lists are to be skipped; when more of them than this crowd the top, the
 * word gets fewer candidates. */
#define SKIP_DEPTH 64u

/* Flags of target rows (tflag[]) and source rows (sflag[]). */
enum { T_GOLD = 1, T_STOP = IST_FILTER_STOP << 1, T_SHAPE = IST_FILTER_SHAPE << 1,
       T_VARIANT = IST_FILTER_VARIANT << 1, T_FILTERED = T_STOP | T_SHAPE | T_VARIANT };
enum { S_STOP = IST_FILTER_STOP, S_SHAPE = IST_FILTER_SHAPE, S_VARIANT = IST_FILTER_VARIANT };

struct ist_proposals {
    ist_proposal *row;
    size_t n;
    ist_propose_stats stats;
    ist_propose_order order;
    size_t top_sources, candidates, neighbourhood;
    bool skip_gold_targets, same_block;
    ist_word_filter filter;
};

void
ist_propose_opts_init(ist_propose_opts *o)
{
    memset(o, 0, sizeof *o);
    o->top_sources = IST_PROPOSE_SOURCES_DEFAULT;
    o->candidates = IST_PROPOSE_CANDIDATES_DEFAULT;
    o->order = IST_PROPOSE_INFORMATIVE;
    o->skip_gold_targets = false;
    ist_word_filter_init(&o->filter);
    o->same_block = true;
    ist_search_opts_init(&o->search);
}

void
ist_proposals_free(ist_proposals *p)
{
    if (!p)
        return;
    ist_free(p->row);
    ist_free(p);
}

size_t
ist_proposals_count(const ist_proposals *p)
{
    return p->n;
}

const ist_proposal *
ist_proposals_get(const ist_proposals *p, size_t i)
{
    return i < p->n ? &p->row[i] : NULL;
}

ist_propose_stats
ist_proposals_stats(const ist_proposals *p)
{
    return p->stats;
}

/* Mark the rows of the source (or target) words of the lists in flags[]; words
 * are normalised as the vocabulary of s was (one normaliser for all). */
static ist_status
mark_list_words(const ist_store *s, const ist_pairs *const *lists, size_t nlists, bool target,
                unsigned char *flags, size_t *marked, ist_error *err)
{
    ist_pairs_norm *nz = NULL;
    bool exact;
    ist_status rc = ist_pairs_norm_open(s, &nz, &exact, err);

    for (size_t l = 0; rc == IST_OK && l < nlists; l++) {
        const ist_pairs *p = lists[l];
        for (size_t i = 0; rc == IST_OK && p && i < ist_pairs_count(p); i++) {
            const char *w = target ? ist_pairs_target(p, i) : ist_pairs_source(p, i);
            size_t len = strlen(w);
            if (!exact && (rc = ist_pairs_norm_word(nz, w, len, &w, &len, err)) != IST_OK)
                break;
            ptrdiff_t r = ist_store_find(s, w);
            if (r >= 0 && !flags[r]) {
                flags[r] = 1;
                (*marked)++;
            }
        }
    }
    ist_pairs_norm_close(nz);
    return rc;
}

/* One source word under review: its rows in the result and its order keys. */
typedef struct group {
    size_t first, n;      /* rows row[first .. first+n) */
    size_t rank;          /* frequency rank (source row + 1) */
    double key;           /* informative: margin / weight (count, or 1 / rank) */
    float margin;         /* margin of the first candidate */
    bool mutual;          /* first candidate is a mutual neighbour */
    bool same;            /* first candidate spelt as the source word, in the block */
} group;



/* The same-spelling block comes last, in frequency order. */
static int
cmp_block(const group *x, const group *y)
{
    if (x->same != y->same)
        return x->same ? 1 : -1;
    if (x->same)
        return x->rank < y->rank ? -1 : x->rank > y->rank;
    return 0;
}

static int
cmp_informative(const void *a, const void *b)
{
    const group *x = a, *y = b;
    int c = cmp_block(x, y);
    if (c != 0 || x->same)
        return c;
    if (x->key != y->key)
        return x->key < y->key ? -1 : 1;
    return x->rank < y->rank ? -1 : x->rank > y->rank;
}

static int
cmp_certain(const void *a, const void *b)
{
    const group *x = a, *y = b;
    int c = cmp_block(x, y);
    if (c != 0 || x->same)
        return c;
    if (x->mutual != y->mutual)
        return x->mutual ? -1 : 1;
    if (x->margin != y->margin)
        return x->margin > y->margin ? -1 : 1;
    return x->rank < y->rank ? -1 : x->rank > y->rank;
}

/* Copy the rows of xs named in rows[] into a new matrix. */
static ist_status
gather(ist_cmatview v, const size_t *rows, size_t n, ist_matrix **out, ist_error *err)
{
    ist_status rc = ist_matrix_new(n, v.cols, out, err);
    if (rc != IST_OK)
        return rc;
    ist_matview m = ist_matrix_view(*out);
    for (size_t i = 0; i < n; i++)
        memcpy(m.data + i * m.stride, v.data + rows[i] * v.stride, v.cols * sizeof(float));
    return IST_OK;
}

/* What collect() needs besides the top-k lists. */
typedef struct collect_in {
    size_t cand;
    float min_score;
    const unsigned char *tflag;   /* T_* per target row */
    unsigned char tskip;          /* the T_* bits that leave a candidate out */
    const bool *same_only;        /* per query: keep only a same-spelling candidate */
    bool same_block;
    const ist_store *src, *tgt;
} collect_in;

static bool
same_word(const ist_store *src, size_t s, const ist_store *tgt, size_t t)
{
    return strcmp(ist_store_word(src, s), ist_store_word(tgt, t)) == 0;
}

/* The candidates of each query from its top-k list: drop skipped and filtered
 * targets (a target spelt as the query passes the word filter), stop at the
 * minimum score, keep the first `cand`, compute margins. Fills row[] and
 * groups; returns rows. */
static size_t
collect(const ist_topk *tk, const size_t *qrow, size_t nq, const collect_in *in,
        ist_proposal *row, group *g, size_t *ng, ist_propose_stats *st)
{
    size_t k = ist_topk_k(tk), n = 0;
    *ng = 0;
    for (size_t q = 0; q < nq; q++) {
        const uint32_t *ix = ist_topk_index(tk, q);
        const float *sc = ist_topk_score(tk, q);
        size_t kept = 0, first = n, cand = in->same_only[q] ? 1 : in->cand;
        float next = -INFINITY;     /* best score after the kept candidates */
        bool low = false;
        for (size_t a = 0; a < k && ix[a] != UINT32_MAX; a++) {
            unsigned char fl = in->tflag[ix[a]];
            if (fl & T_GOLD & in->tskip) {
                st->skipped_targets++;
                continue;
            }
            bool same = same_word(in->src, qrow[q], in->tgt, ix[a]);
            if (!same && (in->same_only[q] || (fl & in->tskip & T_FILTERED))) {
                st->filtered_targets++;
                continue;
            }
            if (kept == cand || sc[a] < in->min_score) {
                next = sc[a];
                low = kept == 0;
                break;
            }
            ist_proposal *p = &row[n++];
            memset(p, 0, sizeof *p);
            p->source_row = qrow[q];
            p->target_row = ix[a];
            p->place = ++kept;
            p->score = sc[a];
            p->source_count = ist_store_count(in->src, qrow[q]);
            p->target_count = ist_store_count(in->tgt, ix[a]);
        }
        if (kept == 0) {
            if (in->same_only[q])
                st->left_numbers++;   /* a code whose own spelling is not a candidate */
            else if (low)
                st->left_low++;
            continue;
        }
        /* margin: own score minus the best score among the word's other candidates
         * (kept ones, or the first one after them for the top candidate alone). */
        float best = row[first].score;
        float second = kept > 1 ? row[first + 1].score : next;
        for (size_t i = first; i < n; i++)
            row[i].margin = i == first ? (second == -INFINITY ? INFINITY : best - second)
                                       : row[i].score - best;
        group *gr = &g[(*ng)++];
        gr->first = first;
        gr->n = kept;
        gr->rank = qrow[q] + 1;
        gr->margin = row[first].margin;
        gr->same = in->same_block && same_word(in->src, qrow[q], in->tgt, row[first].target_row);
        /* informative key: margin over the word's weight, its count (or, for a
         * file without counts, 1 / rank, its share of running text under Zipf's law) */
        uint64_t cnt = row[first].source_count;
        double weight = cnt > 0 ? (double)cnt : 1.0 / (double)gr->rank;
        gr->key = isinf(gr->margin) ? INFINITY : (double)gr->margin / weight;
    }
    return n;
}

/* Mutual flag: the best source row of each candidate target under CSLS (all
 * source rows, same CSLS terms as the forward search) is the row's source. */
static ist_status
mark_mutual(ist_cmatview xs, ist_cmatview zt, size_t nb, const ist_retrieve_opts *ro,
            ist_proposal *row, size_t n, ist_error *err)
{
    size_t *trow = NULL, *slot = NULL, nt = 0;
    ist_matrix *q = NULL;
    ist_topk *tk = NULL;
    ist_status rc = IST_OK;

    if (n == 0)
        return IST_OK;
    slot = ist_malloc(zt.rows * sizeof *slot);
    trow = ist_malloc(n * sizeof *trow);
    if (!slot || !trow) {
        rc = ist_error_nomem(err);
        goto done;
    }
    for (size_t j = 0; j < zt.rows; j++)
        slot[j] = SIZE_MAX;
    for (size_t i = 0; i < n; i++)
        if (slot[row[i].target_row] == SIZE_MAX) {
            slot[row[i].target_row] = nt;
            trow[nt++] = row[i].target_row;
        }
    rc = gather(zt, trow, nt, &q, err);
    if (rc != IST_OK)
        goto done;
    /* Reversed roles: queries are targets, "targets" the source rows; the
     * neighbourhood of the queries is then r_S(y) and that of the source rows
     * r_T(x), so the scores are the same CSLS values. */
    rc = ist_retrieve_rank(ist_matrix_cview(q), zt, xs, IST_RETRIEVAL_CSLS, 1, nb, ro, &tk, err);
    if (rc != IST_OK)
        goto done;
    for (size_t i = 0; i < n; i++) {
        const uint32_t *best = ist_topk_index(tk, slot[row[i].target_row]);
        row[i].mutual = best[0] == row[i].source_row;
    }
done:
    ist_topk_free(tk);
    ist_matrix_free(q);
    ist_free(trow);
    ist_free(slot);
    return rc;
}

/* Put the rows in review order by their groups. */
static ist_status
order_rows(ist_proposals *p, group *g, size_t ng, ist_error *err)
{
    ist_proposal *sorted = ist_malloc((p->n ? p->n : 1) * sizeof *sorted);
    size_t n = 0;
    if (!sorted)
        return ist_error_nomem(err);
    for (size_t i = 0; i < ng; i++) {
        const ist_proposal *first = &p->row[g[i].first];
        g[i].mutual = first->mutual;
    }
    qsort(g, ng, sizeof *g, p->order == IST_PROPOSE_CERTAIN ? cmp_certain : cmp_informative);
    for (size_t i = 0; i < ng; i++) {
        p->stats.same_spelling += g[i].same;
        for (size_t a = 0; a < g[i].n; a++) {
            sorted[n] = p->row[g[i].first + a];
            sorted[n].same_spelling = g[i].same;
            sorted[n++].priority = i + 1;
        }
    }
    ist_free(p->row);
    p->row = sorted;
    return IST_OK;
}

static ist_status
check_args(ist_cmatview xs, ist_cmatview zt, const ist_store *src, const ist_store *tgt,
           const ist_propose_opts *o, ist_error *err)
{
    if (xs.cols != zt.cols)
        return ist_error_set(err, IST_ERR_INVALID,
                             "propose: expected source and target rows of one dimension, "
                             "found %zu and %zu", xs.cols, zt.cols);
    if (xs.rows != ist_store_rows(src) || zt.rows != ist_store_rows(tgt))
        return ist_error_set(err, IST_ERR_INVALID,
                             "propose: expected one matrix row per vector file row");
    if (o->candidates < 1 || o->candidates > IST_PROPOSE_MAX_CANDIDATES)
        return ist_error_set(err, IST_ERR_INVALID,
                             "propose: expected 1 to %u candidates, found %zu",
                             IST_PROPOSE_MAX_CANDIDATES, o->candidates);
    if (ist_search_opts_check(&o->search, "propose", err) != IST_OK)
        return err->code;
    if (zt.rows == 0 || zt.rows > UINT32_MAX)
        return ist_error_set(err, IST_ERR_INVALID, "propose: expected 1 to 2^32-1 target rows, "
                             "found %zu", zt.rows);
    return IST_OK;
}

/* Retrieve, collect, flag and order the candidates of the query rows qrow[]. */
static ist_status
find_candidates(ist_proposals *p, ist_cmatview xs, ist_cmatview zt, const ist_store *src,
                const ist_store *tgt, const ist_propose_opts *o, const size_t *qrow, size_t nq,
                const bool *same_only, const unsigned char *tflag, size_t n_filtered,
                ist_error *err)
{
    size_t depth = o->candidates + 1, cap, ng = 0;
    ist_matrix *q = NULL;
    ist_topk *tk = NULL;
    group *g = NULL;
    ist_status rc;

    size_t passed_over = n_filtered + (o->skip_gold_targets ? p->stats.gold_targets : 0);
    depth += passed_over < SKIP_DEPTH ? passed_over : SKIP_DEPTH;
    if (depth > zt.rows)
        depth = zt.rows;
    if ((rc = gather(xs, qrow, nq, &q, err)) != IST_OK ||
        (rc = ist_retrieve_rank(ist_matrix_cview(q), xs, zt, IST_RETRIEVAL_CSLS, depth,
                                o->search.csls_k, &o->search.retrieve, &tk, err)) != IST_OK)
        goto done;
    if (ist_mul_size(nq, o->candidates, &cap) != 0 ||
        !(p->row = ist_malloc(cap * sizeof *p->row)) || !(g = ist_malloc(nq * sizeof *g))) {
        rc = ist_error_nomem(err);
        goto done;
    }
    collect_in in = {o->candidates, o->filter.min_score, tflag,
                     (unsigned char)((o->skip_gold_targets ? T_GOLD : 0) | T_FILTERED),
                     same_only, o->same_block, src, tgt};
    p->n = collect(tk, qrow, nq, &in, p->row, g, &ng, &p->stats);
    p->stats.proposed = ng;
    if ((rc = mark_mutual(xs, zt, o->search.csls_k, &o->search.retrieve, p->row, p->n, err)) == IST_OK)
        rc = order_rows(p, g, ng, err);
done:
    ist_free(g);
    ist_topk_free(tk);
    ist_matrix_free(q);
    return rc;
}

ist_status
ist_propose_views(ist_cmatview xs, ist_cmatview zt, const ist_store *src, const ist_store *tgt,
                  const ist_pairs *const *lists, size_t nlists, const ist_propose_opts *opts,
                  ist_proposals **out, ist_error *err)
{
    ist_propose_opts o;
    ist_proposals *p = NULL;
    unsigned char *listed = NULL, *gold = NULL, *sflag = NULL;
    size_t *qrow = NULL, nq = 0, tn[3] = {0, 0, 0};
    bool *same_only = NULL;
    ist_status rc;

    *out = NULL;
    if (opts)
        o = *opts;
    else
        ist_propose_opts_init(&o);
    if ((rc = check_args(xs, zt, src, tgt, &o, err)) != IST_OK)
        return rc;
    size_t top = o.top_sources && o.top_sources < xs.rows ? o.top_sources : xs.rows;
    p = ist_calloc(1, sizeof *p);
    listed = ist_calloc(xs.rows ? xs.rows : 1, 1);
    sflag = ist_calloc(xs.rows ? xs.rows : 1, 1);
    gold = ist_calloc(zt.rows, 1);
    qrow = ist_malloc((top ? top : 1) * sizeof *qrow);
    same_only = ist_calloc(top ? top : 1, sizeof *same_only);
    if (!p || !listed || !sflag || !gold || !qrow || !same_only) {
        rc = ist_error_nomem(err);
        goto fail;
    }
    p->order = o.order;
    p->top_sources = top;
    p->candidates = o.candidates;
    p->neighbourhood = o.search.csls_k;
    p->skip_gold_targets = o.skip_gold_targets;
    p->same_block = o.same_block;
    p->filter = o.filter;
    size_t nlisted = 0;
    if ((rc = mark_list_words(src, lists, nlists, false, listed, &nlisted, err)) != IST_OK ||
        (rc = mark_list_words(tgt, lists, nlists, true, gold, &p->stats.gold_targets, err)) !=
            IST_OK ||
        (rc = ist_word_filter_mark(&o.filter, src, sflag, 0, NULL, err)) != IST_OK ||
        (rc = ist_word_filter_mark(&o.filter, tgt, gold, 1, tn, err)) != IST_OK)
        goto fail;
    p->stats.considered = top;
    for (size_t i = 0; i < top; i++) {
        const char *w = ist_store_word(src, i);
        if (listed[i])
            p->stats.listed++;
        else if (sflag[i] & S_STOP)
            p->stats.left_stop++;
        else if (sflag[i] & S_VARIANT)
            p->stats.left_variants++;
        else if ((sflag[i] & S_SHAPE) && ist_word_shape_of(w, strlen(w)) != IST_SHAPE_CODE)
            p->stats.left_numbers++;
        else {
            /* a code is proposed only with its own spelling, in the same-spelling block */
            same_only[nq] = (sflag[i] & S_SHAPE) != 0;
            qrow[nq++] = i;
        }
    }
    if (ist_cancel_requested()) {
        rc = ist_error_set(err, IST_ERR_CANCELLED, "propose: cancelled");
        goto fail;
    }
    if (nq > 0 && (rc = find_candidates(p, xs, zt, src, tgt, &o, qrow, nq, same_only, gold,
                                        tn[0] + tn[1] + tn[2], err)) != IST_OK)
        goto fail;
    p->stats.rows = p->n;
    *out = p;
    rc = IST_OK;
    p = NULL;
fail:
    ist_proposals_free(p);
    ist_free(same_only);
    ist_free(qrow);
    ist_free(gold);
    ist_free(sflag);
    ist_free(listed);
    return rc;
}

ist_status
ist_propose_run(const ist_map *map, const ist_store *src, const ist_store *tgt,
                const ist_pairs *const *lists, size_t nlists, const ist_propose_opts *opts,
                ist_proposals **out, ist_error *err)
{
    const ist_pairs **all = NULL;
    ist_matrix *xs = NULL, *zt = NULL;
    ist_status rc;

    *out = NULL;
    if ((rc = ist_map_check(map, src, tgt, err)) != IST_OK)
        return rc;
    all = ist_malloc((nlists + 1) * sizeof *all);
    if (!all)
        return ist_error_nomem(err);
    for (size_t i = 0; i < nlists; i++)
        all[i] = lists[i];
    all[nlists] = ist_map_seeds(map);
    rc = ist_map_apply(map, src, tgt, &xs, &zt, err);
    if (rc == IST_OK)
        rc = ist_propose_views(ist_matrix_cview(xs), ist_matrix_cview(zt), src, tgt, all,
                               nlists + 1, opts, out, err);
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    ist_free(all);
    return rc;
}

/* ---- the candidate list file ---------------------------------------------- */

static const char *
base_or_dash(const char *path)
{
    return path ? path : "-";
}

static ist_status
write_header(ist_ofile *f, const ist_proposals *p, const ist_store *src, const ist_store *tgt,
             const ist_propose_inputs *in, ist_error *err)
{
    ist_status rc = ist_ofile_printf(
        f, err,
        "# isthmus candidate list: statistical suggestions, to be reviewed by a speaker of the "
        "language before use; write accept, reject or 'use WORD' in the decision column\n"
        "# source=%s fingerprint=%016llx target=%s fingerprint=%016llx map=%s "
        "seeds=%016llx order=%s rank-by=csls csls-k=%zu top-sources=%zu "
        "candidates=%zu skip-gold-targets=%s numbers=%s stop-share=%g min-score=%g "
        "variants=%s same-spelling-block=%s",
        base_or_dash(in ? in->source_path : NULL), (unsigned long long)ist_store_fingerprint(src),
        base_or_dash(in ? in->target_path : NULL), (unsigned long long)ist_store_fingerprint(tgt),
        base_or_dash(in ? in->map_path : NULL),
        (unsigned long long)(in ? in->seed_checksum : 0),
        p->order == IST_PROPOSE_CERTAIN ? "certain" : "informative", p->neighbourhood,
        p->top_sources, p->candidates, p->skip_gold_targets ? "yes" : "no",
        p->filter.numbers ? "kept" : "left-out", p->filter.stop_share,
        (double)p->filter.min_score, p->filter.variants ? "left-out" : "kept",
        p->same_block ? "yes" : "no");
    for (size_t i = 0; rc == IST_OK && in && i < in->nlists; i++)
        rc = ist_ofile_printf(f, err, " exclude=%s checksum=%016llx",
                              base_or_dash(in->list_paths ? in->list_paths[i] : NULL),
                              (unsigned long long)(in->list_checksums ? in->list_checksums[i]
                                                                      : 0));
    if (rc == IST_OK)
        rc = ist_ofile_puts(f,
                            "\ndecision\tsource\tcandidate\tplace\tscore\tmargin\tmutual"
                            "\tsource_count\ttarget_count\tpriority\tblock\n",
                            err);
    return rc;
}

ist_status
ist_proposals_write(const ist_proposals *p, const ist_store *src, const ist_store *tgt,
                    const ist_propose_inputs *in, const char *path, ist_error *err)
{
    ist_ofile *f;
    ist_status rc = ist_ofile_open(path, false, &f, err);
    if (rc != IST_OK)
        return rc;
    rc = write_header(f, p, src, tgt, in, err);
    bool block_started = false;
    for (size_t i = 0; rc == IST_OK && i < p->n; i++) {
        const ist_proposal *r = &p->row[i];
        char margin[32];
        if (r->same_spelling && !block_started) {
            block_started = true;
            rc = ist_ofile_printf(f, err,
                                  "# same spelling on both sides (brands, model codes, sizes): "
                                  "%zu words, most frequent first; check a few, then accept "
                                  "them all with 'isthmus merge-pairs --accept-same-spelling'\n",
                                  p->stats.same_spelling);
            if (rc != IST_OK)
                break;
        }
        if (isinf(r->margin))
            strcpy(margin, "inf");
        else   /* no "-0.0000": a margin that rounds to zero prints as zero */
            snprintf(margin, sizeof margin, "%.4f",
                     fabs((double)r->margin) < 0.00005 ? 0.0 : (double)r->margin);
        rc = ist_ofile_printf(f, err, "\t%s\t%s\t%zu\t%.4f\t%s\t%s\t%llu\t%llu\t%zu\t%s\n",
                              ist_store_word(src, r->source_row),
                              ist_store_word(tgt, r->target_row), r->place,
                              fabs((double)r->score) < 0.00005 ? 0.0 : (double)r->score,
                              margin, r->mutual ? "yes" : "no",
                              (unsigned long long)r->source_count,
                              (unsigned long long)r->target_count, r->priority,
                              r->same_spelling ? "same-spelling" : "review");
    }
    if (rc != IST_OK) {
        ist_ofile_abort(f);
        return rc;
    }
    return ist_ofile_commit(f, err);
}

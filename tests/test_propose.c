/* test_propose.c - candidate pairs for review (CSLS, margins, mutual flags,
 * review order, exclusions, the candidate list file), a proposal reviewed and
 * merged back, and failed allocations in both. The review filters and merging
 * on their own are in test_review.c. */
#include "harness.h"
#include "propose_env.h"
#include "synth.h"

#include <math.h>

#include <isthmus/isthmus.h>
#include <isthmus/testing.h>

/* ---- helpers ------------------------------------------------------------ */

/* Rows with words prefix0, prefix1, ... and the given counts (NULL: descending). */
static ist_store *
make_store(size_t rows, size_t dim, const char *prefix, const float *data,
           const uint64_t *counts)
{
    ist_store *s;
    ist_error err;
    char w[64];
    assert_int_equal(ist_store_new(rows, dim, &s, &err), IST_OK);
    for (size_t i = 0; i < rows; i++) {
        memcpy(ist_store_row_mut(s, i), data + i * dim, dim * sizeof(float));
        snprintf(w, sizeof w, "%s%zu", prefix, i);
        assert_int_equal(ist_store_set_word(s, i, w, counts ? counts[i] : 1000000 - i, &err),
                         IST_OK);
    }
    return s;
}

static ist_pairs *
word_pairs(const char *sp, const char *tp, size_t from, size_t to)
{
    ist_pairs *p;
    ist_error err;
    char a[32], b[32];
    assert_int_equal(ist_pairs_new(&p, &err), IST_OK);
    for (size_t i = from; i < to; i++) {
        snprintf(a, sizeof a, "%s%zu", sp, i);
        snprintf(b, sizeof b, "%s%zu", tp, i);
        assert_int_equal(ist_pairs_add(p, a, b, &err), IST_OK);
    }
    return p;
}

/* ---- synthetic rotation: the top candidate is the true translation ------- */

/* Closed-form fact: when the source space is the target space under a known
 * rotation (plus small noise), a map fitted on some pairs translates every
 * other word to its counterpart. Word i of one side is word i of the other. */
static void
test_rotated_space(void **state)
{
    (void)state;
    const size_t n = 300, d = 24;
    float *t = malloc(n * d * sizeof *t), *x = malloc(n * d * sizeof *x);
    double *rot = malloc(d * d * sizeof *rot);
    uint64_t s = 42;
    ist_error err;

    random_rotation(rot, d, &s);
    for (size_t i = 0; i < n * d; i++)
        t[i] = (float)gauss(&s);
    for (size_t i = 0; i < n; i++)
        for (size_t a = 0; a < d; a++) {
            double v = 0;
            for (size_t b = 0; b < d; b++)
                v += t[i * d + b] * rot[a * d + b];
            x[i * d + a] = (float)(v + 0.01 * gauss(&s));
        }
    ist_store *src = make_store(n, d, "w", x, NULL), *tgt = make_store(n, d, "w", t, NULL);
    ist_pairs *seeds = word_pairs("w", "w", 0, 100), *held = word_pairs("w", "w", 100, 150);
    ist_align_opts ao;
    ist_map *map;
    ist_align_opts_init(&ao);
    ao.refine_rounds = 0;
    assert_int_equal(ist_pairs_resolve(seeds, src, tgt, NULL, &err), IST_OK);
    assert_int_equal(ist_align_fit(src, tgt, seeds, &ao, &map, &err), IST_OK);

    ist_propose_opts po;
    ist_proposals *p;
    ist_propose_opts_init(&po);
    no_filters(&po);
    po.top_sources = 250;
    const ist_pairs *lists[] = {held};
    /* the map's seeds (w0..w99) are excluded by ist_propose_run itself */
    assert_int_equal(ist_propose_run(map, src, tgt, lists, 1, &po, &p, &err), IST_OK);
    ist_propose_stats st = ist_proposals_stats(p);
    assert_int_equal(st.considered, 250);
    assert_int_equal(st.listed, 150);
    assert_int_equal(st.proposed, 100);
    assert_int_equal(st.rows, 300);
    assert_int_equal(ist_proposals_count(p), 300);
    size_t tops = 0, right = 0, mutual = 0;
    for (size_t i = 0; i < ist_proposals_count(p); i++) {
        const ist_proposal *r = ist_proposals_get(p, i);
        assert_true(r->source_row >= 150 && r->source_row < 250);   /* excluded never proposed */
        assert_int_equal(r->place, i % 3 + 1);                     /* a word's rows together */
        assert_int_equal(r->priority, i / 3 + 1);
        assert_int_equal(r->source_count, 1000000 - r->source_row);
        assert_int_equal(r->target_count, 1000000 - r->target_row);
        if (r->place == 1) {
            tops++;
            right += r->target_row == r->source_row;
            mutual += r->mutual;
            assert_true(r->margin > 0);
        } else {
            assert_true(r->margin <= 0);
            assert_true(r->target_row != r->source_row);
        }
    }
    assert_int_equal(tops, 100);
    assert_int_equal(right, 100);
    assert_int_equal(mutual, 100);
    ist_proposals_free(p);

    /* without the held-out list, its words are proposed too */
    assert_int_equal(ist_propose_run(map, src, tgt, NULL, 0, &po, &p, &err), IST_OK);
    assert_int_equal(ist_proposals_stats(p).proposed, 150);
    ist_proposals_free(p);

    /* vectors other than the map's are refused */
    assert_int_equal(ist_propose_run(map, tgt, src, NULL, 0, &po, &p, &err), IST_ERR_INVALID);
    assert_null(p);

    ist_map_free(map);
    ist_pairs_free(seeds);
    ist_pairs_free(held);
    ist_store_free(src);
    ist_store_free(tgt);
    free(rot);
    free(t);
    free(x);
}

/* ---- a tiny hand-built plane: scores, margins, mutual flags, order ------- */

#define NS 5
#define NT 6
#define NB 2

static const double src_deg[NS] = {0, 40, 95, 150, 220};
static const double tgt_deg[NT] = {5, 30, 60, 100, 170, 260};
static const uint64_t src_count[NS] = {50, 400, 30, 2000, 10};

typedef struct plane {
    ist_store *src, *tgt;
    double csls[NS][NT];
} plane;

static void
unit_rows(const double *deg, size_t n, float *out)
{
    for (size_t i = 0; i < n; i++) {
        out[2 * i] = (float)cos(deg[i] * 3.141592653589793 / 180.0);
        out[2 * i + 1] = (float)sin(deg[i] * 3.141592653589793 / 180.0);
    }
}

/* The mean of the nb largest of v[0..n). */
static double
top_mean(const double *v, size_t n, size_t nb)
{
    double tmp[8], sum = 0;
    memcpy(tmp, v, n * sizeof *v);
    for (size_t k = 0; k < nb; k++) {
        size_t best = k;
        for (size_t i = k + 1; i < n; i++)
            if (tmp[i] > tmp[best])
                best = i;
        double sw = tmp[k];
        tmp[k] = tmp[best];
        tmp[best] = sw;
        sum += tmp[k];
    }
    return sum / (double)nb;
}

/* Reference CSLS by its definition, CSLS(x,y) = 2cos(x,y) - r_T(x) - r_S(y)
 * (Conneau et al. 2018, "Word translation without parallel data"), computed
 * here in double precision by brute force. */
static void
make_plane(plane *pl)
{
    float xs[2 * NS], zt[2 * NT];
    double cs[NS][NT], rt[NS], rs[NT], col[NS];
    unit_rows(src_deg, NS, xs);
    unit_rows(tgt_deg, NT, zt);
    pl->src = make_store(NS, 2, "s", xs, src_count);
    pl->tgt = make_store(NT, 2, "t", zt, NULL);
    for (size_t i = 0; i < NS; i++)
        for (size_t j = 0; j < NT; j++)
            cs[i][j] = (double)xs[2 * i] * zt[2 * j] + (double)xs[2 * i + 1] * zt[2 * j + 1];
    for (size_t i = 0; i < NS; i++)
        rt[i] = top_mean(cs[i], NT, NB);
    for (size_t j = 0; j < NT; j++) {
        for (size_t i = 0; i < NS; i++)
            col[i] = cs[i][j];
        rs[j] = top_mean(col, NS, NB);
    }
    for (size_t i = 0; i < NS; i++)
        for (size_t j = 0; j < NT; j++)
            pl->csls[i][j] = 2 * cs[i][j] - rt[i] - rs[j];
}

static void
free_plane(plane *pl)
{
    ist_store_free(pl->src);
    ist_store_free(pl->tgt);
}

static ist_status
propose_plane(const plane *pl, const ist_pairs *const *lists, size_t nl, ist_propose_order ord,
              bool skip, size_t cand, ist_proposals **p)
{
    ist_propose_opts po;
    ist_error err;
    ist_propose_opts_init(&po);
    no_filters(&po);
    po.search.csls_k = NB;
    po.candidates = cand;
    po.order = ord;
    po.skip_gold_targets = skip;
    return ist_propose_views(ist_store_view(pl->src), ist_store_view(pl->tgt), pl->src, pl->tgt,
                             lists, nl, &po, p, &err);
}

/* Reference ranking of the targets of source i by CSLS (ties to the lower row). */
static void
ref_ranking(const plane *pl, size_t i, size_t *order)
{
    for (size_t j = 0; j < NT; j++)
        order[j] = j;
    for (size_t a = 0; a < NT; a++)
        for (size_t b = a + 1; b < NT; b++)
            if (pl->csls[i][order[b]] > pl->csls[i][order[a]]) {
                size_t t = order[a];
                order[a] = order[b];
                order[b] = t;
            }
}

static bool
ref_mutual(const plane *pl, size_t i, size_t j)
{
    for (size_t k = 0; k < NS; k++)
        if (k != i && pl->csls[k][j] > pl->csls[i][j])
            return false;
    return true;
}

static void
test_plane_scores(void **state)
{
    (void)state;
    plane pl;
    ist_proposals *p;
    make_plane(&pl);
    assert_int_equal(propose_plane(&pl, NULL, 0, IST_PROPOSE_INFORMATIVE, false, 3, &p), IST_OK);
    assert_int_equal(ist_proposals_count(p), NS * 3);
    size_t seen = 0;
    for (size_t n = 0; n < ist_proposals_count(p); n++) {
        const ist_proposal *r = ist_proposals_get(p, n);
        size_t i = r->source_row, order[NT];
        ref_ranking(&pl, i, order);
        seen |= (size_t)1 << i;
        assert_int_equal(r->target_row, order[r->place - 1]);
        assert_float_equal(r->score, pl.csls[i][r->target_row], 1e-5);
        double want = r->place == 1 ? pl.csls[i][order[0]] - pl.csls[i][order[1]]
                                    : pl.csls[i][r->target_row] - pl.csls[i][order[0]];
        assert_float_equal(r->margin, want, 1e-5);
        assert_int_equal(r->mutual, ref_mutual(&pl, i, r->target_row));
        assert_int_equal(r->source_count, src_count[i]);
    }
    assert_int_equal(seen, (1u << NS) - 1);
    /* By hand: s0 (0 deg) is nearest t0 (5 deg) and s3 (150 deg) nearest t4
     * (170 deg); both pairs are each other's best; t1 (30 deg) is nearest s1
     * (40 deg), so s0 -> t1 is not mutual. */
    for (size_t n = 0; n < ist_proposals_count(p); n++) {
        const ist_proposal *r = ist_proposals_get(p, n);
        if (r->source_row == 0 && r->place == 1) {
            assert_int_equal(r->target_row, 0);
            assert_true(r->mutual);
        }
        if (r->source_row == 3 && r->place == 1) {
            assert_int_equal(r->target_row, 4);
            assert_true(r->mutual);
        }
        if (r->source_row == 0 && r->target_row == 1)
            assert_false(r->mutual);
    }
    ist_proposals_free(p);
    free_plane(&pl);
}

/* Source order of the first rows of each word. */
static size_t
word_order(const ist_proposals *p, size_t *src, float *margin, bool *mutual)
{
    size_t n = 0;
    for (size_t k = 0; k < ist_proposals_count(p); k++) {
        const ist_proposal *r = ist_proposals_get(p, k);
        if (r->place != 1)
            continue;
        assert_int_equal(r->priority, n + 1);
        src[n] = r->source_row;
        margin[n] = r->margin;
        mutual[n++] = r->mutual;
    }
    return n;
}

static void
test_plane_order(void **state)
{
    (void)state;
    plane pl;
    ist_proposals *p;
    size_t src[NS], n;
    float margin[NS];
    bool mutual[NS];
    make_plane(&pl);

    /* informative: ascending margin / count (docs/methods.md) */
    assert_int_equal(propose_plane(&pl, NULL, 0, IST_PROPOSE_INFORMATIVE, false, 2, &p), IST_OK);
    n = word_order(p, src, margin, mutual);
    assert_int_equal(n, NS);
    for (size_t i = 1; i < n; i++)
        assert_true(margin[i - 1] / (double)src_count[src[i - 1]] <=
                    margin[i] / (double)src_count[src[i]]);
    /* By the reference values: margins s0 .278, s1 .044, s2 .414, s3 .622, s4 .742.
     * s1 (least certain) comes first; s3, the most frequent word, comes second
     * although its margin is the second widest, before s0 and s2. */
    assert_int_equal(src[0], 1);
    assert_int_equal(src[1], 3);
    assert_int_equal(src[2], 0);
    assert_int_equal(src[4], 4);
    ist_proposals_free(p);

    /* certain: mutual first, then descending margin */
    assert_int_equal(propose_plane(&pl, NULL, 0, IST_PROPOSE_CERTAIN, false, 2, &p), IST_OK);
    n = word_order(p, src, margin, mutual);
    assert_int_equal(n, NS);
    for (size_t i = 1; i < n; i++) {
        assert_true(mutual[i - 1] >= mutual[i]);
        if (mutual[i - 1] == mutual[i])
            assert_true(margin[i - 1] >= margin[i]);
    }
    assert_true(mutual[0]);
    ist_proposals_free(p);
    free_plane(&pl);
}

static void
test_plane_exclusions(void **state)
{
    (void)state;
    plane pl;
    ist_proposals *p;
    ist_pairs *list;
    ist_error err;
    make_plane(&pl);
    /* s3 is listed (with gold target t0); t0 is s0's best candidate */
    assert_int_equal(ist_pairs_new(&list, &err), IST_OK);
    assert_int_equal(ist_pairs_add(list, "s3", "t0", &err), IST_OK);
    const ist_pairs *lists[] = {list};

    assert_int_equal(propose_plane(&pl, lists, 1, IST_PROPOSE_INFORMATIVE, false, 2, &p), IST_OK);
    ist_propose_stats st = ist_proposals_stats(p);
    assert_int_equal(st.listed, 1);
    assert_int_equal(st.proposed, NS - 1);
    assert_int_equal(st.gold_targets, 1);
    bool t0_seen = false;
    for (size_t k = 0; k < ist_proposals_count(p); k++) {
        const ist_proposal *r = ist_proposals_get(p, k);
        assert_int_not_equal(r->source_row, 3);
        t0_seen |= r->target_row == 0;
    }
    assert_true(t0_seen);
    ist_proposals_free(p);

    assert_int_equal(propose_plane(&pl, lists, 1, IST_PROPOSE_INFORMATIVE, true, 2, &p), IST_OK);
    st = ist_proposals_stats(p);
    assert_true(st.skipped_targets >= 1);
    for (size_t k = 0; k < ist_proposals_count(p); k++) {
        const ist_proposal *r = ist_proposals_get(p, k);
        assert_int_not_equal(r->source_row, 3);
        assert_int_not_equal(r->target_row, 0);
        if (r->source_row == 0 && r->place == 1) {
            /* s0's best kept candidate is its second overall; margin to its third */
            size_t order[NT];
            ref_ranking(&pl, 0, order);
            assert_int_equal(order[0], 0);
            assert_int_equal(r->target_row, order[1]);
            assert_float_equal(r->margin, pl.csls[0][order[1]] - pl.csls[0][order[2]], 1e-5);
        }
    }
    ist_proposals_free(p);

    /* the N most frequent rows only: rows 0 and 1 */
    ist_propose_opts po;
    ist_propose_opts_init(&po);
    no_filters(&po);
    po.top_sources = 2;
    po.search.csls_k = NB;
    assert_int_equal(ist_propose_views(ist_store_view(pl.src), ist_store_view(pl.tgt), pl.src,
                                       pl.tgt, NULL, 0, &po, &p, &err), IST_OK);
    assert_int_equal(ist_proposals_stats(p).proposed, 2);
    for (size_t k = 0; k < ist_proposals_count(p); k++)
        assert_true(ist_proposals_get(p, k)->source_row < 2);
    ist_proposals_free(p);

    /* bad options are refused */
    assert_int_equal(propose_plane(&pl, NULL, 0, IST_PROPOSE_INFORMATIVE, false, 0, &p),
                     IST_ERR_INVALID);
    assert_null(p);
    ist_pairs_free(list);
    free_plane(&pl);
}

/* ---- the candidate list file ------------------------------------------- */

static void
test_write_candidates(void **state)
{
    (void)state;
    plane pl;
    ist_proposals *p;
    ist_error err;
    char *dir = harness_tmpdir(), *path = harness_path(dir, "c.tsv");
    make_plane(&pl);
    assert_int_equal(propose_plane(&pl, NULL, 0, IST_PROPOSE_CERTAIN, false, 2, &p), IST_OK);
    const char *lp[] = {"seed.pairs"};
    uint64_t ls[] = {0x1234};
    ist_propose_inputs in = {"en.isv", "es.isv", "m.map", 7, lp, ls, 1};
    assert_int_equal(ist_proposals_write(p, pl.src, pl.tgt, &in, path, &err), IST_OK);
    char *text = slurp(path), *save = NULL;
    size_t lines = 0;
    char fp[32];
    snprintf(fp, sizeof fp, "fingerprint=%016llx",
             (unsigned long long)ist_store_fingerprint(pl.src));
    for (char *l = strtok_r(text, "\n", &save); l; l = strtok_r(NULL, "\n", &save), lines++) {
        if (lines == 0) {
            assert_true(l[0] == '#');
            assert_non_null(strstr(l, "reviewed by a speaker of the language"));
        } else if (lines == 1) {
            assert_non_null(strstr(l, "source=en.isv"));
            assert_non_null(strstr(l, fp));
            assert_non_null(strstr(l, "exclude=seed.pairs checksum=0000000000001234"));
            assert_non_null(strstr(l, "order=certain"));
        } else if (lines == 2) {
            assert_string_equal(l, "decision\tsource\tcandidate\tplace\tscore\tmargin\tmutual"
                                   "\tsource_count\ttarget_count\tpriority\tblock");
        } else {
            const ist_proposal *r = ist_proposals_get(p, lines - 3);
            char want[128];
            snprintf(want, sizeof want, "\ts%zu\tt%zu\t%zu\t", r->source_row, r->target_row,
                     r->place);
            assert_memory_equal(l, want, strlen(want));
            size_t tabs = 0;
            for (const char *c = l; *c; c++)
                tabs += *c == '\t';
            assert_int_equal(tabs, 10);
            assert_non_null(strstr(l, "\treview"));
        }
    }
    assert_int_equal(lines, 3 + ist_proposals_count(p));
    free(text);
    ist_proposals_free(p);
    free_plane(&pl);
    free(path);
    harness_rmdir(dir);
}

/* Propose, review by program, merge: the accepted rows come back as pairs. */
static void
test_round_trip(void **state)
{
    (void)state;
    plane pl;
    ist_proposals *p;
    ist_merge_summary sum;
    ist_error err;
    merge_env e;
    make_plane(&pl);
    env_open(&e, "s3\tt4\n");
    char *cand = harness_path(e.dir, "c.tsv");
    ist_pairs *seed;
    assert_int_equal(ist_pairs_read(e.seed, &seed, &err), IST_OK);
    const ist_pairs *lists[] = {seed};
    assert_int_equal(propose_plane(&pl, lists, 1, IST_PROPOSE_INFORMATIVE, false, 2, &p), IST_OK);
    assert_int_equal(ist_proposals_write(p, pl.src, pl.tgt, NULL, cand, &err), IST_OK);
    /* accept every first candidate, reject every second */
    char *text = slurp(cand), *save = NULL;
    FILE *f = fopen(cand, "w");
    size_t firsts = 0;
    for (char *l = strtok_r(text, "\n", &save); l; l = strtok_r(NULL, "\n", &save)) {
        if (l[0] == '\t') {
            /* the place is the fourth field: decision, source, candidate, place */
            const char *place = l;
            for (int k = 0; k < 3; k++)
                place = strchr(place, '\t') + 1;
            bool first = strncmp(place, "1\t", 2) == 0;
            firsts += first;
            fprintf(f, "%s%s\n", first ? "accept" : "reject", l);
        } else {
            fprintf(f, "%s\n", l);
        }
    }
    fclose(f);
    free(text);
    assert_int_equal(ist_propose_merge(e.seed, (const char *const *)&cand, 1, NULL, e.out, &sum,
                                       &err), IST_OK);
    assert_int_equal(firsts, NS - 1);
    assert_int_equal(sum.accepted, NS - 1);
    assert_int_equal(sum.rejected, NS - 1);
    assert_int_equal(sum.added, NS - 1);
    ist_pairs *out;
    assert_int_equal(ist_pairs_read(e.out, &out, &err), IST_OK);
    assert_int_equal(ist_pairs_count(out), NS);
    assert_string_equal(ist_pairs_source(out, 0), "s3");
    ist_pairs_free(out);
    ist_pairs_free(seed);
    ist_proposals_free(p);
    free_plane(&pl);
    free(cand);
    env_close(&e);
}

/* ---- every allocation can fail (a -Dfault_injection=true build) ---------- */

static plane fault_plane;
static merge_env fault_env;
static char *fault_review;

static ist_status
op_propose(void)
{
    ist_propose_opts po;
    ist_proposals *p;
    ist_pairs *list;
    ist_status rc = ist_pairs_new(&list, NULL);
    if (rc != IST_OK)
        return rc;
    if ((rc = ist_pairs_add(list, "s3", "t0", NULL)) != IST_OK) {
        ist_pairs_free(list);
        return rc;
    }
    const ist_pairs *lists[] = {list};
    ist_propose_opts_init(&po);
    no_filters(&po);
    po.search.csls_k = NB;
    po.skip_gold_targets = true;
    po.search.retrieve.threads = 1;
    rc = ist_propose_views(ist_store_view(fault_plane.src), ist_store_view(fault_plane.tgt),
                           fault_plane.src, fault_plane.tgt, lists, 1, &po, &p, NULL);
    if (rc == IST_OK)
        rc = ist_proposals_write(p, fault_plane.src, fault_plane.tgt, NULL, fault_env.out, NULL);
    ist_proposals_free(p);
    ist_pairs_free(list);
    return rc;
}

static ist_status
op_merge(void)
{
    return ist_propose_merge(fault_env.seed, (const char *const *)&fault_review, 1, NULL,
                             fault_env.out, NULL, NULL);
}

static void
every_failure_point(ist_status (*op)(void), const char *name)
{
    int k;
    for (k = 0; k < 100000; k++) {
        ist_testing_fail_alloc_after(k);
        ist_status rc = op();
        ist_testing_fail_alloc_after(-1);
        if (rc == IST_OK)
            break;
        if (rc != IST_ERR_NOMEM)
            fail_msg("%s: allocation %d failing gave status %d, expected out of memory", name, k,
                     (int)rc);
        if (exists(fault_env.out))
            fail_msg("%s: output left behind after allocation %d failed", name, k);
    }
    assert_true(k > 0 && k < 100000);
    unlink(fault_env.out);
}

static void
test_failed_allocations(void **state)
{
    (void)state;
    make_plane(&fault_plane);
    env_open(&fault_env, "kettle\thervidor\nblue azul\n");
    fault_review = env_file(&fault_env, "r.tsv", HDR "accept\tlamp\tlámpara\t1\n"
                                                     "reject\tlamp\tluz\t2\n"
                                                     "use taza\tmug\tvaso\t1\n"
                                                     "accept\tkettle\thervidor\t1\n");
    every_failure_point(op_propose, "propose");
    every_failure_point(op_merge, "merge");
    free(fault_review);
    env_close(&fault_env);
    free_plane(&fault_plane);
}

int
main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_rotated_space),
        cmocka_unit_test(test_plane_scores),
        cmocka_unit_test(test_plane_order),
        cmocka_unit_test(test_plane_exclusions),
        cmocka_unit_test(test_write_candidates),
        cmocka_unit_test(test_round_trip),
    };
    if (ist_testing_fault_injection_enabled()) {
        const struct CMUnitTest all[] = {
            cmocka_unit_test(test_rotated_space),
            cmocka_unit_test(test_plane_scores),
            cmocka_unit_test(test_plane_order),
            cmocka_unit_test(test_plane_exclusions),
            cmocka_unit_test(test_write_candidates),
            cmocka_unit_test(test_round_trip),
            cmocka_unit_test(test_failed_allocations),
        };
        HARNESS_RUN("propose", all);
    }
    printf("# the failed-allocation test needs a -Dfault_injection=true build\n");
    HARNESS_RUN("propose", tests);
}

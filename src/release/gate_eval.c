/* gate_eval.c - checking rules against a result JSON and a baseline. The change of
 * precision between two results is judged by a paired bootstrap over the test words
 * (Koehn 2004, "Statistical significance tests for machine translation evaluation"). */
#include <isthmus/gate.h>
#include <isthmus/filekind.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "gate_int.h"

void
ist_gate_opts_init(ist_gate_opts *o)
{
    ist_ci_opts_init(&o->ci);
}

void
ist_gate_result_free(ist_gate_result *r)
{
    if (!r)
        return;
    ist_jv_free(r->root);
    ist_free(r->name);
    ist_free(r);
}

static ist_status
adopt(ist_jv *root, const char *name, ist_gate_result **out, ist_error *err)
{
    const char *fmt = ist_jv_str(ist_jv_get(root, "format"), NULL);
    ist_gate_result *r;

    if (!fmt || strcmp(fmt, "isthmus result") != 0 ||
        ist_jv_type(ist_jv_get(root, "runs")) != IST_JARR) {
        ist_status rc = ist_error_at(err, IST_ERR_FORMAT, name, 0,
                                     "expected an isthmus result JSON (format \"isthmus "
                                     "result\" with \"runs\"), found %s",
                                     fmt ? fmt : "another document");
        ist_jv_free(root);
        return rc;
    }
    if (!(r = ist_calloc(1, sizeof *r)) || !(r->name = ist_strdup(name))) {
        ist_free(r);
        ist_jv_free(root);
        return ist_error_nomem(err);
    }
    r->root = root;
    *out = r;
    return IST_OK;
}

ist_status
ist_gate_result_load(const char *path, ist_gate_result **out, ist_error *err)
{
    ist_jv *root;
    ist_status rc;

    *out = NULL;
    if ((rc = ist_file_expect(path, IST_FILE_BIT(IST_FILE_RESULT) | IST_FILE_BIT(IST_FILE_JSON) |
                                        IST_FILE_BIT(IST_FILE_VERDICT) | IST_FILE_ANY_TEXT,
                              1, "a result file", err)) != IST_OK ||
        (rc = ist_json_parse_file(path, &root, err)) != IST_OK)
        return rc;
    return adopt(root, path, out, err);
}

ist_status
ist_gate_result_parse(const char *text, size_t len, const char *name, ist_gate_result **out,
                      ist_error *err)
{
    ist_jv *root;
    ist_status rc;

    *out = NULL;
    if (!name)
        name = "(result)";
    if ((rc = ist_json_parse(text, len, name, &root, err)) != IST_OK)
        return rc;
    return adopt(root, name, out, err);
}

/* The last run matching the rule's retrieval and label. */
static const ist_jv *
find_run(const ist_gate_result *res, const ist_gate_rule *r, char *desc, size_t cap,
         ist_error *err)
{
    const ist_jv *runs = ist_jv_get(res->root, "runs"), *found = NULL;
    for (size_t i = 0; i < ist_jv_len(runs); i++) {
        const ist_jv *run = ist_jv_at(runs, i);
        const char *ret = ist_jv_str(ist_jv_get(run, "retrieval"), "");
        const char *label = ist_jv_str(ist_jv_get(run, "label"), "");
        if (r->retrieval >= 0 && strcmp(ret, ist_retrieval_name((ist_retrieval)r->retrieval)))
            continue;
        if (r->label && strcmp(label, r->label) != 0)
            continue;
        found = run;
        snprintf(desc, cap, "%s %s", label, ret);
    }
    if (!found)
        ist_error_set(err, IST_ERR_INVALID, "%s: no run for rule '%s'%s%s%s%s", res->name,
                      r->text, r->label ? ": no map labelled " : "", r->label ? r->label : "",
                      r->retrieval >= 0 ? " scored with " : "",
                      r->retrieval >= 0 ? ist_retrieval_name((ist_retrieval)r->retrieval) : "");
    return found;
}

static const ist_jv *
find_band(const ist_gate_result *res, const ist_jv *run, const ist_gate_rule *r, size_t *index,
          ist_error *err)
{
    const ist_jv *bands = ist_jv_get(run, "bands");
    for (size_t i = 0; i < ist_jv_len(bands); i++) {
        const ist_jv *b = ist_jv_at(bands, i), *to = ist_jv_get(b, "rank_to");
        double from = ist_jv_num(ist_jv_get(b, "rank_from"), -1);
        bool open = !to || ist_jv_type(to) == IST_JNULL;
        if (from == (double)r->band_from &&
            (r->band_to == 0 ? open : !open && ist_jv_num(to, -1) == (double)r->band_to)) {
            *index = i;
            return b;
        }
    }
    char want[64];
    if (r->band_to)
        snprintf(want, sizeof want, "%zu-%zu", r->band_from, r->band_to);
    else
        snprintf(want, sizeof want, "%zu+", r->band_from);
    ist_error_set(err, IST_ERR_INVALID, "%s: rule '%s' (line %zu): the result has no band %s",
                  res->name, r->text, r->line, want);
    return NULL;
}

/* An interval [lo, hi] stored as a two-number array. */
static bool
read_interval(const ist_jv *arr, double *lo, double *hi)
{
    if (ist_jv_type(arr) != IST_JARR || ist_jv_len(arr) != 2 ||
        ist_jv_type(ist_jv_at(arr, 0)) != IST_JNUM || ist_jv_type(ist_jv_at(arr, 1)) != IST_JNUM)
        return false;
    *lo = ist_jv_num(ist_jv_at(arr, 0), 0);
    *hi = ist_jv_num(ist_jv_at(arr, 1), 0);
    return true;
}

/* The outcome places of a run's per_query entries (band: SIZE_MAX for all). *n 0 and
 * IST_OK when the run has none. */
static ist_status
read_places(const ist_gate_result *res, const ist_jv *run, size_t band, uint8_t **out,
            size_t *n, ist_error *err)
{
    const ist_jv *pq = ist_jv_get(run, "per_query");
    size_t len = ist_jv_len(pq), m = 0;

    *out = NULL;
    *n = 0;
    if (ist_jv_type(pq) != IST_JARR || len == 0)
        return IST_OK;
    if (!(*out = ist_malloc(len)))
        return ist_error_nomem(err);
    for (size_t i = 0; i < len; i++) {
        const ist_jv *q = ist_jv_at(pq, i);
        double rank = ist_jv_num(ist_jv_get(q, "rank"), -1);
        if (!(rank >= 0 && rank <= IST_CI_MISS) || rank != (double)(size_t)rank) {
            ist_free(*out);
            *out = NULL;
            return ist_error_at(err, IST_ERR_FORMAT, res->name, ist_jv_line(q),
                                "per_query: expected a rank from 0 to 10");
        }
        if (band != SIZE_MAX && ist_jv_num(ist_jv_get(q, "band"), -1) != (double)band)
            continue;
        (*out)[m++] = rank == 0 ? IST_CI_MISS : (uint8_t)(rank - 1);
    }
    *n = m;
    return IST_OK;
}

static ist_status
check_precision(const ist_gate_result *res, const ist_gate_rule *r, const ist_gate_opts *o,
                ist_gate_check *c, ist_error *err)
{
    const ist_jv *run = find_run(res, r, c->run, sizeof c->run, err), *obj;
    size_t band = SIZE_MAX;
    char key[16];

    if (!run)
        return IST_ERR_INVALID;
    obj = run;
    if (r->has_band && !(obj = find_band(res, run, r, &band, err)))
        return IST_ERR_INVALID;
    snprintf(key, sizeof key, "p@%zu", r->k);
    const ist_jv *v = ist_jv_get(ist_jv_get(obj, "precision"), key);
    if (ist_jv_type(v) != IST_JNUM)
        return ist_error_at(err, IST_ERR_FORMAT, res->name, ist_jv_line(obj),
                            "expected precision.%s in run %s", key, c->run);
    c->figure = ist_jv_num(v, 0);
    c->has_interval = read_interval(ist_jv_get(ist_jv_get(obj, "ci"), key), &c->lo, &c->hi);
    if (!c->has_interval) {
        uint8_t *places;
        size_t n;
        double lo[IST_METRICS_NK], hi[IST_METRICS_NK];
        ist_status rc = read_places(res, run, band, &places, &n, err);
        if (rc == IST_OK && n > 0 &&
            (rc = ist_ci_precision(places, n, &o->ci, lo, hi, err)) == IST_OK) {
            for (size_t j = 0; j < IST_METRICS_NK; j++)
                if (ist_metrics_k(j) == r->k) {
                    c->lo = lo[j];
                    c->hi = hi[j];
                    c->has_interval = true;
                }
        }
        ist_free(places);
        if (rc != IST_OK)
            return rc;
    }
    bool ok = r->bound_kind == IST_GATE_MIN ? c->figure >= r->bound : c->figure <= r->bound;
    c->outcome = ok ? IST_GATE_PASS : IST_GATE_FAIL;
    return IST_OK;
}

static ist_status
check_coverage(const ist_gate_result *res, const ist_gate_rule *r, ist_gate_check *c,
               ist_error *err)
{
    const ist_jv *run = find_run(res, r, c->run, sizeof c->run, err);
    if (!run)
        return IST_ERR_INVALID;
    const ist_jv *v = ist_jv_get(run, "coverage");
    if (ist_jv_type(v) != IST_JNUM)
        return ist_error_at(err, IST_ERR_FORMAT, res->name, ist_jv_line(run),
                            "expected a coverage figure in run %s", c->run);
    c->figure = ist_jv_num(v, 0);
    bool ok = r->bound_kind == IST_GATE_MIN ? c->figure >= r->bound : c->figure <= r->bound;
    c->outcome = ok ? IST_GATE_PASS : IST_GATE_FAIL;
    return IST_OK;
}

typedef struct side_entry {
    const char *word;
    uint8_t place;
    uint8_t side;                /* 0 new, 1 baseline */
} side_entry;

static int
cmp_entry(const void *a, const void *b)
{
    const side_entry *x = a, *y = b;
    int c = strcmp(x->word, y->word);
    return c ? c : (int)x->side - (int)y->side;
}

/* Append run's per_query entries as side s; refuses a run without them. */
static ist_status
collect(const ist_gate_result *res, const ist_jv *run, const char *desc, uint8_t s,
        side_entry *e, size_t *n, ist_error *err)
{
    const ist_jv *pq = ist_jv_get(run, "per_query");
    if (ist_jv_type(pq) != IST_JARR || ist_jv_len(pq) == 0)
        return ist_error_set(err, IST_ERR_INVALID,
                             "%s: run %s has no per_query outcomes, so it cannot be compared "
                             "query by query; score it again with this version", res->name, desc);
    for (size_t i = 0; i < ist_jv_len(pq); i++) {
        const ist_jv *q = ist_jv_at(pq, i);
        const char *w = ist_jv_str(ist_jv_get(q, "source"), NULL);
        double rank = ist_jv_num(ist_jv_get(q, "rank"), -1);
        if (!w)
            return ist_error_at(err, IST_ERR_FORMAT, res->name, ist_jv_line(q),
                                "per_query: expected the source word of each query");
        if (!(rank >= 0 && rank <= IST_CI_MISS) || rank != (double)(size_t)rank)
            return ist_error_at(err, IST_ERR_FORMAT, res->name, ist_jv_line(q),
                                "per_query: expected a rank from 0 to 10");
        e[(*n)++] = (side_entry){w, rank == 0 ? IST_CI_MISS : (uint8_t)(rank - 1), s};
    }
    return IST_OK;
}

/* Pair the two runs' queries by source word (a word covered by one run only counts as
 * uncovered in the other) and run the paired bootstrap. */
static ist_status
paired(const ist_gate_result *res, const ist_jv *a, const char *adesc,
       const ist_gate_result *base, const ist_jv *b, const char *bdesc, const ist_gate_rule *r,
       const ist_gate_opts *o, ist_gate_check *c, ist_error *err)
{
    size_t total = ist_jv_len(ist_jv_get(a, "per_query")) + ist_jv_len(ist_jv_get(b, "per_query"));
    side_entry *e = ist_malloc((total + 1) * sizeof *e);
    uint8_t *pa = ist_malloc(total + 1), *pb = ist_malloc(total + 1);
    size_t n = 0, m = 0;
    ist_status rc;

    if (!e || !pa || !pb) {
        rc = ist_error_nomem(err);
        goto done;
    }
    if ((rc = collect(res, a, adesc, 0, e, &n, err)) != IST_OK ||
        (rc = collect(base, b, bdesc, 1, e, &n, err)) != IST_OK)
        goto done;
    qsort(e, n, sizeof *e, cmp_entry);
    for (size_t i = 0; i < n;) {
        size_t j = i;
        pa[m] = pb[m] = IST_CI_UNCOVERED;
        for (; j < n && strcmp(e[j].word, e[i].word) == 0; j++) {
            uint8_t *dst = e[j].side ? &pb[m] : &pa[m];
            if (*dst == IST_CI_UNCOVERED)
                *dst = e[j].place;
        }
        m++;
        i = j;
    }
    rc = ist_ci_paired(pa, pb, m, r->k, &o->ci, &c->figure, &c->lo, &c->hi, err);
    if (rc == IST_OK) {
        size_t ha = 0, hb = 0, ca = 0, cb = 0;
        for (size_t i = 0; i < m; i++) {
            ca += pa[i] != IST_CI_UNCOVERED;
            cb += pb[i] != IST_CI_UNCOVERED;
            ha += pa[i] != IST_CI_UNCOVERED && pa[i] < r->k;
            hb += pb[i] != IST_CI_UNCOVERED && pb[i] < r->k;
        }
        c->new_value = ca ? (double)ha / (double)ca : 0;
        c->baseline_value = cb ? (double)hb / (double)cb : 0;
        c->has_interval = true;
        c->outcome = c->hi < -r->bound ? IST_GATE_FAIL : IST_GATE_PASS;
    }
done:
    ist_free(e);
    ist_free(pa);
    ist_free(pb);
    return rc;
}

static ist_status
check_drop(const ist_gate_result *res, const ist_gate_result *base, const ist_gate_rule *r,
           const ist_gate_opts *o, ist_gate_check *c, ist_error *err)
{
    char bdesc[48];
    const ist_jv *a = find_run(res, r, c->run, sizeof c->run, err), *b;

    if (!a)
        return IST_ERR_INVALID;
    if (!base) {
        c->outcome = IST_GATE_SKIP;
        snprintf(c->note, sizeof c->note, "no baseline result given");
        return IST_OK;
    }
    if (!(b = find_run(base, r, bdesc, sizeof bdesc, err)))
        return IST_ERR_INVALID;
    return paired(res, a, c->run, base, b, bdesc, r, o, c, err);
}

static const char *
test_id(const ist_gate_result *r, const char *key)
{
    return ist_jv_str(ist_jv_get(ist_jv_get(r->root, "test"), key), NULL);
}

/* Refuse a baseline scored on another test list. */
static ist_status
same_test_list(const ist_gate_result *a, const ist_gate_result *b, ist_error *err)
{
    static const char *const keys[] = {"list_checksum", "checksum", "source_words_hash"};
    size_t i = 0, end = 1;
    /* Scored from one list file: its pairs as read decide, whatever the vectors cover.
     * Otherwise the kept pairs and their source words must agree. */
    if (!test_id(a, keys[0]) || !test_id(b, keys[0])) {
        i = 1;
        end = 3;
    }
    for (; i < end; i++) {
        const char *x = test_id(a, keys[i]), *y = test_id(b, keys[i]);
        if (!x || !y)
            return ist_error_set(err, IST_ERR_INVALID,
                                 "cannot compare %s with baseline %s: %s has no test.%s, so "
                                 "the two test lists cannot be shown to be the same",
                                 a->name, b->name, !x ? a->name : b->name, keys[i]);
        if (strcmp(x, y) != 0)
            return ist_error_set(err, IST_ERR_INVALID,
                                 "refusing to compare %s with baseline %s: they were scored on "
                                 "different test lists (test.%s %s vs %s)",
                                 a->name, b->name, keys[i], x, y);
    }
    return IST_OK;
}

static char *
dup_or_null(const char *s, bool *ok)
{
    char *d = s ? ist_strdup(s) : NULL;
    if (s && !d)
        *ok = false;
    return d;
}

void
ist_verdict_free(ist_verdict *v)
{
    if (!v)
        return;
    ist_free(v->rules_name);
    ist_free(v->result_name);
    ist_free(v->baseline_name);
    ist_free(v->test_checksum);
    ist_free(v->test_hash);
    for (size_t i = 0; v->rules && i < v->n; i++)
        ist_free((char *)v->rules[i].text);
    ist_free(v->rules);
    ist_free(v->checks);
    ist_free(v);
}

static ist_status
new_verdict(const ist_thresholds *t, const ist_gate_result *res, const ist_gate_result *base,
            const ist_gate_opts *o, ist_verdict **out, ist_error *err)
{
    bool ok = true;
    ist_verdict *v = ist_calloc(1, sizeof *v);
    if (!v)
        return ist_error_nomem(err);
    v->rules_name = dup_or_null(t->name, &ok);
    v->result_name = dup_or_null(res->name, &ok);
    v->baseline_name = dup_or_null(base ? base->name : NULL, &ok);
    v->test_checksum = dup_or_null(test_id(res, "checksum"), &ok);
    v->test_hash = dup_or_null(test_id(res, "source_words_hash"), &ok);
    v->checks = ist_calloc(t->n + 1, sizeof *v->checks);
    v->rules = ist_calloc(t->n + 1, sizeof *v->rules);
    v->n = t->n;
    v->ci = o->ci;
    for (size_t i = 0; v->rules && v->checks && i < t->n; i++) {
        v->rules[i] = t->rules[i];
        v->rules[i].text = dup_or_null(t->rules[i].text, &ok);
        v->checks[i].rule = &v->rules[i];
    }
    if (!ok || !v->checks || !v->rules) {
        ist_verdict_free(v);
        return ist_error_nomem(err);
    }
    *out = v;
    return IST_OK;
}

ist_status
ist_gate_evaluate(const ist_thresholds *t, const ist_gate_result *res,
                  const ist_gate_result *base, const ist_gate_opts *opts, ist_verdict **out,
                  ist_error *err)
{
    ist_gate_opts dflt;
    ist_verdict *v = NULL;
    ist_status rc;

    *out = NULL;
    if (!opts) {
        ist_gate_opts_init(&dflt);
        opts = &dflt;
    }
    if (base && (rc = same_test_list(res, base, err)) != IST_OK)
        return rc;
    if ((rc = new_verdict(t, res, base, opts, &v, err)) != IST_OK)
        return rc;
    for (size_t i = 0; i < t->n && rc == IST_OK; i++) {
        const ist_gate_rule *r = &v->rules[i];
        ist_gate_check *c = &v->checks[i];
        switch (r->figure) {
        case IST_GATE_PRECISION: rc = check_precision(res, r, opts, c, err); break;
        case IST_GATE_COVERAGE: rc = check_coverage(res, r, c, err); break;
        case IST_GATE_DROP: rc = check_drop(res, base, r, opts, c, err); break;
        }
    }
    if (rc != IST_OK) {
        ist_verdict_free(v);
        return rc;
    }
    *out = v;
    return IST_OK;
}

/* gate_eval.c - checking rules against a result and a baseline result. The change of
 * precision between two results is judged by a paired bootstrap over the test words
 * (Koehn 2004, "Statistical significance tests for machine translation evaluation"). */
#include <isthmus/gate.h>

#include <math.h>
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

/* The last run matching the rule's retrieval and label. */
static const ist_result_run *
find_run(const ist_result *res, const ist_gate_rule *r, char *desc, size_t cap, ist_error *err)
{
    const ist_result_run *found = NULL;
    for (size_t i = 0; i < res->nruns; i++) {
        const ist_result_run *run = &res->runs[i];
        if (r->retrieval >= 0 && run->m.method != (ist_retrieval)r->retrieval)
            continue;
        if (r->label && strcmp(run->label, r->label) != 0)
            continue;
        found = run;
        snprintf(desc, cap, "%s %s", run->label, ist_retrieval_name(run->m.method));
    }
    if (!found)
        ist_error_set(err, IST_ERR_INVALID, "%s: no run for rule '%s'%s%s%s%s", res->name,
                      r->text, r->label ? ": no map labelled " : "", r->label ? r->label : "",
                      r->retrieval >= 0 ? " scored with " : "",
                      r->retrieval >= 0 ? ist_retrieval_name((ist_retrieval)r->retrieval) : "");
    return found;
}

static bool
find_band(const ist_result *res, const ist_result_run *run, const ist_gate_rule *r,
          size_t *index, ist_error *err)
{
    for (size_t i = 0; i < run->m.nbands; i++) {
        const ist_band *b = &run->m.band[i];
        if (b->lo == r->band_from && b->hi == r->band_to) {
            *index = i;
            return true;
        }
    }
    char want[64];
    ist_band_label(r->band_from, r->band_to, "-", want, sizeof want);
    ist_error_set(err, IST_ERR_INVALID, "%s: rule '%s' (line %zu): the result has no band %s",
                  res->name, r->text, r->line, want);
    return false;
}

static size_t
k_index(size_t k)
{
    for (size_t j = 0; j < IST_METRICS_NK; j++)
        if (ist_metrics_k(j) == k)
            return j;
    return 0;
}

/* An interval the result lacks, drawn from the run's per-query outcomes (of one band, or
 * all with band SIZE_MAX); has_interval stays false without them. */
static ist_status
draw_interval(const ist_result_run *run, size_t band, const ist_gate_rule *r,
              const ist_gate_opts *o, ist_gate_check *c, ist_error *err)
{
    double lo[IST_METRICS_NK], hi[IST_METRICS_NK];
    size_t n = 0;
    uint8_t *places;
    ist_status rc;

    if (run->nper_query == 0)
        return IST_OK;
    if (!(places = ist_malloc(run->nper_query)))
        return ist_error_nomem(err);
    for (size_t i = 0; i < run->nper_query; i++)
        if (band == SIZE_MAX || run->query_band[i] == band)
            places[n++] = run->m.query_place[i];
    rc = n ? ist_ci_precision(places, n, &o->ci, lo, hi, err) : IST_OK;
    if (rc == IST_OK && n) {
        c->lo = lo[k_index(r->k)];
        c->hi = hi[k_index(r->k)];
        c->has_interval = true;
    }
    ist_free(places);
    return rc;
}

static void
judge(const ist_gate_rule *r, ist_gate_check *c)
{
    bool ok = r->bound_kind == IST_GATE_MIN ? c->figure >= r->bound : c->figure <= r->bound;
    c->outcome = ok ? IST_GATE_PASS : IST_GATE_FAIL;
}

static ist_status
check_precision(const ist_result *res, const ist_gate_rule *r, const ist_gate_opts *o,
                ist_gate_check *c, ist_error *err)
{
    const ist_result_run *run = find_run(res, r, c->run, sizeof c->run, err);
    size_t band = SIZE_MAX, j = k_index(r->k);

    if (!run)
        return IST_ERR_INVALID;
    if (r->has_band && !find_band(res, run, r, &band, err))
        return IST_ERR_INVALID;
    if (band != SIZE_MAX && run->m.band[band].queries == 0) {
        c->outcome = IST_GATE_SKIP;
        snprintf(c->note, sizeof c->note, "the band holds no test word");
        return IST_OK;
    }
    c->figure = band == SIZE_MAX ? run->m.p[j] : run->m.band[band].p[j];
    c->lo = band == SIZE_MAX ? run->ci.lo[j] : run->ci.band_lo[band][j];
    c->hi = band == SIZE_MAX ? run->ci.hi[j] : run->ci.band_hi[band][j];
    if ((band == SIZE_MAX ? run->has_ci : run->band_has_ci[band]) && !isnan(c->lo)) {
        c->has_interval = true;
    } else {
        ist_status rc = draw_interval(run, band, r, o, c, err);
        if (rc != IST_OK)
            return rc;
    }
    judge(r, c);
    return IST_OK;
}

static ist_status
check_coverage(const ist_result *res, const ist_gate_rule *r, ist_gate_check *c,
               ist_error *err)
{
    const ist_result_run *run = find_run(res, r, c->run, sizeof c->run, err);
    if (!run)
        return IST_ERR_INVALID;
    c->figure = run->m.coverage;
    judge(r, c);
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

/* Append run's per-query outcomes as side s; refuses a run without them. */
static ist_status
collect(const ist_result *res, const ist_result_run *run, const char *desc, uint8_t s,
        side_entry *e, size_t *n, ist_error *err)
{
    if (run->nper_query == 0)
        return ist_error_set(err, IST_ERR_INVALID,
                             "%s: run %s has no per_query outcomes, so it cannot be compared "
                             "query by query; score it again with this version", res->name, desc);
    for (size_t i = 0; i < run->nper_query; i++) {
        const char *w = run->query_source ? run->query_source[i] : NULL;
        if (!w)
            return ist_error_set(err, IST_ERR_INVALID,
                                 "%s: run %s: per_query: expected the source word of each "
                                 "query", res->name, desc);
        e[(*n)++] = (side_entry){w, run->m.query_place[i], s};
    }
    return IST_OK;
}

/* Pair the two runs' queries by source word (a word covered by one run only counts as
 * uncovered in the other) and run the paired bootstrap. */
static ist_status
paired(const ist_result *res, const ist_result_run *a, const char *adesc,
       const ist_result *base, const ist_result_run *b, const char *bdesc,
       const ist_gate_rule *r, const ist_gate_opts *o, ist_gate_check *c, ist_error *err)
{
    size_t total = a->nper_query + b->nper_query;
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
check_drop(const ist_result *res, const ist_result *base, const ist_gate_rule *r,
           const ist_gate_opts *o, ist_gate_check *c, ist_error *err)
{
    char bdesc[48];
    const ist_result_run *a = find_run(res, r, c->run, sizeof c->run, err), *b;

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

/* Refuse a baseline scored on another test list: the checksums of the two lists as read
 * decide, whatever the vectors covered of them. */
static ist_status
same_test_list(const ist_result *a, const ist_result *b, ist_error *err)
{
    const ist_result_list *x = &a->test.list, *y = &b->test.list;
    char hx[17], hy[17];
    if (!x->has_checksum || !y->has_checksum)
        return ist_error_set(err, IST_ERR_INVALID,
                             "cannot compare %s with baseline %s: %s has no test.list_checksum, "
                             "so the two test lists cannot be shown to be the same; score it "
                             "again with this version", a->name, b->name,
                             !x->has_checksum ? a->name : b->name);
    if (x->checksum != y->checksum) {
        ist_result_hex(x->checksum, hx);
        ist_result_hex(y->checksum, hy);
        return ist_error_set(err, IST_ERR_INVALID,
                             "refusing to compare %s with baseline %s: they were scored on "
                             "different test lists (test.list_checksum %s vs %s)",
                             a->name, b->name, hx, hy);
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
    for (size_t i = 0; i < v->nconditions; i++)
        ist_free(v->conditions[i]);
    for (size_t i = 0; v->rules && i < v->n; i++)
        ist_free((char *)v->rules[i].text);
    ist_free(v->rules);
    ist_free(v->checks);
    ist_free(v);
}

static ist_status
new_verdict(const ist_thresholds *t, const ist_result *res, const ist_result *base,
            const ist_gate_opts *o, ist_verdict **out, ist_error *err)
{
    bool ok = true;
    ist_verdict *v = ist_calloc(1, sizeof *v);
    if (!v)
        return ist_error_nomem(err);
    v->rules_name = dup_or_null(t->name, &ok);
    v->result_name = dup_or_null(res->name, &ok);
    v->baseline_name = dup_or_null(base ? base->name : NULL, &ok);
    v->has_list_ck = res->test.list.has_checksum;
    v->list_ck = res->test.list.checksum;
    v->has_kept = res->test.has_kept;
    v->kept_ck = res->test.kept_checksum;
    v->sources_hash = res->test.sources_hash;
    v->has_fp = res->source.has_fingerprint && res->target.has_fingerprint;
    v->source_fp = res->source.fingerprint;
    v->target_fp = res->target.fingerprint;
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

/* "N test source words are also seed source words", or of one word. */
static void
leak_text(char *buf, size_t cap, size_t n)
{
    snprintf(buf, cap, n == 1 ? "%zu test source word is also a seed source word"
                              : "%zu test source words are also seed source words", n);
}

static ist_status
add_condition(ist_verdict *v, const char *text, ist_error *err)
{
    if (!(v->conditions[v->nconditions] = ist_strdup(text)))
        return ist_error_nomem(err);
    v->nconditions++;
    return IST_OK;
}

/* The conditions of the verdict, then the rules that refuse them. */
static ist_status
conditions(ist_verdict *v, const ist_result *res, ist_error *err)
{
    size_t skipped = 0, leak = res->test.has_overlap ? res->test.overlap : 0;
    char leaked[96], buf[128];
    ist_status rc = IST_OK;

    for (size_t i = 0; i < v->n; i++)
        skipped += v->checks[i].outcome == IST_GATE_SKIP;
    leak_text(leaked, sizeof leaked, leak);
    if (leak) {
        snprintf(buf, sizeof buf, "leakage: %s", leaked);
        rc = add_condition(v, buf, err);
    }
    if (rc == IST_OK && skipped) {
        snprintf(buf, sizeof buf, "%zu rule%s not checked", skipped, skipped == 1 ? "" : "s");
        rc = add_condition(v, buf, err);
    }
    for (size_t i = 0; rc == IST_OK && i < v->n; i++) {
        const ist_gate_rule *r = &v->rules[i];
        ist_gate_check *c = &v->checks[i];
        if (r->figure == IST_GATE_LEAKAGE) {
            c->figure = (double)leak;
            c->outcome = leak ? IST_GATE_FAIL : IST_GATE_PASS;
            snprintf(c->note, sizeof c->note, "%s", leaked);
        } else if (r->figure == IST_GATE_UNCHECKED) {
            c->figure = (double)skipped;
            c->outcome = skipped ? IST_GATE_FAIL : IST_GATE_PASS;
            snprintf(c->note, sizeof c->note, "%zu other rule%s not checked", skipped,
                     skipped == 1 ? "" : "s");
        }
    }
    return rc;
}

const char *
ist_verdict_condition(const ist_verdict *v, size_t i)
{
    return i < v->nconditions ? v->conditions[i] : NULL;
}

ist_status
ist_gate_evaluate(const ist_thresholds *t, const ist_result *res, const ist_result *base,
                  const ist_gate_opts *opts, ist_verdict **out, ist_error *err)
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
        case IST_GATE_LEAKAGE:
        case IST_GATE_UNCHECKED: break;   /* judged once the others are */
        }
    }
    if (rc == IST_OK)
        rc = conditions(v, res, err);
    if (rc != IST_OK) {
        ist_verdict_free(v);
        return rc;
    }
    *out = v;
    return IST_OK;
}

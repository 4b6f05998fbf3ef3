/* gate_verdict_load.c - a verdict JSON read back (docs/formats.md "Verdict JSON"): its
 * schema, that it belongs to a result, and the typed verdict the report shows. */
#include <isthmus/filekind.h>
#include <isthmus/gate.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "gate_int.h"

static ist_status
vbad(const char *path, const ist_jv *at, const char *what, ist_error *err)
{
    return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(at), "not a verdict of this "
                        "isthmus: %s", what);
}

static int
outcome_of(const char *s)
{
    static const char *const names[] = {"pass", "fail", "skip"};
    for (int i = 0; s && i < 3; i++)
        if (strcmp(s, names[i]) == 0)
            return i;
    return -1;
}

static ist_status
check_rules(const char *path, const ist_jv *root, ist_error *err)
{
    const ist_jv *rules = ist_jv_get(root, "rules");
    size_t tally[3] = {0, 0, 0};
    static const char *const counts[] = {"rules_passed", "rules_failed", "rules_skipped"};

    if (ist_jv_type(rules) != IST_JARR)
        return vbad(path, root, "expected \"rules\" to be an array", err);
    for (size_t i = 0; i < ist_jv_len(rules); i++) {
        const ist_jv *r = ist_jv_at(rules, i);
        int o = outcome_of(ist_jv_str(ist_jv_get(r, "outcome"), NULL));
        if (ist_jv_type(r) != IST_JOBJ || ist_jv_type(ist_jv_get(r, "rule")) != IST_JSTR || o < 0)
            return vbad(path, r, "expected each rule to be an object with its \"rule\" text and "
                                 "an \"outcome\" of pass, fail or skip", err);
        tally[o]++;
    }
    for (int i = 0; i < 3; i++)
        if (ist_jv_num(ist_jv_get(root, counts[i]), -1) != (double)tally[i])
            return vbad(path, root, "the rule counts do not agree with the rules", err);
    const char *verdict = ist_jv_str(ist_jv_get(root, "verdict"), NULL);
    int o = outcome_of(verdict);
    if (o < 0 || o == 2)
        return vbad(path, root, "expected \"verdict\" to be \"pass\" or \"fail\"", err);
    if ((o == 1) != (tally[1] > 0))
        return vbad(path, root, "the verdict does not follow from the rules' outcomes", err);
    const ist_jv *cond = ist_jv_get(root, "conditions");
    for (size_t i = 0; i < ist_jv_len(cond); i++)
        if (ist_jv_type(ist_jv_at(cond, i)) != IST_JSTR)
            return vbad(path, cond, "expected \"conditions\" to be a list of texts", err);
    if (cond && ist_jv_type(cond) != IST_JARR)
        return vbad(path, cond, "expected \"conditions\" to be a list of texts", err);
    if (ist_jv_len(cond) > sizeof ((ist_verdict *)0)->conditions /
                               sizeof ((ist_verdict *)0)->conditions[0])
        return vbad(path, cond, "expected at most two conditions (leakage, rules not checked)",
                    err);
    return IST_OK;
}

/* One recorded identity against the result's. */
static ist_status
same_id(const char *path, const ist_jv *holder, const char *key, bool has, uint64_t want,
        const char *what, ist_error *err)
{
    const char *got = ist_jv_str(ist_jv_get(holder, key), NULL);
    char hex[17];
    if (!has)
        return IST_OK;   /* the result does not record it: nothing to compare */
    ist_result_hex(want, hex);
    if (!got)
        return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(holder),
                            "the verdict does not record the %s, so it cannot be shown to "
                            "belong to this result; run the gate again", what);
    if (strcmp(got, hex) != 0)
        return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(ist_jv_get(holder, key)),
                            "the verdict was made for another result: %s %s, the result's %s",
                            what, got, hex);
    return IST_OK;
}

/* Schema and identity of a parsed verdict. */
static ist_status
check_root(const char *path, const ist_jv *root, const ist_result *res, ist_error *err)
{
    ist_status rc = IST_OK;
    const char *f = ist_jv_str(ist_jv_get(root, "format"), NULL);
    if (ist_jv_type(root) != IST_JOBJ)
        rc = ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(root),
                          "expected a JSON object at the top level");
    else if (!f || strcmp(f, "isthmus verdict") != 0)
        rc = ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(root),
                          "expected \"format\": \"isthmus verdict\", found %s%s%s",
                          f ? "\"" : "", f ? f : "none", f ? "\"" : "");
    else if (ist_jv_num(ist_jv_get(root, "version"), -1) != VERDICT_FORMAT_VERSION)
        rc = vbad(path, root, "expected \"version\": 1", err);
    if (rc == IST_OK)
        rc = check_rules(path, root, err);
    const ist_jv *test = ist_jv_get(root, "test"), *vec = ist_jv_get(root, "vectors");
    if (rc == IST_OK)
        rc = same_id(path, test ? test : root, "list_checksum", res->test.list.has_checksum,
                     res->test.list.checksum, "test list checksum", err);
    if (rc == IST_OK)
        rc = same_id(path, vec ? vec : root, "source", res->source.has_fingerprint,
                     res->source.fingerprint, "source vectors' fingerprint", err);
    if (rc == IST_OK)
        rc = same_id(path, vec ? vec : root, "target", res->target.has_fingerprint,
                     res->target.fingerprint, "target vectors' fingerprint", err);
    return rc;
}

/* A vector file, a map or a corpus named as the verdict is told by its kind; other text
 * and JSON (a result among them) get the parser's and the schema's own messages. */
static ist_status
parse_verdict_file(const char *path, ist_jv **root, ist_error *err)
{
    ist_status rc = ist_file_expect(path, IST_FILE_BIT(IST_FILE_VERDICT) |
                                              IST_FILE_BIT(IST_FILE_RESULT) |
                                              IST_FILE_BIT(IST_FILE_JSON) | IST_FILE_ANY_TEXT,
                                    1, "a verdict file", err);
    return rc == IST_OK ? ist_json_parse_file(path, root, err) : rc;
}

ist_status
ist_verdict_check_file(const char *path, const ist_result *res, ist_error *err)
{
    ist_jv *root = NULL;
    ist_status rc = parse_verdict_file(path, &root, err);

    if (rc == IST_OK)
        rc = check_root(path, root, res, err);
    ist_jv_free(root);
    return rc;
}

/* ---- the typed verdict ---------------------------------------------------------- */

typedef struct vload {
    const char *path;
    ist_error *err;
    ist_status rc;
} vload;

static char *
dup_str(vload *l, const char *s)
{
    char *d;
    if (!s || l->rc != IST_OK)
        return NULL;
    if (!(d = ist_strdup(s)))
        l->rc = ist_error_nomem(l->err);
    return d;
}

/* A number member in [lo, hi]; absent or null: dflt; anything else fails. */
static double
num_in(vload *l, const ist_jv *o, const char *key, double lo, double hi, double dflt)
{
    const ist_jv *v = ist_jv_get(o, key);
    char what[96];
    if (!v || ist_jv_type(v) == IST_JNULL || l->rc != IST_OK)
        return dflt;
    double x = ist_jv_num(v, NAN);
    if (ist_jv_type(v) == IST_JNUM && x >= lo && x <= hi)
        return x;
    snprintf(what, sizeof what, "expected \"%s\" to be a number from %g to %g", key, lo, hi);
    l->rc = vbad(l->path, v, what, l->err);
    return dflt;
}

/* s is all of fmt (a "%u%n" pattern); *k gets the number. */
static bool
spelt(const char *s, const char *fmt, unsigned *k)
{
    int used = 0;
    return sscanf(s, fmt, k, &used) == 1 && used > 0 && !s[used];
}

/* "p@K", "drop p@K", "coverage", "leakage", "unchecked rules"; verdicts written before
 * 2026-12-03 spell "precision@K". */
static void
figure_of(vload *l, const ist_jv *rule, ist_gate_rule *r)
{
    const ist_jv *v = ist_jv_get(rule, "figure_name");
    const char *s = ist_jv_str(v, NULL);
    unsigned k = 0;

    r->figure = IST_GATE_PRECISION;
    if (!v)
        return;
    if (s && strcmp(s, "coverage") == 0)
        r->figure = IST_GATE_COVERAGE;
    else if (s && strcmp(s, "leakage") == 0)
        r->figure = IST_GATE_LEAKAGE;
    else if (s && strcmp(s, "unchecked rules") == 0)
        r->figure = IST_GATE_UNCHECKED;
    else if (s && (spelt(s, "drop p@%u%n", &k) || spelt(s, "drop precision@%u%n", &k)))
        r->figure = IST_GATE_DROP;
    else if (!(s && (spelt(s, "p@%u%n", &k) || spelt(s, "precision@%u%n", &k))))
        l->rc = vbad(l->path, v, "expected \"figure_name\" to be p@K, drop p@K, coverage, "
                                 "leakage or unchecked rules", l->err);
    r->k = k;
}

static void
load_check(vload *l, const ist_jv *o, ist_gate_rule *r, ist_gate_check *c)
{
    const ist_jv *band = ist_jv_get(o, "band"), *iv = ist_jv_get(o, "interval");

    r->line = (size_t)num_in(l, o, "line", 0, 1e12, 0);
    r->text = dup_str(l, ist_jv_str(ist_jv_get(o, "rule"), ""));
    r->retrieval = -1;
    r->bound_kind = strcmp(ist_jv_str(ist_jv_get(o, "bound_kind"), "min"), "max") == 0
                        ? IST_GATE_MAX : IST_GATE_MIN;
    r->bound = num_in(l, o, "bound", 0, 1, NAN);
    figure_of(l, o, r);
    if (ist_jv_type(band) == IST_JOBJ) {
        r->has_band = true;
        r->band_from = (size_t)num_in(l, band, "rank_from", 1, 1e15, 1);
        r->band_to = (size_t)num_in(l, band, "rank_to", 1, 1e15, 0);
    }
    c->rule = r;
    c->outcome = (ist_gate_outcome)outcome_of(ist_jv_str(ist_jv_get(o, "outcome"), NULL));
    c->figure = num_in(l, o, "figure", -1, 1e15, NAN);
    if (ist_jv_type(iv) == IST_JARR && ist_jv_len(iv) == 2 &&
        ist_jv_type(ist_jv_at(iv, 0)) == IST_JNUM && ist_jv_type(ist_jv_at(iv, 1)) == IST_JNUM) {
        c->has_interval = true;
        c->lo = ist_jv_num(ist_jv_at(iv, 0), 0);
        c->hi = ist_jv_num(ist_jv_at(iv, 1), 0);
        if (!(c->lo <= c->hi) && l->rc == IST_OK)
            l->rc = vbad(l->path, iv, "expected an \"interval\" [low, high]", l->err);
    } else if (iv && ist_jv_type(iv) != IST_JNULL && l->rc == IST_OK) {
        l->rc = vbad(l->path, iv, "expected an \"interval\" [low, high] or null", l->err);
    }
    c->new_value = num_in(l, o, "new", 0, 1, NAN);
    c->baseline_value = num_in(l, o, "baseline", 0, 1, NAN);
    snprintf(c->run, sizeof c->run, "%s", ist_jv_str(ist_jv_get(o, "run"), ""));
    snprintf(c->note, sizeof c->note, "%s", ist_jv_str(ist_jv_get(o, "note"), ""));
}

static void
load_ids(vload *l, const ist_jv *root, ist_verdict *v)
{
    const ist_jv *test = ist_jv_get(root, "test"), *vec = ist_jv_get(root, "vectors");
    const ist_jv *boot = ist_jv_get(root, "bootstrap");
    unsigned long long x;
    if (sscanf(ist_jv_str(ist_jv_get(test, "list_checksum"), ""), "%16llx", &x) == 1) {
        v->has_list_ck = true;
        v->list_ck = x;
    }
    if (sscanf(ist_jv_str(ist_jv_get(test, "checksum"), ""), "%16llx", &x) == 1) {
        v->has_kept = true;
        v->kept_ck = x;
        if (sscanf(ist_jv_str(ist_jv_get(test, "source_words_hash"), ""), "%16llx", &x) == 1)
            v->sources_hash = x;
    }
    if (sscanf(ist_jv_str(ist_jv_get(vec, "source"), ""), "%16llx", &x) == 1) {
        v->has_fp = true;
        v->source_fp = x;
        if (sscanf(ist_jv_str(ist_jv_get(vec, "target"), ""), "%16llx", &x) == 1)
            v->target_fp = x;
    }
    v->ci.level = num_in(l, boot, "level", 0, 1, NAN);
    v->ci.resamples = (size_t)num_in(l, boot, "resamples", 0, 1e9, 0);
    v->ci.seed = (uint64_t)num_in(l, boot, "seed", 0, 1.8e19, 0);
}

static ist_status
build(const char *path, const ist_jv *root, ist_verdict **out, ist_error *err)
{
    vload l = {path, err, IST_OK};
    const ist_jv *rules = ist_jv_get(root, "rules"), *cond = ist_jv_get(root, "conditions");
    size_t n = ist_jv_len(rules);
    ist_verdict *v = ist_calloc(1, sizeof *v);

    if (!v || (n && (!(v->rules = ist_calloc(n, sizeof *v->rules)) ||
                     !(v->checks = ist_calloc(n, sizeof *v->checks))))) {
        ist_verdict_free(v);
        return ist_error_nomem(err);
    }
    v->rules_name = dup_str(&l, ist_jv_str(ist_jv_get(root, "thresholds"), path));
    v->result_name = dup_str(&l, ist_jv_str(ist_jv_get(root, "result"), NULL));
    v->baseline_name = dup_str(&l, ist_jv_str(ist_jv_get(root, "baseline"), NULL));
    for (size_t i = 0; i < ist_jv_len(cond) && l.rc == IST_OK; i++)
        if ((v->conditions[i] = dup_str(&l, ist_jv_str(ist_jv_at(cond, i), ""))))
            v->nconditions++;
    load_ids(&l, root, v);
    for (size_t i = 0; i < n && l.rc == IST_OK; i++, v->n++)
        load_check(&l, ist_jv_at(rules, i), &v->rules[i], &v->checks[i]);
    if (l.rc != IST_OK) {
        ist_verdict_free(v);
        return l.rc;
    }
    *out = v;
    return IST_OK;
}

ist_status
ist_verdict_load(const char *path, const ist_result *result, ist_verdict **out, ist_error *err)
{
    ist_jv *root = NULL;
    ist_status rc;

    *out = NULL;
    if ((rc = parse_verdict_file(path, &root, err)) == IST_OK &&
        (rc = check_root(path, root, result, err)) == IST_OK)
        rc = build(path, root, out, err);
    ist_jv_free(root);
    return rc;
}

/* gate_verdict.c - the verdict: one text line per rule and the verdict JSON
 * (docs/formats.md "Verdict JSON"). */
#include <isthmus/gate.h>

#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "gate_int.h"
#include "ofile_int.h"

size_t
ist_verdict_count(const ist_verdict *v)
{
    return v->n;
}

const ist_gate_check *
ist_verdict_check(const ist_verdict *v, size_t i)
{
    return i < v->n ? &v->checks[i] : NULL;
}

const char *
ist_verdict_thresholds(const ist_verdict *v)
{
    return v->rules_name ? v->rules_name : "";
}

size_t
ist_verdict_tally(const ist_verdict *v, ist_gate_outcome outcome)
{
    size_t n = 0;
    for (size_t i = 0; i < v->n; i++)
        n += v->checks[i].outcome == outcome;
    return n;
}

bool
ist_verdict_passed(const ist_verdict *v)
{
    return ist_verdict_tally(v, IST_GATE_FAIL) == 0;
}

static const char *
outcome_name(ist_gate_outcome o)
{
    return o == IST_GATE_PASS ? "pass" : o == IST_GATE_FAIL ? "fail" : "skip";
}

static const char *
figure_name(const ist_gate_rule *r, char *buf, size_t cap)
{
    if (r->figure == IST_GATE_COVERAGE)
        return "coverage";
    if (r->figure == IST_GATE_LEAKAGE)
        return "leakage";
    if (r->figure == IST_GATE_UNCHECKED)
        return "unchecked rules";
    snprintf(buf, cap, "%sp@%zu", r->figure == IST_GATE_DROP ? "drop " : "", r->k);
    return buf;
}

/* For people: figures in percent with the sign and one decimal, the interval beside in
 * the same unit; a change (new - baseline) in percentage points. The JSON keeps fractions. */
void
ist_verdict_line(const ist_verdict *v, size_t i, char *buf, size_t cap)
{
    const ist_gate_check *c = &v->checks[i];
    const ist_gate_rule *r = c->rule;
    char detail[256], iv[64] = "";

    if (c->has_interval)
        snprintf(iv, sizeof iv, " [%.1f, %.1f]", 100 * c->lo, 100 * c->hi);
    if (c->outcome == IST_GATE_SKIP)
        snprintf(detail, sizeof detail, "not checked: %s", c->note);
    else if (r->figure == IST_GATE_LEAKAGE || r->figure == IST_GATE_UNCHECKED)
        snprintf(detail, sizeof detail, "%s", c->note);
    else if (r->figure == IST_GATE_DROP)
        snprintf(detail, sizeof detail,
                 "change %+.1f points%s (%.1f%% vs baseline %.1f%%, %s); fails when the "
                 "interval lies wholly below %+.1f points",
                 100 * c->figure, iv, 100 * c->new_value, 100 * c->baseline_value, c->run,
                 -100 * r->bound);
    else
        snprintf(detail, sizeof detail, "%.1f%%%s (%s); bound %s %.1f%%", 100 * c->figure, iv,
                 c->run, r->bound_kind == IST_GATE_MIN ? ">=" : "<=", 100 * r->bound);
    snprintf(buf, cap, "%-4s  %s:%zu  %s: %s", c->outcome == IST_GATE_FAIL ? "FAIL"
                                                : outcome_name(c->outcome),
             v->rules_name, r->line, r->text, detail);
}

static void
hex_or_null(ist_jw *w, const char *key, bool has, uint64_t v)
{
    char b[17];
    if (!has) {
        ist_jw_null(w, key);
        return;
    }
    ist_result_hex(v, b);
    ist_jw_str(w, key, b);
}

static void
write_check(ist_jw *w, const ist_gate_check *c)
{
    const ist_gate_rule *r = c->rule;
    char fig[32];

    ist_jw_obj_begin(w, NULL);
    ist_jw_uint(w, "line", r->line);
    ist_jw_str(w, "rule", r->text);
    ist_jw_str(w, "figure_name", figure_name(r, fig, sizeof fig));
    ist_jw_str(w, "run", c->run[0] ? c->run : NULL);
    if (r->has_band) {
        ist_jw_obj_begin(w, "band");
        ist_jw_uint(w, "rank_from", r->band_from);
        if (r->band_to)
            ist_jw_uint(w, "rank_to", r->band_to);
        else
            ist_jw_null(w, "rank_to");
        ist_jw_obj_end(w);
    }
    ist_jw_str(w, "bound_kind", r->bound_kind == IST_GATE_MIN ? "min" : "max");
    ist_jw_num(w, "bound", r->bound);
    if (c->outcome == IST_GATE_SKIP) {
        ist_jw_null(w, "figure");
        ist_jw_null(w, "interval");
    } else {
        ist_jw_num(w, "figure", c->figure);
        if (c->has_interval) {
            ist_jw_arr_begin(w, "interval");
            ist_jw_num(w, NULL, c->lo);
            ist_jw_num(w, NULL, c->hi);
            ist_jw_arr_end(w);
        } else {
            ist_jw_null(w, "interval");
        }
    }
    if (r->figure == IST_GATE_DROP && c->outcome != IST_GATE_SKIP) {
        ist_jw_num(w, "new", c->new_value);
        ist_jw_num(w, "baseline", c->baseline_value);
        ist_jw_num(w, "limit", -r->bound);
    }
    ist_jw_str(w, "outcome", outcome_name(c->outcome));
    if (c->note[0])
        ist_jw_str(w, "note", c->note);
    ist_jw_obj_end(w);
}

ist_status
ist_verdict_write(const ist_verdict *v, const char *path, ist_error *err)
{
    ist_jw w;
    char *text = NULL;
    ist_status rc;

    ist_jw_init(&w, true);
    ist_jw_obj_begin(&w, NULL);
    ist_jw_str(&w, "format", "isthmus verdict");
    ist_jw_int(&w, "version", VERDICT_FORMAT_VERSION);
    ist_jw_str(&w, "verdict", ist_verdict_passed(v) ? "pass" : "fail");
    ist_jw_uint(&w, "rules_passed", ist_verdict_tally(v, IST_GATE_PASS));
    ist_jw_uint(&w, "rules_failed", ist_verdict_tally(v, IST_GATE_FAIL));
    ist_jw_uint(&w, "rules_skipped", ist_verdict_tally(v, IST_GATE_SKIP));
    ist_jw_str(&w, "thresholds", v->rules_name);
    ist_jw_str(&w, "result", v->result_name);
    ist_jw_str(&w, "baseline", v->baseline_name);
    ist_jw_arr_begin(&w, "conditions");
    for (size_t i = 0; i < v->nconditions; i++)
        ist_jw_str(&w, NULL, v->conditions[i]);
    ist_jw_arr_end(&w);
    ist_jw_obj_begin(&w, "test");
    hex_or_null(&w, "checksum", v->has_kept, v->kept_ck);
    hex_or_null(&w, "source_words_hash", v->has_kept, v->sources_hash);
    hex_or_null(&w, "list_checksum", v->has_list_ck, v->list_ck);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "vectors");
    hex_or_null(&w, "source", v->has_fp, v->source_fp);
    hex_or_null(&w, "target", v->has_fp, v->target_fp);
    ist_jw_obj_end(&w);
    ist_jw_obj_begin(&w, "bootstrap");
    ist_jw_num(&w, "level", v->ci.level);
    ist_jw_uint(&w, "resamples", v->ci.resamples);
    ist_jw_uint(&w, "seed", v->ci.seed);
    ist_jw_obj_end(&w);
    ist_jw_arr_begin(&w, "rules");
    for (size_t i = 0; i < v->n; i++)
        write_check(&w, &v->checks[i]);
    ist_jw_arr_end(&w);
    ist_jw_obj_end(&w);
    if ((rc = ist_jw_finish(&w, &text, err)) != IST_OK)
        return rc;
    rc = ist_ofile_write_text(path, text, err);
    ist_free(text);
    return rc;
}

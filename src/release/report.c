/* report.c - the self-contained HTML report of a result file (and a verdict). */
#include <isthmus/report.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <isthmus/isthmus.h>

#include "alloc_int.h"
#include "error_int.h"
#include "json_int.h"
#include "ofile_int.h"
#include "report_int.h"

#define MAX_RUNS 16
#define MAX_BANDS 16

static const char *const style =
    "body{font-family:system-ui,'DejaVu Sans',sans-serif;color:#1c1c1c;background:#fff;"
    "max-width:1100px;margin:0 auto;padding:16px 24px;line-height:1.45}"
    "h1{font-size:1.7em;margin:.2em 0}h2{font-size:1.3em;margin-top:1.6em;"
    "border-bottom:2px solid #1b4f72;padding-bottom:.15em}"
    "table{border-collapse:collapse;margin:.6em 0}th,td{border:1px solid #a6acaf;"
    "padding:3px 8px;text-align:left;vertical-align:top}th{background:#eaf0f5}"
    "td.n{text-align:right;font-variant-numeric:tabular-nums}"
    ".caution{border:2px solid #7d4e00;background:#fff6e5;padding:8px 12px;margin:12px 0}"
    ".headline{font-size:1.25em}.muted{color:#4d5656}"
    ".pass{color:#14532d;background:#e3f4e8;font-weight:bold}"
    ".fail{color:#8b1a1a;background:#fbe4e4;font-weight:bold}"
    ".other{color:#4a3b00;background:#fbf3d0;font-weight:bold}"
    ".badge{display:inline-block;padding:2px 10px;border:2px solid currentColor;border-radius:4px}"
    "svg.chart{max-width:100%;height:auto;font-family:inherit;display:block;margin:.4em 0}"
    ".row{display:flex;flex-wrap:wrap;gap:16px}.row>figure{flex:1 1 460px;margin:0}"
    ".row svg.chart{width:100%}figcaption h3{margin:.3em 0}"
    "code{font-family:'DejaVu Sans Mono',monospace;font-size:.92em;word-break:break-all}"
    "@media print{body{max-width:none;padding:0;font-size:10pt}h2{break-after:avoid}"
    "section,table,svg{break-inside:avoid}.caution{background:none}"
    "th{background:none}}@page{margin:15mm}";

typedef struct rep {
    rbuf b;
    const ist_jv *res, *verdict;
    int chart_id;
} rep;

static void
esc_num(rbuf *b, const ist_jv *v)
{
    if (ist_jv_type(v) == IST_JNUM)
        rb_printf(b, "%.6g", ist_jv_num(v, 0));
    else if (ist_jv_type(v) == IST_JSTR)
        rb_esc(b, ist_jv_str(v, ""));
    else if (ist_jv_type(v) == IST_JBOOL)
        rb_put(b, ist_jv_bool(v, false) ? "true" : "false");
    else
        rb_put(b, "\xe2\x80\x94");
}

/* Any JSON value as compact text, escaped for HTML. */
static void
esc_json(rbuf *b, const ist_jv *v)
{
    switch (ist_jv_type(v)) {
    case IST_JSTR:
        rb_put(b, "\"");
        rb_esc(b, ist_jv_str(v, ""));
        rb_put(b, "\"");
        break;
    case IST_JARR:
    case IST_JOBJ: {
        bool obj = ist_jv_type(v) == IST_JOBJ;
        rb_put(b, obj ? "{" : "[");
        for (size_t i = 0; i < ist_jv_len(v); i++) {
            if (i)
                rb_put(b, ", ");
            if (obj) {
                rb_esc(b, ist_jv_key(v, i));
                rb_put(b, ": ");
            }
            esc_json(b, ist_jv_at(v, i));
        }
        rb_put(b, obj ? "}" : "]");
        break;
    }
    case IST_JNULL: rb_put(b, "null"); break;
    default: esc_num(b, v);
    }
}

static void
pct(rbuf *b, double v)
{
    if (isnan(v))
        rb_put(b, "\xe2\x80\x94");
    else
        rb_printf(b, "%.1f%%", 100 * v);
}

/* The interval of figure key ("p@1") in a "ci" object; false when absent. */
static bool
ci_of(const ist_jv *holder, const char *key, double *lo, double *hi)
{
    const ist_jv *a = ist_jv_get(ist_jv_get(holder, "ci"), key);
    if (ist_jv_type(a) != IST_JARR || ist_jv_len(a) != 2 ||
        ist_jv_type(ist_jv_at(a, 0)) != IST_JNUM || ist_jv_type(ist_jv_at(a, 1)) != IST_JNUM)
        return false;
    *lo = ist_jv_num(ist_jv_at(a, 0), 0);
    *hi = ist_jv_num(ist_jv_at(a, 1), 0);
    return true;
}

static void
figure_cell(rbuf *b, const ist_jv *holder, const char *key)
{
    double lo, hi;
    rb_put(b, "<td class=\"n\">");
    if (ist_jv_num(ist_jv_get(holder, "queries"), 1) == 0) {
        rb_put(b, "\xe2\x80\x94</td>");
        return;
    }
    pct(b, ist_jv_num(ist_jv_get(ist_jv_get(holder, "precision"), key), NAN));
    if (ci_of(holder, key, &lo, &hi))
        rb_printf(b, " <span class=\"muted\">[%.1f, %.1f]</span>", 100 * lo, 100 * hi);
    rb_put(b, "</td>");
}

static void
run_name(const ist_jv *run, char *buf, size_t cap)
{
    snprintf(buf, cap, "%s, %s", ist_jv_str(ist_jv_get(run, "label"), "run"),
             ist_jv_str(ist_jv_get(run, "retrieval"), "?"));
}

/* The run the headline quotes: the last CSLS run, else the last run. */
static const ist_jv *
headline_run(const ist_jv *runs)
{
    const ist_jv *pick = NULL;
    for (size_t i = 0; i < ist_jv_len(runs); i++) {
        const ist_jv *r = ist_jv_at(runs, i);
        if (!pick || strcmp(ist_jv_str(ist_jv_get(r, "retrieval"), ""), "csls") == 0)
            pick = r;
    }
    return pick;
}

static void
caution(rbuf *b)
{
    rb_put(b, "<p class=\"caution\" role=\"note\"><strong>Caution:</strong> the translations and "
              "scores in this report are statistical suggestions. Have them reviewed by a speaker "
              "of the language before they drive anything customer-facing or financial.</p>\n");
}

/* The conditions a pass carries (from the verdict, or the result's leakage alone). */
static void
conditions_note(rep *r)
{
    const ist_jv *cond = ist_jv_get(r->verdict, "conditions");
    double leak = ist_jv_num(ist_jv_get(ist_jv_get(r->res, "test"), "overlap_with_seeds"), 0);
    if (ist_jv_len(cond) == 0 && !(leak > 0))
        return;
    rb_put(&r->b, "<p class=\"caution\" role=\"note\"><strong>Conditions:</strong> ");
    if (ist_jv_len(cond) == 0)
        rb_printf(&r->b, "leakage: %.0f test source words are also seed source words, so the "
                         "figures overstate how well the map translates", leak);
    for (size_t i = 0; i < ist_jv_len(cond); i++) {
        rb_put(&r->b, i ? "; " : "");
        rb_esc(&r->b, ist_jv_str(ist_jv_at(cond, i), ""));
    }
    rb_put(&r->b, ".</p>\n");
}

static void
headline(rep *r)
{
    const ist_jv *runs = ist_jv_get(r->res, "runs"), *h = headline_run(runs);
    rbuf *b = &r->b;
    char name[160];

    rb_put(b, "<section><h2 id=\"headline\">Headline figures</h2>\n");
    if (!h) {
        rb_put(b, "<p>This result holds no scored run.</p></section>\n");
        return;
    }
    run_name(h, name, sizeof name);
    conditions_note(r);
    rb_put(b, "<p class=\"headline\">Precision@1: <strong>");
    pct(b, ist_jv_num(ist_jv_get(ist_jv_get(h, "precision"), "p@1"), NAN));
    rb_put(b, "</strong> (");
    rb_esc(b, name);
    rb_printf(b, "), over %.0f covered test words; coverage ",
              ist_jv_num(ist_jv_get(h, "queries"), 0));
    pct(b, ist_jv_num(ist_jv_get(h, "coverage"), NAN));
    rb_put(b, ".</p>\n<table><caption class=\"muted\">Precision over covered test words; "
              "bracketed: 95% confidence interval where the result has one</caption>\n"
              "<tr><th>map</th><th>retrieval</th><th>queries</th><th>coverage</th>"
              "<th>P@1</th><th>P@5</th><th>P@10</th></tr>\n");
    for (size_t i = 0; i < ist_jv_len(runs); i++) {
        const ist_jv *run = ist_jv_at(runs, i);
        rb_put(b, "<tr><td>");
        rb_esc(b, ist_jv_str(ist_jv_get(run, "label"), ""));
        rb_put(b, "</td><td>");
        rb_esc(b, ist_jv_str(ist_jv_get(run, "retrieval"), ""));
        rb_printf(b, "</td><td class=\"n\">%.0f</td><td class=\"n\">",
                  ist_jv_num(ist_jv_get(run, "queries"), 0));
        pct(b, ist_jv_num(ist_jv_get(run, "coverage"), NAN));
        rb_put(b, "</td>");
        figure_cell(b, run, "p@1");
        figure_cell(b, run, "p@5");
        figure_cell(b, run, "p@10");
        rb_put(b, "</tr>\n");
    }
    rb_put(b, "</table></section>\n");
}

static const char *
outcome_class(const ist_jv *o, const char **text)
{
    const char *s = ist_jv_type(o) == IST_JBOOL ? (ist_jv_bool(o, false) ? "pass" : "fail")
                                                : ist_jv_str(o, "?");
    *text = s;
    if (strcmp(s, "pass") == 0 || strcmp(s, "PASS") == 0 || strcmp(s, "passed") == 0)
        return "pass";
    if (strcmp(s, "fail") == 0 || strcmp(s, "FAIL") == 0 || strcmp(s, "failed") == 0)
        return "fail";
    return "other";
}

static void
outcome(rbuf *b, const ist_jv *o)
{
    const char *text, *cls = outcome_class(o, &text);
    rb_printf(b, "<span class=\"badge %s\">%s ", cls,
              strcmp(cls, "pass") == 0   ? "\xe2\x9c\x93"
              : strcmp(cls, "fail") == 0 ? "\xe2\x9c\x97"
                                         : "?");
    rb_esc(b, text);
    rb_put(b, "</span>");
}

static void
verdict(rep *r)
{
    rbuf *b = &r->b;
    const ist_jv *rules = ist_jv_get(r->verdict, "rules");

    rb_put(b, "<section><h2 id=\"verdict\">Gate verdict</h2>\n");
    if (!r->verdict) {
        rb_put(b, "<p class=\"muted\">No verdict file was given, so no release rule was checked "
                  "for this report.</p></section>\n");
        return;
    }
    rb_put(b, "<p class=\"headline\">Overall: ");
    /* the gate writes "verdict"; "overall" is accepted for hand-made files */
    const ist_jv *overall = ist_jv_get(r->verdict, "verdict");
    outcome(b, overall ? overall : ist_jv_get(r->verdict, "overall"));
    rb_put(b, "</p>\n");
    if (ist_jv_type(rules) == IST_JARR && ist_jv_len(rules)) {
        rb_put(b, "<table><tr><th>rule</th><th>figure</th><th>bound</th><th>outcome</th></tr>\n");
        for (size_t i = 0; i < ist_jv_len(rules); i++) {
            const ist_jv *rule = ist_jv_at(rules, i);
            rb_put(b, "<tr><td>");
            esc_num(b, ist_jv_get(rule, "rule"));
            rb_put(b, "</td><td class=\"n\">");
            esc_json(b, ist_jv_get(rule, "figure"));
            rb_put(b, "</td><td class=\"n\">");
            esc_json(b, ist_jv_get(rule, "bound"));
            rb_put(b, "</td><td>");
            outcome(b, ist_jv_get(rule, "outcome"));
            rb_put(b, "</td></tr>\n");
        }
        rb_put(b, "</table>\n");
    }
    rb_put(b, "</section>\n");
}

static void
band_label(const ist_jv *band, char *buf, size_t cap)
{
    double from = ist_jv_num(ist_jv_get(band, "rank_from"), 1);
    const ist_jv *to = ist_jv_get(band, "rank_to");
    if (ist_jv_type(to) == IST_JNUM)
        snprintf(buf, cap, "%.0f\xe2\x80\x93%.0f", from, ist_jv_num(to, 0));
    else
        snprintf(buf, cap, "%.0f+", from);
}

static void
band_chart(rep *r, const ist_jv *runs, const char *key, size_t nb, const size_t *keep,
           const char *const *cats)
{
    double v[MAX_RUNS][MAX_BANDS], lo[MAX_RUNS][MAX_BANDS], hi[MAX_RUNS][MAX_BANDS];
    char names[RS_MAX_SERIES][160], title[96];
    rseries s[RS_MAX_SERIES];
    size_t ns = 0, nr = ist_jv_len(runs);

    /* at most four series: the last four runs (the refined ones come last) */
    for (size_t i = nr > RS_MAX_SERIES ? nr - RS_MAX_SERIES : 0; i < nr; i++, ns++) {
        const ist_jv *run = ist_jv_at(runs, i), *bands = ist_jv_get(run, "bands");
        for (size_t j = 0; j < nb; j++) {
            const ist_jv *band = ist_jv_at(bands, keep[j]);
            bool has = ist_jv_num(ist_jv_get(band, "queries"), 0) > 0;
            v[ns][j] = has ? ist_jv_num(ist_jv_get(ist_jv_get(band, "precision"), key), NAN) : NAN;
            if (!has || !ci_of(band, key, &lo[ns][j], &hi[ns][j]))
                lo[ns][j] = hi[ns][j] = NAN;
        }
        run_name(run, names[ns], sizeof names[ns]);
        s[ns] = (rseries){names[ns], v[ns], lo[ns], hi[ns]};
    }
    snprintf(title, sizeof title, "Precision %s by frequency band", key);
    rchart c = {.id = ++r->chart_id, .title = title,
                .desc = "Grouped bars, one group per frequency band of the source words, one bar "
                        "per run; black whiskers show the 95% confidence interval where the "
                        "result has one. The table below gives the same figures.",
                .ylabel = key, .xlabel = "frequency rank of the source word", .cats = cats,
                .ncat = nb, .s = s, .ns = ns, .ymax = 1, .percent = true, .labels = true,
                .width = 520};
    rb_printf(&r->b, "<figure><figcaption><h3>%s</h3></figcaption>\n", key);
    rs_bars(&r->b, &c);
    rb_put(&r->b, "</figure>\n");
}

static void
bands(rep *r)
{
    const ist_jv *runs = ist_jv_get(r->res, "runs");
    char cats_buf[MAX_BANDS][48];
    const char *cats[MAX_BANDS];
    size_t nb = 0, keep[MAX_BANDS], nk = 0;
    rbuf *b = &r->b;

    rb_put(b, "<section><h2 id=\"bands\">Precision by frequency band</h2>\n");
    for (size_t i = 0; i < ist_jv_len(runs); i++) {
        size_t n = ist_jv_len(ist_jv_get(ist_jv_at(runs, i), "bands"));
        nb = n > nb ? n : nb;
    }
    nb = nb < MAX_BANDS ? nb : MAX_BANDS;
    if (ist_jv_len(runs) == 0 || nb == 0) {
        rb_put(b, "<p>The result has no bands.</p></section>\n");
        return;
    }
    for (size_t j = 0; j < nb; j++) {
        bool any = false;
        for (size_t i = 0; i < ist_jv_len(runs); i++)
            any |= ist_jv_num(ist_jv_get(ist_jv_at(ist_jv_get(ist_jv_at(runs, i), "bands"), j),
                                         "queries"), 0) > 0;
        if (!any)
            continue;
        band_label(ist_jv_at(ist_jv_get(ist_jv_at(runs, 0), "bands"), j), cats_buf[nk],
                   sizeof cats_buf[nk]);
        cats[nk] = cats_buf[nk];
        keep[nk++] = j;
    }
    rb_printf(b, "<p class=\"muted\">%zu of %zu frequency bands hold test words; the others "
                 "are left out.</p>\n<div class=\"row\">", nk, nb);
    band_chart(r, runs, "p@1", nk, keep, cats);
    band_chart(r, runs, "p@10", nk, keep, cats);
    rb_put(b, "</div>\n");
    rb_put(b, "<table><tr><th>map, retrieval</th><th>frequency rank</th><th>queries</th>"
              "<th>P@1</th><th>P@5</th><th>P@10</th></tr>\n");
    for (size_t i = 0; i < ist_jv_len(runs); i++) {
        const ist_jv *run = ist_jv_at(runs, i), *bl = ist_jv_get(run, "bands");
        char name[160], lab[48];
        run_name(run, name, sizeof name);
        for (size_t j = 0; j < ist_jv_len(bl); j++) {
            const ist_jv *band = ist_jv_at(bl, j);
            if (ist_jv_num(ist_jv_get(band, "queries"), 0) == 0)
                continue;
            band_label(band, lab, sizeof lab);
            rb_put(b, "<tr><td>");
            rb_esc(b, name);
            rb_put(b, "</td><td>");
            rb_esc(b, lab);
            rb_printf(b, "</td><td class=\"n\">%.0f</td>",
                      ist_jv_num(ist_jv_get(band, "queries"), 0));
            figure_cell(b, band, "p@1");
            figure_cell(b, band, "p@5");
            figure_cell(b, band, "p@10");
            rb_put(b, "</tr>\n");
        }
    }
    rb_put(b, "</table></section>\n");
}

static void
provenance(rep *r);

static ist_status
check_kind(const ist_jv *root, const char *path, const char *want_format, ist_error *err)
{
    if (ist_jv_type(root) != IST_JOBJ)
        return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(root),
                            "expected a JSON object at the top level");
    if (want_format) {
        const char *f = ist_jv_str(ist_jv_get(root, "format"), NULL);
        if (!f || strcmp(f, want_format) != 0)
            return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(root),
                                "expected \"format\": \"%s\", found %s%s%s", want_format,
                                f ? "\"" : "", f ? f : "none", f ? "\"" : "");
        const ist_jv *runs = ist_jv_get(root, "runs");
        if (runs && ist_jv_type(runs) != IST_JARR)
            return ist_error_at(err, IST_ERR_FORMAT, path, ist_jv_line(runs),
                                "expected \"runs\" to be an array");
    }
    return IST_OK;
}

static void
render(rep *r)
{
    rbuf *b = &r->b;
    const char *cmd = ist_jv_str(ist_jv_get(r->res, "command"), "?");

    rb_put(b, "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n"
              "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
              "<title>isthmus alignment report</title>\n<style>");
    rb_put(b, style);
    rb_put(b, "</style></head>\n<body>\n<header><h1>Alignment report</h1>\n<p class=\"muted\">"
              "From the result of <code>isthmus ");
    rb_esc(b, cmd);
    rb_put(b, "</code>: source <code>");
    rb_esc(b, ist_jv_str(ist_jv_get(ist_jv_get(ist_jv_get(r->res, "inputs"), "source"), "path"),
                         "?"));
    rb_put(b, "</code> mapped onto target <code>");
    rb_esc(b, ist_jv_str(ist_jv_get(ist_jv_get(ist_jv_get(r->res, "inputs"), "target"), "path"),
                         "?"));
    rb_put(b, "</code>, test list <code>");
    rb_esc(b, ist_jv_str(ist_jv_get(ist_jv_get(r->res, "test"), "path"), "?"));
    rb_put(b, "</code>.</p></header>\n<main>\n");
    caution(b);
    headline(r);
    verdict(r);
    bands(r);
    ist_report_diag_sections(b, ist_jv_get(r->res, "diagnostics"), &r->chart_id);
    provenance(r);
    rb_printf(b, "</main>\n<footer class=\"muted\"><p>Made by isthmus %s.</p></footer>\n"
                 "</body></html>\n", ist_version());
}

ist_status
ist_report_write(const ist_result *result, const char *verdict_path, const char *out_path,
                 ist_error *err)
{
    ist_jv *res = NULL, *ver = NULL;
    char *text = NULL;
    rep r;
    ist_status rc;

    memset(&r, 0, sizeof r);
    if ((rc = ist_result_render(result, &text, err)) != IST_OK ||
        (rc = ist_json_parse(text, strlen(text), result->name, &res, err)) != IST_OK)
        goto done;
    if (verdict_path && ((rc = ist_verdict_check_file(verdict_path, result, err)) != IST_OK ||
                         (rc = ist_json_parse_file(verdict_path, &ver, err)) != IST_OK ||
                         (rc = check_kind(ver, verdict_path, NULL, err)) != IST_OK))
        goto done;
    r.res = res;
    r.verdict = ver;
    render(&r);
    if (r.b.failed) {
        rc = ist_error_nomem(err);
        goto done;
    }
    rc = ist_ofile_write_all(out_path, r.b.p, r.b.len, err);
done:
    ist_free(r.b.p);
    ist_result_free_text(text);
    ist_jv_free(res);
    ist_jv_free(ver);
    return rc;
}

/* ---- inputs and provenance ---------------------------------------------- */

static void
kv_row(rbuf *b, const char *key, const ist_jv *v)
{
    rb_put(b, "<tr><th scope=\"row\">");
    rb_esc(b, key);
    rb_put(b, "</th><td><code>");
    if (ist_jv_type(v) == IST_JSTR)
        rb_esc(b, ist_jv_str(v, ""));
    else
        esc_json(b, v);
    rb_put(b, "</code></td></tr>\n");
}

static void
kv_table(rbuf *b, const char *prefix, const ist_jv *obj)
{
    for (size_t i = 0; i < ist_jv_len(obj); i++) {
        char key[160];
        const ist_jv *v = ist_jv_at(obj, i);
        snprintf(key, sizeof key, "%s%s%s", prefix, *prefix ? "." : "", ist_jv_key(obj, i));
        if (ist_jv_type(v) == IST_JOBJ && strlen(key) < 60)
            kv_table(b, key, v);
        else
            kv_row(b, key, v);
    }
}

static void
provenance(rep *r)
{
    rbuf *b = &r->b;
    const ist_jv *test = ist_jv_get(r->res, "test");

    rb_put(b, "<section><h2 id=\"provenance\">Inputs and provenance</h2>\n"
              "<table>\n");
    kv_row(b, "command", ist_jv_get(r->res, "command"));
    kv_row(b, "result format version", ist_jv_get(r->res, "version"));
    kv_table(b, "inputs", ist_jv_get(r->res, "inputs"));
    for (size_t i = 0; i < ist_jv_len(test); i++) {
        char key[96];
        snprintf(key, sizeof key, "test.%s", ist_jv_key(test, i));
        if (ist_jv_type(ist_jv_at(test, i)) == IST_JOBJ)
            kv_table(b, key, ist_jv_at(test, i));
        else
            kv_row(b, key, ist_jv_at(test, i));
    }
    kv_table(b, "options", ist_jv_get(r->res, "options"));
    kv_table(b, "map", ist_jv_get(r->res, "map"));
    rb_put(b, "</table></section>\n");
}

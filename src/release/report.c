/* report.c - the self-contained HTML report of a result (and the gate's verdict on it):
 * the answer first, then how to read the figures, the figures, the diagnostics and how
 * the inputs were made. */
#include <isthmus/report.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <isthmus/isthmus.h>

#include "alloc_int.h"
#include "error_int.h"
#include "ofile_int.h"
#include "report_int.h"

#define MAX_BANDS IST_METRICS_MAX_BANDS
#define DASH "\xe2\x80\x94"

static const char *const style =
    "body{font-family:system-ui,'DejaVu Sans',sans-serif;color:#1c1c1c;background:#fff;"
    "max-width:1100px;margin:0 auto;padding:16px 24px;line-height:1.45}"
    "h1{font-size:1.7em;margin:.2em 0}h2{font-size:1.3em;margin-top:1.6em;"
    "border-bottom:2px solid #1b4f72;padding-bottom:.15em}"
    "table{border-collapse:collapse;margin:.6em 0}th,td{border:1px solid #a6acaf;"
    "padding:3px 8px;text-align:left;vertical-align:top}th{background:#eaf0f5}"
    "td.n{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}"
    ".caution{border:2px solid #7d4e00;background:#fff6e5;padding:8px 12px;margin:12px 0}"
    ".answer{font-size:1.3em;border:3px solid #1b4f72;padding:10px 14px;margin:12px 0}"
    ".headline{font-size:1.15em}.muted{color:#4d5656}"
    ".pass{color:#14532d;background:#e3f4e8;font-weight:bold}"
    ".fail{color:#8b1a1a;background:#fbe4e4;font-weight:bold}"
    ".other{color:#4a3b00;background:#fbf3d0;font-weight:bold}"
    ".badge{display:inline-block;white-space:nowrap;padding:2px 10px;"
    "border:2px solid currentColor;border-radius:4px}"
    "dl.terms dt{font-weight:bold;margin-top:.4em}dl.terms dd{margin-left:1.5em}"
    "svg.chart{max-width:100%;height:auto;font-family:inherit;display:block;margin:.4em 0}"
    ".row{display:flex;flex-wrap:wrap;gap:16px}.row>figure{flex:1 1 460px;margin:0}"
    ".row svg.chart{width:100%}figcaption h3{margin:.3em 0}"
    "code{font-family:'DejaVu Sans Mono',monospace;font-size:.92em;word-break:break-all}"
    "code.rule{word-break:normal}"
    "@media print{body{max-width:none;padding:0;font-size:10pt}h2{break-after:avoid}"
    "section,table,svg{break-inside:avoid}.caution{background:none}"
    "th{background:none}}@page{margin:15mm}";

typedef struct rep {
    rbuf b;
    const ist_result *res;
    const ist_verdict *v;
    const ist_report_opts *o;
    int chart_id;
} rep;

void
ist_report_opts_init(ist_report_opts *o)
{
    memset(o, 0, sizeof *o);
}

void
rb_pct(rbuf *b, double v)
{
    if (isnan(v))
        rb_put(b, DASH);
    else
        rb_printf(b, "%.1f%%", 100 * v);
}

void
rb_pct_iv(rbuf *b, double lo, double hi)
{
    if (!isnan(lo) && !isnan(hi))
        rb_printf(b, " <span class=\"muted\">[%.1f, %.1f]</span>", 100 * lo, 100 * hi);
}

/* A whole number with thousands separated by commas. */
static void
count(rbuf *b, unsigned long long n)
{
    char d[32];
    int len = snprintf(d, sizeof d, "%llu", n);
    for (int i = 0; i < len; i++) {
        if (i && (len - i) % 3 == 0)
            rb_put(b, ",");
        rb_printf(b, "%c", d[i]);
    }
}

/* "refined map": a run's map stage for people. */
static const char *
stage_words(const char *label)
{
    return strcmp(label, "refined") == 0 ? "refined map"
           : strcmp(label, "seed") == 0  ? "seed map (Procrustes)"
                                         : label;
}

/* "refined map, CSLS": the map stage and the retrieval method of a run, for people. */
static void
run_name(const ist_result_run *run, char *buf, size_t cap)
{
    snprintf(buf, cap, "%s, %s", stage_words(run->label ? run->label : ""),
             run->m.method == IST_RETRIEVAL_CSLS ? "CSLS" : "cosine");
}

/* The run the answer quotes: the last CSLS run, else the last run. */
static const ist_result_run *
headline_run(const ist_result *res)
{
    const ist_result_run *pick = NULL;
    for (size_t i = 0; i < res->nruns; i++)
        if (!pick || res->runs[i].m.method == IST_RETRIEVAL_CSLS)
            pick = &res->runs[i];
    return pick;
}

/* p@ist_metrics_k(j) (precision) overall (band < 0) or in a band, with its interval. */
static void
figure_cell(rbuf *b, const ist_result_run *run, int band, size_t j)
{
    size_t q = band < 0 ? run->m.queries : run->m.band[band].queries;
    double p = band < 0 ? run->m.p[j] : run->m.band[band].p[j];
    rb_put(b, "<td class=\"n\">");
    if (q == 0) {
        rb_put(b, DASH "</td>");
        return;
    }
    rb_pct(b, p);
    if (run->has_ci && band < 0)
        rb_pct_iv(b, run->ci.lo[j], run->ci.hi[j]);
    else if (run->has_ci && run->band_has_ci[band])
        rb_pct_iv(b, run->ci.band_lo[band][j], run->ci.band_hi[band][j]);
    rb_put(b, "</td>");
}

static void
caution(rbuf *b)
{
    rb_put(b, "<p class=\"caution\" role=\"note\"><strong>Caution:</strong> the translations and "
              "scores in this report are statistical suggestions. Have them reviewed by a speaker "
              "of the language before they drive anything customer-facing or financial.</p>\n");
}

static const char *
language(const char *name, const char *fallback)
{
    return name && *name ? name : fallback;
}

/* ---- the answer and the verdict ------------------------------------------------- */

/* "p@1 86.8% [83.7, 90.2] (refined map, CSLS) over 441 test words" */
static void
quote_figure(rep *r, const ist_result_run *h)
{
    char name[96];
    run_name(h, name, sizeof name);
    rb_put(&r->b, "p@1 <strong>");
    rb_pct(&r->b, h->m.p[0]);
    rb_put(&r->b, "</strong>");
    if (h->has_ci)
        rb_pct_iv(&r->b, h->ci.lo[0], h->ci.hi[0]);
    rb_put(&r->b, " (");
    rb_esc(&r->b, name);
    rb_put(&r->b, ") over ");
    count(&r->b, h->m.queries);
    rb_put(&r->b, " test words, coverage ");
    rb_pct(&r->b, h->m.coverage);
}

static void
answer(rep *r)
{
    const ist_result_run *h = headline_run(r->res);
    rbuf *b = &r->b;
    size_t fail = r->v ? ist_verdict_tally(r->v, IST_GATE_FAIL) : 0;
    size_t skip = r->v ? ist_verdict_tally(r->v, IST_GATE_SKIP) : 0;
    size_t n = r->v ? ist_verdict_count(r->v) : 0;
    const char *cond0 = r->v ? ist_verdict_condition(r->v, 0) : NULL;

    rb_put(b, "<p class=\"answer\" id=\"answer\">Can we ship these vectors? ");
    if (!r->v)
        rb_put(b, "<span class=\"badge other\">? not decided</span> no gate verdict was given "
                  "(<code>isthmus gate --verdict-out=V.json</code>, then "
                  "<code>isthmus report --verdict=V.json</code>)");
    else if (fail)
        rb_printf(b, "<span class=\"badge fail\">\xe2\x9c\x97 No</span> %zu of %zu release "
                     "rules fail", fail, n);
    else if (cond0)
        rb_printf(b, "<span class=\"badge other\">\xe2\x9c\x93 Yes, with conditions</span> "
                     "%zu of %zu release rules pass, on the conditions below", n - skip, n);
    else
        rb_printf(b, "<span class=\"badge pass\">\xe2\x9c\x93 Yes</span> all %zu release "
                     "rules pass", n);
    if (h) {
        rb_put(b, "; ");
        quote_figure(r, h);
    } else {
        rb_put(b, "; this result holds no scored run");
    }
    rb_put(b, ".</p>\n");
    if (r->v && ist_verdict_condition(r->v, 0)) {
        rb_put(b, "<p class=\"caution\" role=\"note\"><strong>Conditions:</strong> ");
        for (size_t i = 0; ist_verdict_condition(r->v, i); i++) {
            rb_put(b, i ? "; " : "");
            rb_esc(b, ist_verdict_condition(r->v, i));
        }
        rb_put(b, ".");
        for (size_t i = 0; ist_verdict_condition(r->v, i); i++)
            rb_put(b, strncmp(ist_verdict_condition(r->v, i), "leakage", 7) == 0
                          ? " Leakage: the figures overstate how well the map translates words "
                            "it has not seen among its seeds."
                          : " A rule not checked could not be judged on this result (its note "
                            "in the table says why); the gate's 'refuse unchecked' rule makes "
                            "that a failure.");
        rb_put(b, "</p>\n");
    } else if (!r->v && r->res->test.has_overlap && r->res->test.overlap > 0) {
        rb_printf(b, "<p class=\"caution\" role=\"note\"><strong>Conditions:</strong> leakage: "
                     "%zu test source words are also seed source words, so the figures "
                     "overstate how well the map translates new words.</p>\n",
                  r->res->test.overlap);
    }
}

/* A check's run ("refined csls") in the words of the other tables ("refined map, CSLS"). */
static void
run_words(rbuf *b, const char *run)
{
    char stage[48] = "", method[48] = "";
    if (sscanf(run, "%47s %47s", stage, method) != 2) {
        rb_esc(b, run);
        return;
    }
    rb_put(b, stage_words(stage));
    rb_put(b, ", ");
    rb_put(b, strcmp(method, "csls") == 0 ? "CSLS" : strcmp(method, "cosine") == 0 ? "cosine"
                                                                                  : "?");
}

static const char *
outcome_word(ist_gate_outcome o, const char **cls)
{
    *cls = o == IST_GATE_PASS ? "pass" : o == IST_GATE_FAIL ? "fail" : "other";
    if (o == IST_GATE_PASS)
        return "\xe2\x9c\x93 pass";
    return o == IST_GATE_FAIL ? "\xe2\x9c\x97 fail" : "\xe2\x80\x93 not checked";
}

/* The measured figure of a check, for people. */
static void
check_figure(rbuf *b, const ist_gate_check *c)
{
    const ist_gate_rule *u = c->rule;
    if (c->outcome == IST_GATE_SKIP || isnan(c->figure)) {
        rb_put(b, DASH);
    } else if (u->figure == IST_GATE_LEAKAGE || u->figure == IST_GATE_UNCHECKED) {
        rb_printf(b, "%.0f", c->figure);
    } else if (u->figure == IST_GATE_DROP) {
        rb_printf(b, "%+.1f points", 100 * c->figure);
        if (c->has_interval)
            rb_printf(b, " <span class=\"muted\">[%+.1f, %+.1f]</span>", 100 * c->lo,
                      100 * c->hi);
        rb_put(b, "<br><span class=\"muted\">");
        rb_pct(b, c->new_value);
        rb_put(b, " against ");
        rb_pct(b, c->baseline_value);
        rb_put(b, " before</span>");
    } else {
        rb_pct(b, c->figure);
        if (c->has_interval)
            rb_pct_iv(b, c->lo, c->hi);
    }
}

static void
check_bound(rbuf *b, const ist_gate_rule *u)
{
    if (u->figure == IST_GATE_LEAKAGE)
        rb_put(b, "no test word may be a seed");
    else if (u->figure == IST_GATE_UNCHECKED)
        rb_put(b, "every other rule checked");
    else if (u->figure == IST_GATE_DROP)
        rb_printf(b, "fails when the whole interval lies below %.1f points", -100 * u->bound);
    else if (!isnan(u->bound)) {
        rb_put(b, u->bound_kind == IST_GATE_MIN ? "at least " : "at most ");
        rb_pct(b, u->bound);
    }
}

static void
verdict(rep *r)
{
    rbuf *b = &r->b;

    rb_put(b, "<section><h2 id=\"verdict\">Gate verdict</h2>\n");
    if (!r->v) {
        rb_put(b, "<p class=\"muted\">No verdict file was given, so no release rule was checked "
                  "for this report.</p></section>\n");
        return;
    }
    rb_printf(b, "<p>Rules of <code>");
    rb_esc(b, ist_verdict_thresholds(r->v));
    rb_printf(b, "</code>: %zu pass, %zu fail, %zu not checked. Each precision figure has its "
                 "95%% interval beside it in brackets.</p>\n",
              ist_verdict_tally(r->v, IST_GATE_PASS), ist_verdict_tally(r->v, IST_GATE_FAIL),
              ist_verdict_tally(r->v, IST_GATE_SKIP));
    if (ist_verdict_count(r->v) == 0) {
        rb_put(b, "</section>\n");
        return;
    }
    rb_put(b, "<table><tr><th>line</th><th>rule</th><th>run</th><th>measured</th>"
              "<th>bound</th><th>outcome</th></tr>\n");
    for (size_t i = 0; i < ist_verdict_count(r->v); i++) {
        const ist_gate_check *c = ist_verdict_check(r->v, i);
        const char *cls, *word = outcome_word(c->outcome, &cls);
        rb_printf(b, "<tr><td class=\"n\">%zu</td><td><code class=\"rule\">", c->rule->line);
        rb_esc(b, c->rule->text);
        rb_put(b, "</code>");
        if (c->note[0]) {
            rb_put(b, "<br><span class=\"muted\">");
            rb_esc(b, c->note);
            rb_put(b, "</span>");
        }
        rb_put(b, "</td><td>");
        run_words(b, c->run);
        rb_put(b, "</td><td class=\"n\">");
        check_figure(b, c);
        rb_put(b, "</td><td>");
        check_bound(b, c->rule);
        rb_printf(b, "</td><td><span class=\"badge %s\">%s</span></td></tr>\n", cls, word);
    }
    rb_put(b, "</table></section>\n");
}

/* ---- how to read it -------------------------------------------------------------- */

static void
glossary(rep *r)
{
    rb_put(&r->b,
           "<section><h2 id=\"reading\">How to read this report</h2>\n<dl class=\"terms\">\n"
           "<dt>p@1, p@5, p@10 (precision@k)</dt><dd>The share of test words whose right "
           "translation "
           "(a gold target of the test list) is the first, or among the first 5 or 10, of all "
           "target words the map ranks for it.</dd>\n"
           "<dt>Interval</dt><dd>The bracketed range beside a figure is its 95% percentile "
           "bootstrap interval over the test words (Efron and Tibshirani 1993): how far the "
           "figure could move with another test list of the same size drawn from the same "
           "kind of words.</dd>\n"
           "<dt>Coverage</dt><dd>The share of the test list's source words that are in both "
           "vector files; only covered words are scored.</dd>\n"
           "<dt>Cosine and CSLS</dt><dd>Two ways to rank target words: cosine similarity "
           "alone, or CSLS (cross-domain similarity local scaling, Conneau et al. 2018), "
           "which lowers the score of target words that are near to everything so that they "
           "do not crowd out the right answer.</dd>\n"
           "<dt>Seed map and refined map</dt><dd>The seed map is the rotation fitted "
           "(orthogonal Procrustes) on the seed word list alone; the refined map is fitted "
           "again on the pairs it finds itself among frequent words, which usually helps.</dd>\n"
           "<dt>Frequency band</dt><dd>Test words grouped by how frequent their source word is "
           "(rank 1 is the most frequent); rare words are usually translated worse.</dd>\n"
           "<dt>Gate</dt><dd>The release rules (a thresholds file) checked against these "
           "figures; a rule on a precision passes when the figure meets its bound.</dd>\n"
           "</dl></section>\n");
}

/* ---- figures ---------------------------------------------------------------------- */

static void
runs_table(rep *r)
{
    rbuf *b = &r->b;

    rb_put(b, "<section><h2 id=\"headline\">Headline figures</h2>\n");
    if (r->res->nruns == 0) {
        rb_put(b, "<p>This result holds no scored run.</p></section>\n");
        return;
    }
    rb_put(b, "<p>Every scored run: each map stage with each ranking. Bracketed: the 95% "
              "interval.</p>\n<table><tr><th>map, ranking</th><th>test words scored</th>"
              "<th>coverage</th><th>p@1</th><th>p@5</th><th>p@10</th>"
              "</tr>\n");
    for (size_t i = 0; i < r->res->nruns; i++) {
        const ist_result_run *run = &r->res->runs[i];
        char name[96];
        run_name(run, name, sizeof name);
        rb_put(b, "<tr><td>");
        rb_esc(b, name);
        rb_put(b, "</td><td class=\"n\">");
        count(b, run->m.queries);
        rb_put(b, "</td><td class=\"n\">");
        rb_pct(b, run->m.coverage);
        rb_put(b, "</td>");
        for (size_t j = 0; j < IST_METRICS_NK; j++)
            figure_cell(b, run, -1, j);
        rb_put(b, "</tr>\n");
    }
    rb_put(b, "</table></section>\n");
}

static void
band_chart(rep *r, size_t j, size_t nb, const size_t *keep, const char *const *cats)
{
    double v[RS_MAX_SERIES][MAX_BANDS], lo[RS_MAX_SERIES][MAX_BANDS], hi[RS_MAX_SERIES][MAX_BANDS];
    char names[RS_MAX_SERIES][96], title[96], key[24];
    rseries s[RS_MAX_SERIES];
    size_t ns = 0, nr = r->res->nruns;

    /* at most four series: the last four runs (the refined ones come last) */
    for (size_t i = nr > RS_MAX_SERIES ? nr - RS_MAX_SERIES : 0; i < nr; i++, ns++) {
        const ist_result_run *run = &r->res->runs[i];
        for (size_t c = 0; c < nb; c++) {
            const ist_band *band = &run->m.band[keep[c]];
            bool has = keep[c] < run->m.nbands && band->queries > 0;
            v[ns][c] = has ? band->p[j] : NAN;
            bool ci = has && run->has_ci && run->band_has_ci[keep[c]];
            lo[ns][c] = ci ? run->ci.band_lo[keep[c]][j] : NAN;
            hi[ns][c] = ci ? run->ci.band_hi[keep[c]][j] : NAN;
        }
        run_name(run, names[ns], sizeof names[ns]);
        s[ns] = (rseries){names[ns], v[ns], lo[ns], hi[ns]};
    }
    snprintf(key, sizeof key, "p@%zu", ist_metrics_k(j));
    snprintf(title, sizeof title, "p@%zu by frequency band", ist_metrics_k(j));
    rchart c = {.id = ++r->chart_id, .title = title,
                .desc = "Grouped bars, one group per frequency band of the source words, one bar "
                        "per run; black whiskers show the 95% interval where the result has "
                        "one. The table below gives the same figures.",
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
    char cats_buf[MAX_BANDS][48];
    const char *cats[MAX_BANDS];
    size_t nb = 0, keep[MAX_BANDS], nk = 0;
    rbuf *b = &r->b;

    rb_put(b, "<section><h2 id=\"bands\">Precision by frequency band</h2>\n");
    for (size_t i = 0; i < r->res->nruns; i++)
        nb = r->res->runs[i].m.nbands > nb ? r->res->runs[i].m.nbands : nb;
    if (nb == 0) {
        rb_put(b, "<p>The result has no bands.</p></section>\n");
        return;
    }
    for (size_t j = 0; j < nb; j++) {
        const ist_band *first = NULL;
        for (size_t i = 0; i < r->res->nruns; i++)
            if (j < r->res->runs[i].m.nbands && r->res->runs[i].m.band[j].queries > 0)
                first = first ? first : &r->res->runs[i].m.band[j];
        if (!first)
            continue;
        ist_band_label(first->lo, first->hi, EN_DASH, cats_buf[nk], sizeof cats_buf[nk]);
        cats[nk] = cats_buf[nk];
        keep[nk++] = j;
    }
    rb_put(b, "<p>Precision of the test words grouped by the frequency rank of their source "
              "word; ");
    if (nk == nb)
        rb_printf(b, "all %zu bands hold test words.</p>\n", nb);
    else
        rb_printf(b, "%zu of %zu bands hold test words, the others are left out.</p>\n", nk, nb);
    rb_put(b, "<div class=\"row\">");
    band_chart(r, 0, nk, keep, cats);
    band_chart(r, 2, nk, keep, cats);
    rb_put(b, "</div>\n<table><tr><th>map, ranking</th><th>frequency rank</th>"
              "<th>test words</th><th>p@1</th><th>p@5</th><th>p@10</th>"
              "</tr>\n");
    for (size_t i = 0; i < r->res->nruns; i++) {
        const ist_result_run *run = &r->res->runs[i];
        char name[96], lab[48];
        run_name(run, name, sizeof name);
        for (size_t j = 0; j < run->m.nbands; j++) {
            if (run->m.band[j].queries == 0)
                continue;
            ist_band_label(run->m.band[j].lo, run->m.band[j].hi, EN_DASH, lab, sizeof lab);
            rb_put(b, "<tr><td>");
            rb_esc(b, name);
            rb_put(b, "</td><td>");
            rb_esc(b, lab);
            rb_put(b, "</td><td class=\"n\">");
            count(b, run->m.band[j].queries);
            rb_put(b, "</td>");
            for (size_t k = 0; k < IST_METRICS_NK; k++)
                figure_cell(b, run, (int)j, k);
            rb_put(b, "</tr>\n");
        }
    }
    rb_put(b, "</table></section>\n");
}

/* ---- provenance ---------------------------------------------------------------------- */

static void
prov_row(rbuf *b, const char *what, const char *src, const char *tgt, bool code)
{
    rb_put(b, "<tr><th scope=\"row\">");
    rb_esc(b, what);
    rb_put(b, "</th>");
    for (int i = 0; i < 2; i++) {
        const char *t = i ? tgt : src;
        rb_put(b, "<td>");
        if (!t || !*t)
            rb_put(b, "<span class=\"muted\">not recorded</span>");
        else {
            rb_put(b, code ? "<code>" : "");
            rb_esc(b, t);
            rb_put(b, code ? "</code>" : "");
        }
        rb_put(b, "</td>");
    }
    rb_put(b, "</tr>\n");
}

static void
prov_count_row(rbuf *b, const char *what, const rprov *p)
{
    rb_put(b, "<tr><th scope=\"row\">");
    rb_esc(b, what);
    rb_put(b, "</th>");
    for (int i = 0; i < 2; i++) {
        rb_put(b, "<td>");
        if (p[i].tokens) {
            count(b, p[i].tokens);
            rb_put(b, " tokens, ");
            count(b, p[i].types);
            rb_put(b, " words kept");
        } else {
            rb_put(b, "<span class=\"muted\">not recorded</span>");
        }
        rb_put(b, "</td>");
    }
    rb_put(b, "</tr>\n");
}

static void
inputs_table(rep *r)
{
    const ist_result *res = r->res;
    rbuf *b = &r->b;
    rprov p[2];
    char fp[2][17] = {"", ""}, dim[2][24] = {"", ""};

    ist_report_read_provenance(res->source.provenance, &p[0]);
    ist_report_read_provenance(res->target.provenance, &p[1]);
    if (res->source.has_fingerprint)
        ist_result_hex(res->source.fingerprint, fp[0]);
    if (res->target.has_fingerprint)
        ist_result_hex(res->target.fingerprint, fp[1]);
    for (int i = 0; i < 2; i++)
        if (p[i].dimension)
            snprintf(dim[i], sizeof dim[i], "%zu", p[i].dimension);
    rb_put(b, "<section><h2 id=\"provenance\">Inputs and provenance</h2>\n"
              "<p>How the two vector files were made, as each file records it.</p>\n"
              "<table><tr><th></th><th>source vectors</th><th>target vectors</th></tr>\n");
    prov_row(b, "language", language(r->o->source_language, NULL),
             language(r->o->target_language, NULL), false);
    prov_row(b, "file", res->source.path, res->target.path, true);
    prov_row(b, "fingerprint", fp[0], fp[1], true);
    prov_row(b, "method", p[0].method, p[1].method, false);
    prov_row(b, "dimension", dim[0], dim[1], false);
    prov_row(b, "corpus", p[0].corpus, p[1].corpus, true);
    prov_count_row(b, "corpus size", p);
    prov_row(b, "passes over the corpus", p[0].passes, p[1].passes, false);
    prov_row(b, "random seed", p[0].seed, p[1].seed, false);
    prov_row(b, "text normalisation", p[0].text, p[1].text, false);
    prov_row(b, "made by", p[0].producer, p[1].producer, false);
    rb_put(b, "</table>\n");
}

static void
kv(rbuf *b, const char *what, const char *text, bool code)
{
    rb_put(b, "<tr><th scope=\"row\">");
    rb_esc(b, what);
    rb_put(b, "</th><td>");
    rb_put(b, code ? "<code>" : "");
    rb_esc(b, text && *text ? text : DASH);
    rb_put(b, code ? "</code>" : "");
    rb_put(b, "</td></tr>\n");
}

static void
run_table(rep *r)
{
    const ist_result *res = r->res;
    const ist_result_test *t = &res->test;
    rbuf *b = &r->b;
    char s[256], hex[17];

    rb_put(b, "<p>The scoring run.</p>\n<table>\n");
    snprintf(s, sizeof s, "isthmus %s", res->command ? res->command : "?");
    kv(b, "command", s, true);
    kv(b, "map", res->map_path, true);
    if (res->seeds.has_checksum) {
        ist_result_hex(res->seeds.checksum, hex);
        snprintf(s, sizeof s, "%s (checksum %s)",
                 res->seeds.label ? res->seeds.label : "the map's seeds", hex);
        kv(b, "seed list", s, true);
    }
    if (t->present) {
        kv(b, "test list", t->list.label ? t->list.label : t->list.path, true);
        if (t->has_coverage) {
            snprintf(s, sizeof s, "%zu pairs read, %zu kept; %zu source words, %zu of them in "
                                  "both vector files",
                     t->coverage.read, t->coverage.kept, t->coverage.sources_read,
                     t->coverage.sources_kept);
            kv(b, "test pairs", s, false);
        }
        if (t->has_overlap) {
            snprintf(s, sizeof s, "%zu test source words are also seeds%s", t->overlap,
                     t->overlap_allowed ? " (scored with the overlap allowed)" : "");
            kv(b, "leakage", s, false);
        }
    }
    if (res->options.present) {
        const ist_result_options *o = &res->options;
        snprintf(s, sizeof s, "%s%s%s; CSLS over %zu neighbours",
                 o->methods & IST_RESULT_COSINE ? "cosine" : "",
                 o->methods == (IST_RESULT_COSINE | IST_RESULT_CSLS) ? " and " : "",
                 o->methods & IST_RESULT_CSLS ? "CSLS" : "", o->neighbourhood);
        kv(b, "ranking", s, false);
    }
    if (res->nruns) {
        const ist_metrics *m = &res->runs[0].m;
        size_t n = 0;
        s[0] = 0;
        for (size_t i = 0; i < m->nbands && n < sizeof s; i++) {
            char lab[48];
            ist_band_label(m->band[i].lo, m->band[i].hi, EN_DASH, lab, sizeof lab);
            n += (size_t)snprintf(s + n, sizeof s - n, "%s%s", i ? ", " : "", lab);
        }
        kv(b, "frequency bands (ranks)", s, false);
    }
    for (size_t i = 0; i < res->nruns; i++)
        if (res->runs[i].has_ci) {
            const ist_ci_opts *c = &res->runs[i].ci_opts;
            snprintf(s, sizeof s, "%.0f%% percentile bootstrap, %zu resamples, seed %llu",
                     100 * c->level, c->resamples, (unsigned long long)c->seed);
            kv(b, "intervals", s, false);
            break;
        }
    rb_put(b, "</table></section>\n");
}

/* ---- the page ------------------------------------------------------------------------ */

static void
render(rep *r)
{
    rbuf *b = &r->b;
    const char *sl = language(r->o->source_language, "source"),
               *tl = language(r->o->target_language, "target");

    rb_put(b, "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n"
              "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
              "<title>isthmus alignment report</title>\n<style>");
    rb_put(b, style);
    rb_put(b, "</style></head>\n<body>\n<header><h1>Alignment report: ");
    rb_esc(b, sl);
    rb_put(b, " \xe2\x86\x92 ");
    rb_esc(b, tl);
    rb_put(b, "</h1>\n<p class=\"muted\">The map from <code>");
    rb_esc(b, r->res->source.path ? r->res->source.path : "?");
    rb_put(b, "</code> onto <code>");
    rb_esc(b, r->res->target.path ? r->res->target.path : "?");
    rb_put(b, "</code>, scored on <code>");
    rb_esc(b, r->res->test.list.label ? r->res->test.list.label
                                      : r->res->test.list.path ? r->res->test.list.path : "?");
    rb_put(b, "</code>.</p></header>\n<main>\n");
    answer(r);
    caution(b);
    verdict(r);
    glossary(r);
    runs_table(r);
    bands(r);
    ist_report_diag_sections(b, r->res->diagnostics, &r->chart_id);
    inputs_table(r);
    run_table(r);
    rb_printf(b, "</main>\n<footer class=\"muted\"><p>Made by isthmus %s.</p></footer>\n"
                 "</body></html>\n", ist_version());
}

ist_status
ist_report_write(const ist_result *result, const ist_verdict *verdict,
                 const ist_report_opts *opts, const char *out_path, ist_error *err)
{
    ist_report_opts dflt;
    rep r;
    ist_status rc;

    if (!opts) {
        ist_report_opts_init(&dflt);
        opts = &dflt;
    }
    memset(&r, 0, sizeof r);
    r.res = result;
    r.v = verdict;
    r.o = opts;
    render(&r);
    if (r.b.failed)
        rc = ist_error_nomem(err);
    else
        rc = ist_ofile_write_all(out_path, r.b.p, r.b.len, err);
    ist_free(r.b.p);
    return rc;
}

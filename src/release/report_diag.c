/* report_diag.c - the report's diagnostics sections: gold vs random
 * similarity, hubness, isometry and the worst misses. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "json_int.h"
#include "report_int.h"

#define SIM_MAX 64
#define OCC_MAX 32
#define HUBS_SHOWN 10

static size_t
counts(const ist_jv *a, double *v, size_t cap, double *total)
{
    size_t n = ist_jv_len(a) < cap ? ist_jv_len(a) : cap;
    *total = 0;
    for (size_t i = 0; i < n; i++) {
        v[i] = ist_jv_num(ist_jv_at(a, i), 0);
        *total += v[i];
    }
    return n;
}

static void
similarity(rbuf *b, const ist_jv *sim, int *id)
{
    const ist_jv *edges = ist_jv_get(sim, "bins");
    double g[SIM_MAX], rnd[SIM_MAX], tg, tr;
    char lab[SIM_MAX][24], gname[64], rname[64];
    const char *cats[SIM_MAX];
    size_t ng = counts(ist_jv_get(sim, "gold"), g, SIM_MAX, &tg);
    size_t nr = counts(ist_jv_get(sim, "random"), rnd, SIM_MAX, &tr);
    size_t n = ng < nr ? ng : nr, lo = n, hi = 0;

    rb_put(b, "<section><h2 id=\"similarity\">Similarity of gold and random pairs</h2>\n");
    if (n == 0 || ist_jv_len(edges) < n + 1 || tg <= 0 || tr <= 0) {
        rb_put(b, "<p>No similarity histogram in this result.</p></section>\n");
        return;
    }
    for (size_t i = 0; i < n; i++)
        if (g[i] > 0 || rnd[i] > 0) {
            lo = i < lo ? i : lo;
            hi = i;
        }
    for (size_t i = lo; i <= hi; i++) {
        double e0 = ist_jv_num(ist_jv_at(edges, i), 0);
        snprintf(lab[i - lo], sizeof lab[i - lo], "%.1f", fabs(e0) < 1e-9 ? 0.0 : e0);
        cats[i - lo] = lab[i - lo];
        g[i - lo] = g[i] / tg;
        rnd[i - lo] = rnd[i] / tr;
    }
    snprintf(gname, sizeof gname, "gold pairs (%.0f)", tg);
    snprintf(rname, sizeof rname, "random pairs (%.0f)", tr);
    rseries s[2] = {{gname, g, NULL, NULL}, {rname, rnd, NULL, NULL}};
    rb_printf(b, "<p>Cosine after mapping of each gold test pair, against random pairs of a test "
                 "source word and any target word. Mean: gold %.3f, random %.3f. The further "
                 "apart the two humps, the better the map separates translations from "
                 "unrelated words.</p>\n",
              ist_jv_num(ist_jv_get(sim, "gold_mean"), NAN),
              ist_jv_num(ist_jv_get(sim, "random_mean"), NAN));
    rchart c = {.id = ++*id, .title = "Cosine of gold pairs and of random pairs",
                .desc = "Share of each kind of pair per cosine interval; gold pairs solid, random "
                        "pairs hatched.",
                .ylabel = "share of pairs",
                .xlabel = "cosine after mapping (each bar: from this value up to the next)",
                .cats = cats,
                .ncat = hi - lo + 1, .s = s, .ns = 2, .percent = true,
                .labels = hi - lo + 1 <= 8};
    rs_bars(b, &c);
    rb_put(b, "</section>\n");
}

static void
hub_table(rbuf *b, const ist_jv *hub)
{
    const ist_jv *hc = ist_jv_get(ist_jv_get(hub, "cosine"), "top_hubs");
    const ist_jv *hs = ist_jv_get(ist_jv_get(hub, "csls"), "top_hubs");
    size_t n = ist_jv_len(hc) > ist_jv_len(hs) ? ist_jv_len(hc) : ist_jv_len(hs);

    if (n == 0)
        return;
    n = n < HUBS_SHOWN ? n : HUBS_SHOWN;
    rb_put(b, "<table><caption class=\"muted\">Targets found most often among the queries' "
              "best k</caption>\n<tr><th>#</th><th>cosine: target</th><th>k-occurrence</th>"
              "<th>CSLS: target</th><th>k-occurrence</th></tr>\n");
    for (size_t i = 0; i < n; i++) {
        rb_printf(b, "<tr><td class=\"n\">%zu</td>", i + 1);
        for (int m = 0; m < 2; m++) {
            const ist_jv *e = ist_jv_at(m ? hs : hc, i);
            rb_put(b, "<td>");
            rb_esc(b, ist_jv_str(ist_jv_get(e, "word"), ""));
            rb_put(b, "</td><td class=\"n\">");
            if (e)
                rb_printf(b, "%.0f", ist_jv_num(ist_jv_get(e, "k_occurrence"), 0));
            rb_put(b, "</td>");
        }
        rb_put(b, "</tr>\n");
    }
    rb_put(b, "</table>\n");
}

static void
hubness(rbuf *b, const ist_jv *hub, int *id)
{
    double v[2][OCC_MAX];
    char lab[OCC_MAX][24];
    const char *cats[OCC_MAX];
    size_t n = 0;

    rb_put(b, "<section><h2 id=\"hubness\">Hubness</h2>\n");
    if (!hub) {
        rb_put(b, "<p>No hubness figures in this result.</p></section>\n");
        return;
    }
    rb_printf(b, "<p>Each of the %.0f most frequent source words asks for its %.0f best targets "
                 "among %.0f; the k-occurrence of a target is how often it is among them. A "
                 "few targets found far more often than the rest (hubs) crowd out the right "
                 "answers; a skewness near 0 means few hubs. Skewness of the k-occurrence: "
                 "cosine <strong>%.2f</strong>, CSLS <strong>%.2f</strong>.</p>\n",
              ist_jv_num(ist_jv_get(hub, "queries"), 0), ist_jv_num(ist_jv_get(hub, "k"), 0),
              ist_jv_num(ist_jv_get(hub, "targets"), 0),
              ist_jv_num(ist_jv_get(ist_jv_get(hub, "cosine"), "skewness"), NAN),
              ist_jv_num(ist_jv_get(ist_jv_get(hub, "csls"), "skewness"), NAN));
    for (int m = 0; m < 2; m++) {
        const ist_jv *d = ist_jv_get(ist_jv_get(hub, m ? "csls" : "cosine"), "distribution");
        double total = 0;
        size_t k = ist_jv_len(d) < OCC_MAX ? ist_jv_len(d) : OCC_MAX;
        for (size_t i = 0; i < k; i++)
            total += ist_jv_num(ist_jv_get(ist_jv_at(d, i), "targets"), 0);
        for (size_t i = 0; i < k; i++) {
            const ist_jv *e = ist_jv_at(d, i), *to = ist_jv_get(e, "to");
            double from = ist_jv_num(ist_jv_get(e, "from"), 0);
            v[m][i] = total > 0 ? ist_jv_num(ist_jv_get(e, "targets"), 0) / total : 0;
            if (m == 0) {
                if (ist_jv_type(to) != IST_JNUM)
                    snprintf(lab[i], sizeof lab[i], "%.0f+", from);
                else if (ist_jv_num(to, 0) == from)
                    snprintf(lab[i], sizeof lab[i], "%.0f", from);
                else
                    snprintf(lab[i], sizeof lab[i], "%.0f\xe2\x80\x93%.0f", from,
                             ist_jv_num(to, 0));
                cats[i] = lab[i];
            }
        }
        n = m == 0 ? k : (k < n ? k : n);
    }
    if (n) {
        rseries s[2] = {{"cosine", v[0], NULL, NULL}, {"CSLS", v[1], NULL, NULL}};
        rchart c = {.id = ++*id, .title = "Distribution of the k-occurrence of target words",
                    .desc = "Share of target words per k-occurrence interval under cosine "
                            "(solid) and CSLS (hatched) retrieval.",
                    .ylabel = "share of target words", .xlabel = "k-occurrence", .cats = cats,
                    .ncat = n, .s = s, .ns = 2, .percent = true, .labels = true};
        rs_bars(b, &c);
    }
    hub_table(b, hub);
    rb_put(b, "</section>\n");
}

static void
isometry(rbuf *b, const ist_jv *iso)
{
    rb_put(b, "<section><h2 id=\"isometry\">Isometry</h2>\n");
    if (!iso) {
        rb_put(b, "<p>No isometry figure in this result.</p></section>\n");
        return;
    }
    rb_printf(b, "<p class=\"headline\">Eigenvector similarity: <strong>%.4g</strong> "
                 "<span class=\"muted\">(%.0f most frequent words per side, %.0f neighbours, "
                 "%.0f eigenvalues compared)</span></p>\n",
              ist_jv_num(ist_jv_get(iso, "eigenvector_similarity"), NAN),
              ist_jv_num(ist_jv_get(iso, "top_n"), 0), ist_jv_num(ist_jv_get(iso, "graph_k"), 0),
              ist_jv_num(ist_jv_get(iso, "eigenvalues_compared"), 0));
    rb_put(b, "<p>How to read it: ");
    rb_esc(b, ist_jv_str(ist_jv_get(iso, "note"), ""));
    rb_put(b, ". Lower is better: a high value warns that the two spaces may not be alignable "
              "by a rotation. Compare it between runs on the same number of words.</p>\n"
              "</section>\n");
}

static void
misses(rbuf *b, const ist_jv *diag)
{
    const ist_jv *ms = ist_jv_get(diag, "worst_misses");

    rb_put(b, "<section><h2 id=\"misses\">Worst misses</h2>\n");
    if (ist_jv_type(ms) != IST_JARR || ist_jv_len(ms) == 0) {
        rb_put(b, "<p>No misses listed in this result.</p></section>\n");
        return;
    }
    rb_printf(b, "<p>Test words whose gold translation was not ranked first (%s retrieval): "
                 "%.0f of %.0f; those the map was most sure about come first, gold translations "
                 "outside the top 10 before the rest.</p>\n",
              ist_jv_str(ist_jv_get(diag, "misses_retrieval"), "CSLS"),
              ist_jv_num(ist_jv_get(diag, "misses_total"), (double)ist_jv_len(ms)),
              ist_jv_num(ist_jv_get(diag, "misses_queries"), NAN));
    rb_put(b, "<table><tr><th>source word</th><th>gold translation</th>"
              "<th>ranked first instead</th><th>its score</th><th>gold&#39;s rank</th></tr>\n");
    for (size_t i = 0; i < ist_jv_len(ms); i++) {
        const ist_jv *m = ist_jv_at(ms, i), *gold = ist_jv_get(m, "gold");
        double rank = ist_jv_num(ist_jv_get(m, "gold_rank"), 0);
        rb_put(b, "<tr><td>");
        rb_esc(b, ist_jv_str(ist_jv_get(m, "source"), ""));
        rb_put(b, "</td><td>");
        for (size_t g = 0; g < ist_jv_len(gold); g++) {
            if (g)
                rb_put(b, ", ");
            rb_esc(b, ist_jv_str(ist_jv_at(gold, g), ""));
        }
        rb_put(b, "</td><td>");
        rb_esc(b, ist_jv_str(ist_jv_get(m, "ranked"), ""));
        rb_printf(b, "</td><td class=\"n\">%.3f</td><td class=\"n\">",
                  ist_jv_num(ist_jv_get(m, "score"), NAN));
        if (rank >= 1)
            rb_printf(b, "%.0f", rank);
        else
            rb_put(b, "not in top 10");
        rb_put(b, "</td></tr>\n");
    }
    rb_put(b, "</table></section>\n");
}

void
ist_report_diag_sections(rbuf *b, const ist_jv *diag, int *chart_id)
{
    if (!diag) {
        rb_put(b, "<section><h2 id=\"diagnostics\">Diagnostics</h2>\n<p>This result has no "
                  "diagnostics (it was scored with --no-diagnostics or by an older "
                  "isthmus).</p></section>\n");
        return;
    }
    similarity(b, ist_jv_get(diag, "similarity"), chart_id);
    hubness(b, ist_jv_get(diag, "hubness"), chart_id);
    isometry(b, ist_jv_get(diag, "isometry"));
    misses(b, diag);
}

/* report_diag.c - the report's diagnostics sections: gold vs random
 * similarity, hubness, isometry and the worst misses. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <isthmus/diag.h>
#include <isthmus/metrics.h>

#include "report_int.h"

#define HUBS_SHOWN 10

static void
similarity(rbuf *b, const ist_diag_summary *s, int *id)
{
    double g[IST_DIAG_SIM_BINS], rnd[IST_DIAG_SIM_BINS], tg = 0, tr = 0;
    char lab[IST_DIAG_SIM_BINS][24], gname[64], rname[64];
    const char *cats[IST_DIAG_SIM_BINS];
    size_t lo = IST_DIAG_SIM_BINS, hi = 0;

    rb_put(b, "<section><h2 id=\"similarity\">Similarity of gold and random pairs</h2>\n");
    for (size_t i = 0; i < IST_DIAG_SIM_BINS; i++) {
        tg += (double)s->gold_hist[i];
        tr += (double)s->random_hist[i];
        if (s->gold_hist[i] || s->random_hist[i]) {
            lo = i < lo ? i : lo;
            hi = i;
        }
    }
    if (tg <= 0 || tr <= 0) {
        rb_put(b, "<p>No similarity histogram in this result.</p></section>\n");
        return;
    }
    for (size_t i = lo; i <= hi; i++) {
        double e0 = -1.0 + 0.1 * (double)i;
        snprintf(lab[i - lo], sizeof lab[i - lo], "%.1f", fabs(e0) < 1e-9 ? 0.0 : e0);
        cats[i - lo] = lab[i - lo];
        g[i - lo] = (double)s->gold_hist[i] / tg;
        rnd[i - lo] = (double)s->random_hist[i] / tr;
    }
    snprintf(gname, sizeof gname, "gold pairs (%.0f)", tg);
    snprintf(rname, sizeof rname, "random pairs (%.0f)", tr);
    rseries ser[2] = {{gname, g, NULL, NULL}, {rname, rnd, NULL, NULL}};
    rb_printf(b, "<p>The cosine after mapping of each gold test pair, against random pairs of "
                 "a test source word and any target word: the further apart the two humps, "
                 "the better the map tells translations from unrelated words. Mean cosine: "
                 "gold <strong>%.2f</strong>, random <strong>%.2f</strong>.</p>\n",
              fabs(s->gold_mean) < 0.005 ? 0.0 : s->gold_mean,
              fabs(s->random_mean) < 0.005 ? 0.0 : s->random_mean);
    rchart c = {.id = ++*id, .title = "Cosine of gold pairs and of random pairs",
                .desc = "Share of each kind of pair per cosine interval; gold pairs solid, random "
                        "pairs hatched.",
                .ylabel = "share of pairs",
                .xlabel = "cosine after mapping (each bar: from this value up to the next)",
                .cats = cats, .ncat = hi - lo + 1, .s = ser, .ns = 2, .percent = true,
                .labels = hi - lo + 1 <= 8};
    rs_bars(b, &c);
    rb_put(b, "</section>\n");
}

static void
hub_table(rbuf *b, const ist_diag *d, const ist_diag_summary *s)
{
    size_t n = s->hubs[0] > s->hubs[1] ? s->hubs[0] : s->hubs[1];

    if (n == 0)
        return;
    n = n < HUBS_SHOWN ? n : HUBS_SHOWN;
    rb_put(b, "<table><caption class=\"muted\">The target words found most often among the "
              "queries' best k</caption>\n<tr><th>#</th><th>cosine: target</th>"
              "<th>k-occurrence</th><th>CSLS: target</th><th>k-occurrence</th></tr>\n");
    for (size_t i = 0; i < n; i++) {
        rb_printf(b, "<tr><td class=\"n\">%zu</td>", i + 1);
        for (int m = 0; m < 2; m++) {
            uint32_t occ = 0;
            const char *w = ist_diag_hub(d, m ? IST_RETRIEVAL_CSLS : IST_RETRIEVAL_COSINE, i,
                                         &occ);
            rb_put(b, "<td>");
            rb_esc(b, w);
            rb_put(b, "</td><td class=\"n\">");
            if (w)
                rb_printf(b, "%u", (unsigned)occ);
            rb_put(b, "</td>");
        }
        rb_put(b, "</tr>\n");
    }
    rb_put(b, "</table>\n");
    if (!s->hub_numbers)
        rb_printf(b, "<p class=\"muted\">Number-shaped words and codes (prices, order numbers, "
                     "sizes such as 40cm) are left out of this list: %zu under cosine and %zu "
                     "under CSLS were found more often than the last word listed. "
                     "<code>isthmus score --hubs-with-numbers</code> lists them; the skewness "
                     "and the chart count every target word.</p>\n",
                  s->hubs_left_out[0], s->hubs_left_out[1]);
}

static void
occ_label(const ist_diag_summary *s, size_t i, char *buf, size_t cap)
{
    bool last = i + 1 == IST_DIAG_OCC_BINS;   /* only the last bin is open-ended */
    size_t from = s->occ_from[i], to = last ? 0 : s->occ_from[i + 1] - 1;
    if (!last && to == from)                  /* the first bin is 0 alone, not "0+" */
        snprintf(buf, cap, "%zu", from);
    else
        ist_band_label(from, to, EN_DASH, buf, cap);
}

static void
hubness(rbuf *b, const ist_diag *d, const ist_diag_summary *s, int *id)
{
    double v[2][IST_DIAG_OCC_BINS];
    char lab[IST_DIAG_OCC_BINS][24];
    const char *cats[IST_DIAG_OCC_BINS];

    rb_put(b, "<section><h2 id=\"hubness\">Hubness</h2>\n");
    if (s->queries == 0) {
        rb_put(b, "<p>No hubness figures in this result.</p></section>\n");
        return;
    }
    rb_printf(b, "<p>Each of the %zu most frequent source words asks for its %zu best targets "
                 "among %zu; the k-occurrence of a target is how often it is among them. A "
                 "few targets found far more often than the rest (hubs) crowd out the right "
                 "answers; the skewness of the k-occurrence measures that (Radovanovi\xc4\x87 "
                 "et al. 2010), and near 0 means few hubs. Skewness: cosine "
                 "<strong>%.2f</strong>, CSLS <strong>%.2f</strong>.</p>\n",
              s->queries, s->k, s->targets, s->skewness[0], s->skewness[1]);
    double total[2] = {0, 0};
    for (int m = 0; m < 2; m++)
        for (size_t i = 0; i < IST_DIAG_OCC_BINS; i++)
            total[m] += (double)s->occ_hist[m][i];
    if (total[0] > 0 && total[1] > 0) {
        for (size_t i = 0; i < IST_DIAG_OCC_BINS; i++) {
            for (int m = 0; m < 2; m++)
                v[m][i] = (double)s->occ_hist[m][i] / total[m];
            occ_label(s, i, lab[i], sizeof lab[i]);
            cats[i] = lab[i];
        }
        rseries ser[2] = {{"cosine", v[0], NULL, NULL}, {"CSLS", v[1], NULL, NULL}};
        rchart c = {.id = ++*id, .title = "Distribution of the k-occurrence of target words",
                    .desc = "Share of target words per k-occurrence interval under cosine "
                            "(solid) and CSLS (hatched) ranking.",
                    .ylabel = "share of target words", .xlabel = "k-occurrence", .cats = cats,
                    .ncat = IST_DIAG_OCC_BINS, .s = ser, .ns = 2, .percent = true,
                    .labels = true};
        rs_bars(b, &c);
    }
    hub_table(b, d, s);
    rb_put(b, "</section>\n");
}

static void
isometry(rbuf *b, const ist_diag_summary *s)
{
    rb_put(b, "<section><h2 id=\"isometry\">Isometry</h2>\n");
    if (s->isometry < 0) {
        rb_put(b, "<p>No isometry figure in this result.</p></section>\n");
        return;
    }
    rb_printf(b, "<p>Eigenvector similarity (S\xc3\xb8gaard et al. 2018): <strong>%.1f</strong> "
                 "<span class=\"muted\">(%zu most frequent words of each side, %zu neighbours, "
                 "%zu eigenvalues compared)</span>. It sums the squared differences between the "
                 "largest Laplacian eigenvalues of the two nearest-neighbour graphs: 0 means the "
                 "two spaces have the same shape, and the larger it is, the less a rotation can "
                 "align them.</p>\n"
                 "<p class=\"muted\">Not a release figure: it is deterministic for given vector "
                 "files, but retraining on the same corpus with the same settings moves it by "
                 "about a fifth while precision moves by less than a point (docs/methods.md, "
                 "\"Isometry\"), so compare it only between runs on the same vector "
                 "files.</p>\n"
                 "</section>\n",
              s->isometry, s->isometry_words, s->isometry_k, s->isometry_terms);
}

static void
misses(rbuf *b, const ist_diag *d, const ist_diag_summary *s)
{
    rb_put(b, "<section><h2 id=\"misses\">Worst misses</h2>\n");
    if (s->misses == 0) {
        rb_put(b, "<p>No misses listed in this result.</p></section>\n");
        return;
    }
    rb_printf(b, "<p>Test words whose gold translation was not ranked first (CSLS ranking): "
                 "%zu of %zu; those the map was most sure about come first, gold translations "
                 "outside the top 10 before the rest.</p>\n",
              s->misses_total ? s->misses_total : s->misses, s->misses_queries);
    rb_put(b, "<table><tr><th>source word</th><th>gold translation</th>"
              "<th>ranked first instead</th><th>its score</th><th>gold&#39;s rank</th></tr>\n");
    for (size_t i = 0; i < s->misses; i++) {
        const char *ranked = NULL, *const *gold = NULL;
        size_t ngold = 0, srow, rrow, rank;
        float score;
        const char *src = ist_diag_miss_words(d, i, &ranked, &gold, &ngold);
        ist_diag_miss(d, i, &srow, &rrow, &score, &rank);
        rb_put(b, "<tr><td>");
        rb_esc(b, src);
        rb_put(b, "</td><td>");
        for (size_t g = 0; g < ngold; g++) {
            if (g)
                rb_put(b, ", ");
            rb_esc(b, gold[g]);
        }
        rb_put(b, "</td><td>");
        rb_esc(b, ranked);
        rb_printf(b, "</td><td class=\"n\">%.3f</td><td class=\"n\">", (double)score);
        if (rank >= 1)
            rb_printf(b, "%zu", rank);
        else
            rb_put(b, "not in top 10");
        rb_put(b, "</td></tr>\n");
    }
    rb_put(b, "</table></section>\n");
}

void
ist_report_diag_sections(rbuf *b, const ist_diag *d, int *chart_id)
{
    ist_diag_summary s;

    if (!d) {
        rb_put(b, "<section><h2 id=\"diagnostics\">Diagnostics</h2>\n<p>This result has no "
                  "diagnostics (it was scored with --no-diagnostics or by an older "
                  "isthmus).</p></section>\n");
        return;
    }
    ist_diag_summarise(d, &s);
    similarity(b, &s, chart_id);
    hubness(b, d, &s, chart_id);
    isometry(b, &s);
    misses(b, d, &s);
}

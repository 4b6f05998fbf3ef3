/* report_svg.c - the report's text buffer and its inline SVG bar charts.
 *
 * Charts are plain SVG 1.1 elements inside the HTML page: a title and a
 * description for assistive technology, axes with ticks, one group of bars per
 * category, each series with its own colour and its own fill pattern (solid,
 * hatched, dotted, cross-hatched) so that print in grey or a reader who does
 * not tell the colours apart still tells the series apart, and a legend. */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "report_int.h"

static bool
grow(rbuf *b, size_t more)
{
    if (b->failed)
        return false;
    if (b->len + more + 1 <= b->cap)
        return true;
    size_t cap = b->cap ? b->cap : 16384;
    while (cap < b->len + more + 1)
        cap *= 2;
    char *p = ist_realloc(b->p, cap);
    if (!p) {
        b->failed = true;
        return false;
    }
    b->p = p;
    b->cap = cap;
    return true;
}

void
rb_put(rbuf *b, const char *s)
{
    size_t n = strlen(s);
    if (!grow(b, n))
        return;
    memcpy(b->p + b->len, s, n + 1);
    b->len += n;
}

void
rb_printf(rbuf *b, const char *fmt, ...)
{
    char small[512];
    va_list ap;
    int n;

    va_start(ap, fmt);
    n = vsnprintf(small, sizeof small, fmt, ap);
    va_end(ap);
    if (n < 0)
        return;
    if ((size_t)n < sizeof small) {
        rb_put(b, small);
        return;
    }
    if (!grow(b, (size_t)n))
        return;
    va_start(ap, fmt);
    vsnprintf(b->p + b->len, (size_t)n + 1, fmt, ap);
    va_end(ap);
    b->len += (size_t)n;
}

void
rb_esc(rbuf *b, const char *s)
{
    if (!s)
        return;
    for (; *s; s++) {
        switch (*s) {
        case '&': rb_put(b, "&amp;"); break;
        case '<': rb_put(b, "&lt;"); break;
        case '>': rb_put(b, "&gt;"); break;
        case '"': rb_put(b, "&quot;"); break;
        case '\'': rb_put(b, "&#39;"); break;
        default: {
            unsigned char c = (unsigned char)*s;
            if (c < 0x20 && c != '\t' && c != '\n') {
                rb_put(b, "\xef\xbf\xbd");   /* control characters are not allowed in XML */
                break;
            }
            char one[2] = {*s, 0};
            rb_put(b, one);
        }
        }
    }
}

/* Our palette: dark blue, amber, plum, green; each at least 3:1 against white. */
static const char *const colour[RS_MAX_SERIES] = {"#1b4f72", "#9a5b06", "#6c3483", "#117a65"};

#define WIDTH 720.0
#define W (c->width > 0 ? c->width : WIDTH)
#define H 300.0
#define ML 64.0
#define MR 16.0
#define MT 40.0
#define MB 56.0

static void
patterns(rbuf *b, const rchart *c)
{
    rb_put(b, "<defs>");
    for (size_t s = 0; s < c->ns && s < RS_MAX_SERIES; s++) {
        const char *col = colour[s];
        rb_printf(b, "<pattern id=\"p%d-%zu\" width=\"6\" height=\"6\" "
                     "patternUnits=\"userSpaceOnUse\">", c->id, s);
        switch (s) {
        case 0: rb_printf(b, "<rect width=\"6\" height=\"6\" fill=\"%s\"/>", col); break;
        case 1:
            rb_printf(b, "<rect width=\"6\" height=\"6\" fill=\"#fbeedd\"/>"
                         "<path d=\"M-1,1 l2,-2 M0,6 l6,-6 M5,7 l2,-2\" stroke=\"%s\" "
                         "stroke-width=\"2\"/>", col);
            break;
        case 2:
            rb_printf(b, "<rect width=\"6\" height=\"6\" fill=\"#efe3f4\"/>"
                         "<circle cx=\"3\" cy=\"3\" r=\"1.6\" fill=\"%s\"/>", col);
            break;
        default:
            rb_printf(b, "<rect width=\"6\" height=\"6\" fill=\"#dcf1ec\"/>"
                         "<path d=\"M0,3 h6 M3,0 v6\" stroke=\"%s\" stroke-width=\"1.5\"/>", col);
        }
        rb_put(b, "</pattern>");
    }
    rb_put(b, "</defs>");
}

static double
data_max(const rchart *c)
{
    double m = 0;
    for (size_t s = 0; s < c->ns; s++)
        for (size_t i = 0; i < c->ncat; i++) {
            if (!isnan(c->s[s].v[i]) && c->s[s].v[i] > m)
                m = c->s[s].v[i];
            if (c->s[s].hi && !isnan(c->s[s].hi[i]) && c->s[s].hi[i] > m)
                m = c->s[s].hi[i];
        }
    return m;
}

/* A round step for about five ticks up to m. */
static double
tick_step(double m)
{
    double raw = m / 5, p = pow(10, floor(log10(raw)));
    double f = raw / p;
    return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * p;
}

static void
value_text(char *buf, size_t cap, double v, bool percent)
{
    if (percent)
        snprintf(buf, cap, "%.1f%%", 100 * v);
    else if (v == floor(v) && fabs(v) < 1e15)
        snprintf(buf, cap, "%.0f", v);
    else
        snprintf(buf, cap, "%.3g", v);
}

/* The label printed above a bar of width bw. Beside another series, a label wider than
 * its bar runs into its neighbour's ("36.8%37.3%"), so a percent too wide for the bar is
 * given in whole percents ("37%", "<1%" for a share above zero that rounds to none); the
 * bar's tooltip keeps the decimal. Width estimate: 0.6 em a character at 10 px. */
static void
bar_label(char *buf, size_t cap, double v, bool percent, double bw)
{
    value_text(buf, cap, v, percent);
    if (!percent || 6.0 * (double)strlen(buf) <= bw - 2)
        return;
    if (v > 0 && 100 * v < 0.5)
        snprintf(buf, cap, "<1%%");
    else
        snprintf(buf, cap, "%.0f%%", 100 * v);
}

static void
axes(rbuf *b, const rchart *c, double ymax, double step, double mt)
{
    double ph = H - mt - MB;
    char t[32];
    for (double y = 0; y <= ymax * (1 + 1e-9); y += step) {
        double py = mt + ph * (1 - y / ymax);
        value_text(t, sizeof t, y, c->percent);
        rb_printf(b, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#d5d8dc\"/>",
                  ML, py, W - MR, py);
        rb_printf(b, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"end\" font-size=\"11\">%s</text>",
                  ML - 6, py + 4, t);
    }
    rb_printf(b, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#222\"/>", ML,
              mt + ph, W - MR, mt + ph);
    rb_printf(b, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#222\"/>", ML, mt,
              ML, mt + ph);
    if (c->ylabel) {
        rb_printf(b, "<text transform=\"translate(14 %.1f) rotate(-90)\" text-anchor=\"middle\" "
                     "font-size=\"12\">", mt + ph / 2);
        rb_esc(b, c->ylabel);
        rb_put(b, "</text>");
    }
    if (c->xlabel) {
        rb_printf(b, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"middle\" font-size=\"12\">",
                  ML + (W - ML - MR) / 2, H - 8);
        rb_esc(b, c->xlabel);
        rb_put(b, "</text>");
    }
}

/* Draw the legend (when b is not NULL); returns the number of rows it takes. */
static int
legend(rbuf *b, const rchart *c)
{
    double x = ML, y = 10;
    int rows = 1;
    for (size_t s = 0; s < c->ns && s < RS_MAX_SERIES; s++) {
        double wd = 34 + 7.0 * (double)strlen(c->s[s].name ? c->s[s].name : "");
        if (x > ML && x + wd > W - MR) {
            x = ML;
            y += 18;
            rows++;
        }
        if (b) {
            rb_printf(b, "<rect x=\"%.1f\" y=\"%.1f\" width=\"16\" height=\"14\" "
                         "fill=\"url(#p%d-%zu)\" stroke=\"%s\"/>", x, y, c->id, s, colour[s]);
            rb_printf(b, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"12\">", x + 22, y + 12);
            rb_esc(b, c->s[s].name);
            rb_put(b, "</text>");
        }
        x += wd;
    }
    return rows;
}

static void
interval(rbuf *b, double cx, double ylo, double yhi)
{
    rb_printf(b, "<path d=\"M%.1f,%.1f V%.1f M%.1f,%.1f h8 M%.1f,%.1f h8\" stroke=\"#111\" "
                 "stroke-width=\"1.5\" fill=\"none\"/>",
              cx, ylo, yhi, cx - 4, ylo, cx - 4, yhi);
}

void
rs_bars(rbuf *b, const rchart *c)
{
    double ymax = c->ymax > 0 ? c->ymax : data_max(c);
    double mt = MT + 18.0 * (legend(NULL, c) - 1), pw = W - ML - MR, ph = H - mt - MB;
    size_t ns = c->ns < RS_MAX_SERIES ? c->ns : RS_MAX_SERIES;
    char t[32];

    if (ymax <= 0)
        ymax = 1;
    double step = tick_step(ymax);
    ymax = ceil(ymax / step - 1e-9) * step;
    rb_printf(b, "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" viewBox=\"0 0 %.0f "
                 "%.0f\" width=\"%.0f\" height=\"%.0f\" role=\"img\" aria-labelledby=\"t%d d%d\">",
              W, H, W, H, c->id, c->id);
    rb_printf(b, "<title id=\"t%d\">", c->id);
    rb_esc(b, c->title);
    rb_printf(b, "</title><desc id=\"d%d\">", c->id);
    rb_esc(b, c->desc);
    rb_put(b, "</desc>");
    patterns(b, c);
    axes(b, c, ymax, step, mt);
    legend(b, c);
    double gw = c->ncat ? pw / (double)c->ncat : pw, bw = ns ? gw * 0.8 / (double)ns : gw;
    bw = bw > 56 ? 56 : bw;
    for (size_t i = 0; i < c->ncat; i++) {
        double gx = ML + gw * (double)i + (gw - bw * (double)ns) / 2;
        for (size_t s = 0; s < ns; s++) {
            double v = c->s[s].v[i];
            if (isnan(v))
                continue;
            double h = ph * (v > ymax ? 1 : v < 0 ? 0 : v / ymax), x = gx + bw * (double)s;
            value_text(t, sizeof t, v, c->percent);
            rb_printf(b, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" "
                         "fill=\"url(#p%d-%zu)\" stroke=\"%s\"><title>",
                      x, mt + ph - h, bw > 2 ? bw - 1 : bw, h, c->id, s, colour[s]);
            rb_esc(b, c->s[s].name);
            rb_put(b, ", ");
            rb_esc(b, c->cats[i]);
            rb_printf(b, ": %s</title></rect>", t);
            if (c->s[s].lo && c->s[s].hi && !isnan(c->s[s].lo[i]) && !isnan(c->s[s].hi[i]))
                interval(b, x + bw / 2, mt + ph * (1 - c->s[s].lo[i] / ymax),
                         mt + ph * (1 - c->s[s].hi[i] / ymax));
            else if (c->labels) {
                char lab[32];
                bar_label(lab, sizeof lab, v, c->percent, ns > 1 ? bw : gw);
                rb_printf(b, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"middle\" "
                             "font-size=\"10\">", x + bw / 2, mt + ph - h - 4);
                rb_esc(b, lab);
                rb_put(b, "</text>");
            }
        }
        bool show = c->ncat <= 20 || i % 2 == 0;
        if (show) {
            rb_printf(b, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"middle\" font-size=\"11\">",
                      ML + gw * ((double)i + 0.5), mt + ph + 16);
            rb_esc(b, c->cats[i]);
            rb_put(b, "</text>");
        }
    }
    rb_put(b, "</svg>\n");
}

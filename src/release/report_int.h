/* report_int.h - the HTML report's text buffer, escaping and inline SVG
 * charts (report_svg.c), used by report.c. Internal. */
#ifndef ISTHMUS_REPORT_INT_H
#define ISTHMUS_REPORT_INT_H

#include <stdbool.h>
#include <stddef.h>

/* A growing text buffer; an allocation failure sets failed and drops later text. */
typedef struct rbuf {
    char *p;
    size_t len, cap;
    bool failed;
} rbuf;

void rb_put(rbuf *b, const char *s);
void rb_printf(rbuf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
/* Text escaped for HTML and XML (& < > " '); NULL writes nothing. */
void rb_esc(rbuf *b, const char *s);

/* The dash of a range of ranks in the report (ist_band_label). */
#define EN_DASH "\xe2\x80\x93"

#define RS_MAX_SERIES 4

/* One series of a bar chart: values (NaN: no bar), optional interval ends (NaN: none). */
typedef struct rseries {
    const char *name;
    const double *v;
    const double *lo, *hi;      /* may be NULL */
} rseries;

typedef struct rchart {
    int id;                     /* unique in the page: pattern ids */
    const char *title;          /* accessible name */
    const char *desc;           /* accessible description */
    const char *ylabel, *xlabel;
    const char *const *cats;
    size_t ncat;
    const rseries *s;
    size_t ns;
    double ymax;                /* 0: from the data */
    bool percent;               /* values are fractions shown in percent */
    bool labels;                /* print each bar's value above it */
    double width;               /* drawing width in px; 0: 720 */
} rchart;

/* Draw a grouped bar chart as an inline <svg> element with a legend. */
void rs_bars(rbuf *b, const rchart *c);

/* Figures for people: a fraction as a percent with one decimal ("84.1%"), an interval
 * beside it (" [81.0, 87.2]"); NaN writes a dash. */
void rb_pct(rbuf *b, double v);
void rb_pct_iv(rbuf *b, double lo, double hi);

/* The diagnostics sections (report_diag.c); diag may be NULL (absent). */
struct ist_diag;
void ist_report_diag_sections(rbuf *b, const struct ist_diag *diag, int *chart_id);

/* How a vector file was made, from its provenance JSON (report_prov.c). */
typedef struct rprov {
    bool known;                  /* the provenance could be read */
    char method[200];            /* "skip-gram negative sampling (100) + PPMI truncated ..." */
    size_t dimension;
    char corpus[256];            /* the corpus files, comma-separated */
    unsigned long long tokens, types;
    char passes[96];             /* "20 (skip-gram)" */
    char seed[48];
    char text[160];              /* text normalisation in words */
    char producer[64];
} rprov;

void ist_report_read_provenance(const char *json, rprov *out);

#endif

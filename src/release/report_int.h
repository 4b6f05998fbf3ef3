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

/* The diagnostics sections (report_diag.c); diag may be NULL (absent). */
struct ist_jv;
void ist_report_diag_sections(rbuf *b, const struct ist_jv *diag, int *chart_id);

#endif

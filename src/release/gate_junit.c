/* gate_junit.c - the verdict as a JUnit-style XML report, the test-result form CI servers
 * read and display: one <testsuite> for the thresholds file, one <testcase> per rule, a
 * <failure> element for a rule that failed and <skipped> for one not checked
 * (docs/formats.md "JUnit report"). */
#include <isthmus/gate.h>

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "alloc_int.h"
#include "error_int.h"
#include "gate_int.h"
#include "ofile_int.h"

typedef struct xbuf {
    char *p;
    size_t len, cap;
    bool failed;
} xbuf;

static void
put(xbuf *b, const char *s, size_t n)
{
    if (b->failed)
        return;
    if (b->len + n + 1 > b->cap) {
        size_t nc = b->cap ? b->cap : 4096;
        while (nc < b->len + n + 1)
            nc *= 2;
        char *np = ist_realloc(b->p, nc);
        if (!np) {
            b->failed = true;
            return;
        }
        b->p = np;
        b->cap = nc;
    }
    memcpy(b->p + b->len, s, n);
    b->len += n;
    b->p[b->len] = '\0';
}

static void
puts_raw(xbuf *b, const char *s)
{
    put(b, s, strlen(s));
}

/* Text for an attribute value or element content: the five markup characters as entities;
 * control characters other than tab and line end, which XML 1.0 does not allow at all,
 * become '?'. */
static void
put_text(xbuf *b, const char *s)
{
    for (; s && *s; s++) {
        unsigned char c = (unsigned char)*s;
        switch (c) {
        case '&': puts_raw(b, "&amp;"); break;
        case '<': puts_raw(b, "&lt;"); break;
        case '>': puts_raw(b, "&gt;"); break;
        case '"': puts_raw(b, "&quot;"); break;
        case '\'': puts_raw(b, "&apos;"); break;
        case '\t': puts_raw(b, "&#9;"); break;
        case '\n': puts_raw(b, "&#10;"); break;
        default: put(b, c < 0x20 || c == 0x7f ? "?" : (const char *)s, 1);
        }
    }
}

static void
putf(xbuf *b, const char *fmt, ...)
{
    char tmp[256];
    va_list ap;

    va_start(ap, fmt);
    int n = vsnprintf(tmp, sizeof tmp, fmt, ap);
    va_end(ap);
    if (n > 0)
        put(b, tmp, (size_t)n < sizeof tmp ? (size_t)n : sizeof tmp - 1);
}

/* The part of the verdict line after "OUTCOME  FILE:LINE  RULE: ". */
static const char *
detail_of(const char *line, const ist_gate_rule *r)
{
    const char *p = strstr(line, r->text);
    if (p && p[strlen(r->text)] == ':')
        return p + strlen(r->text) + 2;
    return line;
}

static void
write_case(xbuf *b, const ist_verdict *v, size_t i, const char *suite)
{
    const ist_gate_check *c = &v->checks[i];
    char line[1024];

    ist_verdict_line(v, i, line, sizeof line);
    const char *detail = detail_of(line, c->rule);
    puts_raw(b, "    <testcase classname=\"");
    put_text(b, suite);
    putf(b, "\" name=\"line %zu: ", c->rule->line);
    put_text(b, c->rule->text);
    puts_raw(b, "\" time=\"0\">\n");
    if (c->outcome == IST_GATE_FAIL) {
        puts_raw(b, "      <failure type=\"gate rule\" message=\"");
        put_text(b, detail);
        puts_raw(b, "\">");
        put_text(b, line);
        puts_raw(b, "</failure>\n");
    } else if (c->outcome == IST_GATE_SKIP) {
        puts_raw(b, "      <skipped message=\"");
        put_text(b, c->note);
        puts_raw(b, "\"/>\n");
    }
    puts_raw(b, "      <system-out>");
    put_text(b, line);
    puts_raw(b, "</system-out>\n    </testcase>\n");
}

static void
property(xbuf *b, const char *name, const char *value)
{
    puts_raw(b, "      <property name=\"");
    put_text(b, name);
    puts_raw(b, "\" value=\"");
    put_text(b, value ? value : "");
    puts_raw(b, "\"/>\n");
}

ist_status
ist_verdict_write_junit(const ist_verdict *v, const char *path, ist_error *err)
{
    xbuf b = {0};
    size_t n = v->n, failed = ist_verdict_tally(v, IST_GATE_FAIL);
    size_t skipped = ist_verdict_tally(v, IST_GATE_SKIP);
    char counts[160];

    snprintf(counts, sizeof counts, " tests=\"%zu\" failures=\"%zu\" errors=\"0\" skipped=\"%zu\"",
             n, failed, skipped);
    puts_raw(&b, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<testsuites name=\"isthmus gate\"");
    puts_raw(&b, counts);
    puts_raw(&b, " time=\"0\">\n  <testsuite name=\"");
    put_text(&b, v->rules_name);
    puts_raw(&b, "\"");
    puts_raw(&b, counts);
    puts_raw(&b, " time=\"0\">\n    <properties>\n");
    property(&b, "verdict", ist_verdict_passed(v) ? "pass" : "fail");
    property(&b, "thresholds", v->rules_name);
    property(&b, "result", v->result_name);
    property(&b, "baseline", v->baseline_name ? v->baseline_name : "(none)");
    char hex[32] = "(none)";
    if (v->has_list_ck)
        ist_result_hex(v->list_ck, hex);
    property(&b, "test.list_checksum", hex);
    for (size_t i = 0; i < v->nconditions; i++)
        property(&b, "condition", v->conditions[i]);
    puts_raw(&b, "    </properties>\n");
    for (size_t i = 0; i < n; i++)
        write_case(&b, v, i, v->rules_name);
    puts_raw(&b, "  </testsuite>\n</testsuites>\n");
    if (b.failed) {
        ist_free(b.p);
        return ist_error_nomem(err);
    }
    ist_status rc = ist_ofile_write_all(path, b.p, b.len, err);
    ist_free(b.p);
    return rc;
}

/* report_prov.c - how a vector file was made, for the report's provenance table: read
 * from the provenance JSON the trainer writes into the file (a single training, or the
 * blocks of a concatenation each with its own training). */
#include <stdio.h>
#include <string.h>

#include "json_int.h"
#include "report_int.h"

static void
append(char *buf, size_t cap, const char *sep, const char *text)
{
    size_t n = strlen(buf), ls = n ? strlen(sep) : 0, lt = strlen(text);
    if (n + ls + lt + 1 > cap)
        return;   /* a piece that does not fit is left out whole */
    memcpy(buf + n, sep, ls);
    memcpy(buf + n + ls, text, lt + 1);
}

/* A short name for a training method. */
static const char *
short_method(const char *m)
{
    if (strcmp(m, "skip-gram negative sampling") == 0)
        return "skip-gram";
    if (strcmp(m, "PPMI truncated SVD") == 0)
        return "PPMI";
    return m;
}

static void
text_rules(const ist_jv *t, rprov *p)
{
    if (ist_jv_type(t) != IST_JOBJ || p->text[0])
        return;
    if (ist_jv_bool(ist_jv_get(t, "nfkc"), false))
        append(p->text, sizeof p->text, ", ", "NFKC");
    if (ist_jv_bool(ist_jv_get(t, "casefold"), false))
        append(p->text, sizeof p->text, ", ", "case folded");
    if (ist_jv_bool(ist_jv_get(t, "strip_marks"), false))
        append(p->text, sizeof p->text, ", ", "accents removed");
    const char *num = ist_jv_str(ist_jv_get(t, "numbers"), NULL);
    if (num) {
        char s[64];
        snprintf(s, sizeof s, "numbers: %s", num);
        append(p->text, sizeof p->text, ", ", s);
    }
}

/* One training (a block, or the whole file). */
static void
training(const ist_jv *prov, rprov *p, bool several)
{
    const ist_jv *tr = ist_jv_get(prov, "training"), *corpus = ist_jv_get(prov, "corpus");
    const char *m = ist_jv_str(ist_jv_get(tr, "method"), NULL);
    char s[160];

    if (!m)
        return;
    p->known = true;
    size_t dim = (size_t)ist_jv_num(ist_jv_get(tr, "dimension"), 0);
    p->dimension += dim;
    if (several)
        snprintf(s, sizeof s, "%s (%zu components)", m, dim);
    else
        snprintf(s, sizeof s, "%s", m);
    append(p->method, sizeof p->method, " + ", s);
    const ist_jv *passes = ist_jv_get(tr, "passes");
    if (ist_jv_type(passes) == IST_JNUM) {
        snprintf(s, sizeof s, several ? "%.0f (%s)" : "%.0f", ist_jv_num(passes, 0),
                 short_method(m));
        append(p->passes, sizeof p->passes, ", ", s);
    }
    if (ist_jv_type(ist_jv_get(tr, "seed")) == IST_JNUM && !p->seed[0])
        snprintf(p->seed, sizeof p->seed, "%.0f", ist_jv_num(ist_jv_get(tr, "seed"), 0));
    text_rules(ist_jv_get(prov, "text"), p);
    if (!p->corpus[0]) {
        const ist_jv *src = ist_jv_get(corpus, "sources");
        for (size_t i = 0; i < ist_jv_len(src); i++)
            append(p->corpus, sizeof p->corpus, ", ",
                   ist_jv_str(ist_jv_get(ist_jv_at(src, i), "path"), "?"));
        p->tokens = (unsigned long long)ist_jv_num(ist_jv_get(corpus, "tokens"), 0);
        p->types = (unsigned long long)ist_jv_num(ist_jv_get(corpus, "types"), 0);
    }
}

void
ist_report_read_provenance(const char *json, rprov *p)
{
    ist_jv *root = NULL;

    memset(p, 0, sizeof *p);
    if (!json || ist_json_parse(json, strlen(json), "provenance", &root, NULL) != 0)
        return;
    snprintf(p->producer, sizeof p->producer, "%s",
             ist_jv_str(ist_jv_get(root, "producer"), ""));
    const ist_jv *blocks = ist_jv_get(root, "blocks");
    if (ist_jv_type(blocks) == IST_JARR) {
        for (size_t i = 0; i < ist_jv_len(blocks); i++)
            training(ist_jv_get(ist_jv_at(blocks, i), "provenance"), p,
                     ist_jv_len(blocks) > 1);
        if (ist_jv_len(blocks) > 1 && p->known)
            append(p->method, sizeof p->method, ", ", "side by side");
    } else {
        training(root, p, false);
    }
    ist_jv_free(root);
}

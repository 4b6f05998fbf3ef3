/* spell.c - optimal string alignment distance over code points (spell.h). */
#include "spell.h"

#include <stdint.h>
#include <string.h>

/* Code points of s into cp (at most cap); returns the count, or cap + 1 when longer. */
static size_t
decode(const char *s, uint32_t *cp, size_t cap)
{
    const unsigned char *p = (const unsigned char *)s;
    size_t n = 0;

    while (*p) {
        uint32_t c = *p;
        int extra = c >= 0xf0 && c < 0xf8 ? 3 : c >= 0xe0 ? 2 : c >= 0xc0 ? 1 : 0;
        if (c >= 0x80 && c < 0xc0)
            extra = 0;   /* a stray continuation byte: one character of its own */
        if (c >= 0xf8)
            extra = 0;
        c = extra == 3 ? c & 0x07 : extra == 2 ? c & 0x0f : extra == 1 ? c & 0x1f : c;
        int k = 1;
        for (; k <= extra && (p[k] & 0xc0) == 0x80; k++)
            c = (c << 6) | (p[k] & 0x3f);
        if (k <= extra) {   /* cut short: take the lead byte alone */
            c = 0x110000u + *p;
            k = 1;
        }
        if (n == cap)
            return cap + 1;
        cp[n++] = c;
        p += k;
    }
    return n;
}

static size_t
min3(size_t a, size_t b, size_t c)
{
    size_t m = a < b ? a : b;
    return m < c ? m : c;
}

size_t
spell_distance(const char *a, const char *b, size_t limit)
{
    uint32_t x[SPELL_MAX_CHARS], y[SPELL_MAX_CHARS];
    size_t rows[3][SPELL_MAX_CHARS + 1];
    size_t n = decode(a, x, SPELL_MAX_CHARS), m = decode(b, y, SPELL_MAX_CHARS);

    if (n > SPELL_MAX_CHARS || m > SPELL_MAX_CHARS)
        return strcmp(a, b) == 0 ? 0 : limit + 1;
    if ((n > m ? n - m : m - n) > limit)
        return limit + 1;
    size_t *two = rows[0], *prev = rows[1], *cur = rows[2];
    for (size_t j = 0; j <= m; j++)
        prev[j] = j;
    for (size_t i = 1; i <= n; i++) {
        size_t best = cur[0] = i;
        for (size_t j = 1; j <= m; j++) {
            size_t d = min3(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (x[i - 1] != y[j - 1]));
            if (i > 1 && j > 1 && x[i - 1] == y[j - 2] && x[i - 2] == y[j - 1] &&
                two[j - 2] + 1 < d)
                d = two[j - 2] + 1;
            cur[j] = d;
            if (d < best)
                best = d;
        }
        if (best > limit)   /* every path through this row already costs more */
            return limit + 1;
        size_t *t = two;
        two = prev;
        prev = cur;
        cur = t;
    }
    return prev[m] > limit ? limit + 1 : prev[m];
}

size_t
spell_limit(const char *word)
{
    uint32_t cp[SPELL_MAX_CHARS];
    size_t n = decode(word, cp, SPELL_MAX_CHARS);
    return n <= 4 ? 1 : n <= 8 ? 2 : 3;
}

size_t
spell_nearest(const char *word, const char *(*get)(const void *ctx, size_t i),
              const void *ctx, size_t n, size_t *out, size_t cap)
{
    size_t limit = spell_limit(word), found = 0;
    size_t dist[16];

    if (cap > 16)
        cap = 16;
    for (size_t i = 0; i < n && cap > 0; i++) {
        const char *c = get(ctx, i);
        if (!c)
            continue;
        if (found == cap && dist[found - 1] == 1)
            break;   /* nothing but the word itself is closer than 1 */
        size_t lim = found == cap ? dist[found - 1] - 1 : limit;   /* full: only closer */
        size_t d = spell_distance(word, c, lim);
        if (d > lim || d == 0)
            continue;
        size_t at = found < cap ? found++ : cap - 1;
        while (at > 0 && dist[at - 1] > d) {
            dist[at] = dist[at - 1];
            out[at] = out[at - 1];
            at--;
        }
        dist[at] = d;
        out[at] = i;
    }
    return found;
}

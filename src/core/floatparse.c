/* floatparse.c - decimal text <-> float32 without the locale. */
#include "floatparse_int.h"

#include <locale.h>
#include <math.h>
#include <pthread.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const double pow10_exact[23] = {
    1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
    1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
};

static locale_t c_locale;
static pthread_once_t c_locale_once = PTHREAD_ONCE_INIT;

static void
make_c_locale(void)
{
    c_locale = newlocale(LC_NUMERIC_MASK, "C", (locale_t)0);
}

/* strtof with the "C" decimal point whatever the process locale is. */
static float
strtof_c(const char *s)
{
    locale_t old = (locale_t)0;
    float v;

    pthread_once(&c_locale_once, make_c_locale);
    if (c_locale)
        old = uselocale(c_locale);
    v = strtof(s, NULL);
    if (c_locale)
        uselocale(old);
    return v;
}

static float
slow_path(const char *start, const char *stop)
{
    char buf[128];
    size_t n = (size_t)(stop - start);
    float v;

    if (n >= sizeof buf) {
        char *big = malloc(n + 1);
        if (!big)
            return NAN;
        memcpy(big, start, n);
        big[n] = '\0';
        v = strtof_c(big);
        free(big);
        return v;
    }
    memcpy(buf, start, n);
    buf[n] = '\0';
    return strtof_c(buf);
}

/* A double whose float rounding could differ from the direct decimal rounding:
 * exactly half-way between two floats (the low 29 mantissa bits are 1000...0). */
static int
on_float_midpoint(double d)
{
    uint64_t bits;

    memcpy(&bits, &d, sizeof bits);
    return (bits & 0x1fffffffull) == 0x10000000ull;
}

ist_fparse
ist_parse_float(const char *p, const char **end, float *out)
{
    const char *start = p;
    int neg = 0, digits = 0, sig = 0, exp10 = 0, overflow_digits = 0;
    uint64_t mant = 0;

    if (*p == '-' || *p == '+') {
        neg = *p == '-';
        p++;
    }
    while (*p >= '0' && *p <= '9') {
        if (sig < 19) {
            mant = mant * 10 + (uint64_t)(*p - '0');
            if (mant)
                sig++;
        } else {
            exp10++;
            overflow_digits = 1;
        }
        digits++;
        p++;
    }
    if (*p == '.') {
        p++;
        while (*p >= '0' && *p <= '9') {
            if (sig < 19) {
                mant = mant * 10 + (uint64_t)(*p - '0');
                if (mant)
                    sig++;
                exp10--;
            } else {
                overflow_digits = 1;
            }
            digits++;
            p++;
        }
    }
    if (digits == 0) {
        *end = start;
        return IST_FPARSE_NOT_NUMBER;
    }
    if (*p == 'e' || *p == 'E') {
        const char *q = p + 1;
        int eneg = 0, e = 0, edigits = 0;
        if (*q == '-' || *q == '+') {
            eneg = *q == '-';
            q++;
        }
        while (*q >= '0' && *q <= '9') {
            if (e < 100000)
                e = e * 10 + (*q - '0');
            edigits++;
            q++;
        }
        if (edigits == 0) {
            *end = start;
            return IST_FPARSE_NOT_NUMBER;
        }
        exp10 += eneg ? -e : e;
        p = q;
    }
    *end = p;
    if (mant == 0 && !overflow_digits) {
        *out = neg ? -0.0f : 0.0f;
        return IST_FPARSE_OK;
    }
    float v;
    if (!overflow_digits && mant <= (1ull << 53) && exp10 >= -22 && exp10 <= 22) {
        double d = (double)mant;
        d = exp10 < 0 ? d / pow10_exact[-exp10] : d * pow10_exact[exp10];
        v = on_float_midpoint(d) ? slow_path(start, p) : (float)d;
        if (neg && !on_float_midpoint(d))
            v = -v;
    } else {
        v = slow_path(start, p);
    }
    if (!isfinite(v))
        return IST_FPARSE_NOT_FINITE;
    *out = v;
    return IST_FPARSE_OK;
}

int
ist_format_float(float v, char *buf)
{
    /* %.9g reads back to the same float (9 = FLT_DECIMAL_DIG, C11 5.2.4.2.2).
     * The library never calls setlocale, so the decimal point is '.'. */
    int n = snprintf(buf, 17, "%.9g", (double)v);
    for (int i = 0; i < n; i++)
        if (buf[i] == ',')
            buf[i] = '.';
    return n;
}

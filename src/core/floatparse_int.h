/* floatparse_int.h - locale-independent decimal to float32, correctly rounded.
 *
 * Accepts [+-]digits[.digits][(e|E)[+-]digits] and [+-].digits...; refuses
 * "nan", "inf", hex floats and anything that overflows float32. The common
 * case (at most 19 significant digits, decimal exponent within +-22) is done
 * with one exact double operation; results that land on a float32 rounding
 * midpoint, and the rare inputs outside the fast range, go to strtod/strtof
 * in the "C" locale, so every result equals the correctly rounded value. */
#ifndef ISTHMUS_FLOATPARSE_INT_H
#define ISTHMUS_FLOATPARSE_INT_H

typedef enum ist_fparse {
    IST_FPARSE_OK = 0,
    IST_FPARSE_NOT_NUMBER,    /* no number here */
    IST_FPARSE_NOT_FINITE,    /* nan, inf or beyond float32 range */
} ist_fparse;

/* Parse a float at p; *end receives the first byte after it. p must point at
 * NUL-terminated text. */
ist_fparse ist_parse_float(const char *p, const char **end, float *out);

/* Shortest-enough text for a float: "%.9g"-equivalent, which reads back to the
 * same bits. Writes at most 16 bytes plus NUL; returns the length. */
int ist_format_float(float v, char *buf);

#endif

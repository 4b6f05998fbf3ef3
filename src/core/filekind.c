/* filekind.c - tell the kinds of the project's files by their first bytes. */
#include <isthmus/filekind.h>

#include <stdbool.h>
#include <stdio.h>
#include <string.h>
#include <zlib.h>

#include "error_int.h"

#define SNIFF_BYTES 8192

static bool
starts(const unsigned char *p, size_t n, const char *magic, size_t m)
{
    return n >= m && memcmp(p, magic, m) == 0;
}

/* Does a JSON text's start hold "format" with the given value? The writers put
 * that key first, so the first few kilobytes are enough. */
static bool
json_format_is(const unsigned char *p, size_t n, const char *value)
{
    static const char key[] = "\"format\"";
    const unsigned char *end = p + n;

    for (const unsigned char *q = p; (size_t)(end - q) >= sizeof key - 1; q++) {
        if (memcmp(q, key, sizeof key - 1) != 0)
            continue;
        q += sizeof key - 1;
        while (q < end && (*q == ' ' || *q == '\t' || *q == '\n' || *q == '\r' || *q == ':'))
            q++;
        size_t m = strlen(value);
        return (size_t)(end - q) >= m + 2 && q[0] == '"' && memcmp(q + 1, value, m) == 0 &&
               q[m + 1] == '"';
    }
    return false;
}

/* Binary: many bytes that text never holds (NUL, control characters other than
 * white space, bytes that are not UTF-8), at least 8 and at least 1 in 20. A text
 * file with a stray bad byte or a Latin-1 word stays text, so that its reader can
 * name the line. A sequence cut at the end of the sample is forgiven. */
static bool
looks_binary(const unsigned char *p, size_t n, bool cut)
{
    size_t bad = 0;

    for (size_t i = 0; i < n;) {
        unsigned char c = p[i];
        if (c < 0x80) {
            if (c < 0x20 && c != '\t' && c != '\n' && c != '\r' && c != '\f' && c != '\v')
                bad++;
            i++;
            continue;
        }
        size_t len = c >= 0xf0 && c <= 0xf4 ? 4 : c >= 0xe0 && c < 0xf0 ? 3
                   : c >= 0xc2 && c < 0xe0 ? 2 : 0;
        if (len && i + len > n && cut)
            break;
        size_t k = 1;
        while (len && k < len && i + k < n && (p[i + k] & 0xc0) == 0x80)
            k++;
        if (len == 0 || k < len) {
            bad++;
            i++;
            continue;
        }
        i += len;
    }
    return bad >= 8 && bad * 20 >= n;
}

/* Does one of the project's binary signatures open the data? Every binary header
 * puts a little-endian 32-bit version right after its 8-byte signature, and a
 * version below 2^24 has a zero top byte, which text never holds (a signature of 7
 * letters is followed by an eighth byte of its own, then the version). So a text line
 * that merely begins with the signature's letters ("ISTHMUSM<TAB>mu", a word list's
 * first pair) stays text. A file that ends inside the version field is taken as
 * the binary kind, cut short, for its reader to say so. */
static bool
own_signature(const unsigned char *p, size_t n, const char *magic, size_t m)
{
    if (!starts(p, n, magic, m))
        return false;
    if (n <= 8)
        return true;
    for (size_t i = 8; i < n && i < 12; i++)
        if (p[i] < 0x20 && p[i] != '\t' && p[i] != '\n' && p[i] != '\r')
            return true;
    return false;
}

static ist_file_kind
classify(const unsigned char *p, size_t n, bool cut)
{
    if (n == 0)
        return IST_FILE_UNKNOWN;
    if (own_signature(p, n, "ISTHMUSV", 8))
        return IST_FILE_VECTORS;
    if (own_signature(p, n, "ISTHMUSM", 8))
        return IST_FILE_MAP;
    if (own_signature(p, n, "ISTPREP\x1a", 8))
        return IST_FILE_PREPARED;
    if (own_signature(p, n, "ISTHMUS", 7) || own_signature(p, n, "ISTPREP", 7))
        return IST_FILE_OWN_BINARY;
    if (looks_binary(p, n, cut))
        return IST_FILE_BINARY;
    size_t i = starts(p, n, "\xef\xbb\xbf", 3) ? 3 : 0;
    while (i < n && (p[i] == ' ' || p[i] == '\t' || p[i] == '\n' || p[i] == '\r'))
        i++;
    if (i < n && p[i] == '{') {
        if (json_format_is(p + i, n - i, "isthmus result"))
            return IST_FILE_RESULT;
        if (json_format_is(p + i, n - i, "isthmus verdict"))
            return IST_FILE_VERDICT;
        return IST_FILE_JSON;
    }
    if (starts(p + i, n - i, "# isthmus candidate list", 24))
        return IST_FILE_CANDIDATES;
    return IST_FILE_TEXT;
}

ist_file_kind
ist_file_classify(const unsigned char *p, size_t n)
{
    return classify(p, n, false);
}

ist_status
ist_file_sniff(const char *path, ist_file_kind *kind, int *gzip, ist_error *err)
{
    unsigned char head[2], buf[SNIFF_BYTES];
    FILE *f;
    size_t got;

    (void)err;
    *kind = IST_FILE_UNKNOWN;
    if (gzip)
        *gzip = 0;
    f = fopen(path, "rb");
    if (!f)
        return IST_OK;   /* the reader reports it in its own words */
    got = fread(head, 1, 2, f);
    fclose(f);
    if (got == 2 && head[0] == 0x1f && head[1] == 0x8b) {
        gzFile g = gzopen(path, "rb");
        int n;
        if (gzip)
            *gzip = 1;
        if (!g)
            return IST_OK;
        n = gzread(g, buf, sizeof buf);
        gzclose(g);
        if (n > 0)
            *kind = classify(buf, (size_t)n, n == (int)sizeof buf);
        else
            *kind = IST_FILE_BINARY;   /* damaged compressed data */
        return IST_OK;
    }
    f = fopen(path, "rb");
    if (!f)
        return IST_OK;
    got = fread(buf, 1, sizeof buf, f);
    fclose(f);
    *kind = classify(buf, got, got == sizeof buf);
    return IST_OK;
}

const char *
ist_file_kind_name(ist_file_kind k)
{
    switch (k) {
    case IST_FILE_TEXT: return "a text file";
    case IST_FILE_VECTORS: return "a native vector file";
    case IST_FILE_MAP: return "a map file";
    case IST_FILE_PREPARED: return "a prepared corpus";
    case IST_FILE_RESULT: return "a result file";
    case IST_FILE_VERDICT: return "a verdict file";
    case IST_FILE_JSON: return "a JSON file";
    case IST_FILE_CANDIDATES: return "a candidate list";
    case IST_FILE_OWN_BINARY: return "an isthmus file of a kind this build does not know";
    case IST_FILE_BINARY: return "a binary file";
    case IST_FILE_UNKNOWN:
    case IST_FILE_NKINDS: break;
    }
    return "an empty or unreadable file";
}

const char *
ist_file_kind_use(ist_file_kind k)
{
    switch (k) {
    case IST_FILE_VECTORS:
        return "written by 'isthmus train' or 'isthmus convert'; read as SRC and TGT by align, "
               "score, lookup, propose and gate, and by inspect and convert";
    case IST_FILE_MAP:
        return "written by 'isthmus align'; read with --map by score, lookup, propose and gate";
    case IST_FILE_PREPARED:
        return "written by 'isthmus prepare'; read by 'isthmus train'";
    case IST_FILE_RESULT:
        return "written by 'isthmus score' or 'isthmus align' with --json-out; read by "
               "'isthmus gate' and 'isthmus report'";
    case IST_FILE_VERDICT:
        return "written by 'isthmus gate --verdict-out'; read with --verdict by 'isthmus report'";
    case IST_FILE_JSON:
        return "with no \"format\" key of isthmus";
    case IST_FILE_CANDIDATES:
        return "written by 'isthmus propose'; read by 'isthmus merge-pairs'";
    case IST_FILE_OWN_BINARY:
        return "perhaps written by a newer version";
    case IST_FILE_BINARY:
        return "not valid UTF-8 text";
    case IST_FILE_TEXT:
    case IST_FILE_UNKNOWN:
    case IST_FILE_NKINDS: break;
    }
    return "";
}

ist_status
ist_file_expect(const char *path, unsigned accept, int gzip_ok, const char *want,
                ist_error *err)
{
    ist_file_kind k;
    int gz;
    ist_status rc = ist_file_sniff(path, &k, &gz, err);

    if (rc != IST_OK)
        return rc;
    if (gz && !gzip_ok)
        return ist_error_at(err, IST_ERR_FORMAT, path, 0,
                            "this is a gzip-compressed file (holding %s), not %s",
                            ist_file_kind_name(k), want);
    if (accept & IST_FILE_BIT(k))
        return IST_OK;
    const char *use = ist_file_kind_use(k);
    return ist_error_at(err, IST_ERR_FORMAT, path, 0, "this is %s%s%s%s%s, not %s",
                        gz ? "a gzip-compressed copy of " : "", ist_file_kind_name(k),
                        *use ? " (" : "", use, *use ? ")" : "", want);
}

/* version.c - the library's version string, set by meson. */
#include <isthmus/isthmus.h>

#ifndef IST_VERSION
#define IST_VERSION "unknown"
#endif

const char *
ist_version(void)
{
    return IST_VERSION;
}

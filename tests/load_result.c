/* load_result.c - load each result file named on the command line with ist_result_load()
 * and write it again to memory; exit 1 naming the first that fails. The CLI suite runs it
 * on every result file its cases write. */
#include <stdio.h>
#include <string.h>

#include <isthmus/isthmus.h>

int
main(int argc, char **argv)
{
    for (int i = 1; i < argc; i++) {
        ist_result *r = NULL;
        ist_error err;
        char *text = NULL, msg[1024];
        if (ist_result_load(argv[i], &r, &err) != IST_OK ||
            ist_result_render(r, &text, &err) != IST_OK) {
            ist_error_format(&err, msg, sizeof msg);
            fprintf(stderr, "load_result: %s\n", msg);
            ist_result_free(r);
            return 1;
        }
        ist_result_free_text(text);
        ist_result_free(r);
    }
    return 0;
}

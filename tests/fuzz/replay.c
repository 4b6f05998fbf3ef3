/* replay.c - runs a fuzz target over files given on the command line (the seed corpus
 * and every crash input found so far), so the regular test suite replays them under the
 * sanitizers without libFuzzer. Prints TAP. */
#include <dirent.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static int n;

static void
one(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f) {
        printf("not ok %d - %s (cannot open)\n", ++n, path);
        exit(1);
    }
    uint8_t *buf = NULL;
    size_t len = 0, cap = 0, got;
    do {
        if (len == cap) {
            cap = cap ? cap * 2 : 4096;
            buf = realloc(buf, cap);
        }
        got = fread(buf + len, 1, cap - len, f);
        len += got;
    } while (got > 0);
    fclose(f);
    LLVMFuzzerTestOneInput(buf, len);   /* a failure aborts, which fails the test */
    free(buf);
    printf("ok %d - %s\n", ++n, path);
}

int
main(int argc, char **argv)
{
    for (int i = 1; i < argc; i++) {
        struct stat st;
        if (stat(argv[i], &st) == 0 && S_ISDIR(st.st_mode)) {
            DIR *d = opendir(argv[i]);
            struct dirent *de;
            char p[4096];
            while (d && (de = readdir(d))) {
                if (de->d_name[0] == '.')
                    continue;
                snprintf(p, sizeof p, "%s/%s", argv[i], de->d_name);
                one(p);
            }
            if (d)
                closedir(d);
        } else {
            one(argv[i]);
        }
    }
    printf("1..%d\n# replay: %d passed, 0 failed\n", n, n);
    return 0;
}

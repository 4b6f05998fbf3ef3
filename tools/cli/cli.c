/* cli.c - shared helpers of the isthmus subcommands. */
#include "cli.h"

#include <ctype.h>

#include <errno.h>
#include <fcntl.h>
#include <poll.h>
#include <pthread.h>
#include <math.h>
#include <signal.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "spell.h"

cli_globals cli_g = {0, CLI_PROGRESS_AUTO, NULL};

int
cli_usage_error(const char *cmd, const char *fmt, ...)
{
    va_list ap;

    fprintf(stderr, "isthmus%s%s: ", cmd ? " " : "", cmd ? cmd : "");
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    if (cmd)
        fprintf(stderr, "\nTry 'isthmus %s --help'.\n", cmd);
    else
        fprintf(stderr, "\nTry 'isthmus --help'.\n");
    return CLI_EXIT_USAGE;
}

int
cli_report(const char *cmd, const ist_error *err)
{
    char buf[1024];

    cli_progress_done();
    ist_error_format(err, buf, sizeof buf);
    fprintf(stderr, "isthmus %s: %s\n", cmd, buf);
    if (err->code == IST_ERR_CANCELLED) {
        fprintf(stderr, "isthmus %s: stopped; no output file was written\n", cmd);
        return 130;
    }
    return CLI_EXIT_ERROR;
}

bool
cli_parse_u64(const char *cmd, const char *opt, const char *s, uint64_t lo, uint64_t hi,
              uint64_t *out)
{
    char *end;
    unsigned long long v;

    errno = 0;
    if (!s || !*s || *s == '-' || *s == '+' || *s == ' ')
        goto bad;
    v = strtoull(s, &end, 10);
    if (errno || *end)
        goto bad;
    if (v < lo || v > hi) {
        cli_usage_error(cmd, "%s: expected a whole number from %llu to %llu, got '%s'", opt,
                        (unsigned long long)lo, (unsigned long long)hi, s);
        return false;
    }
    *out = v;
    return true;
bad:
    cli_usage_error(cmd, "%s: expected a whole number, got '%s'", opt, s ? s : "");
    return false;
}

bool
cli_parse_size(const char *cmd, const char *opt, const char *s, size_t lo, size_t hi,
               size_t *out)
{
    uint64_t v;

    if (!cli_parse_u64(cmd, opt, s, lo, hi, &v))
        return false;
    *out = (size_t)v;
    return true;
}

bool
cli_parse_double(const char *cmd, const char *opt, const char *s, double lo, double hi,
                 double *out)
{
    char *end;
    double v;

    errno = 0;
    if (!s || !*s)
        goto bad;
    v = strtod(s, &end);
    if (errno || *end || !isfinite(v))
        goto bad;
    if (v < lo || v > hi) {
        cli_usage_error(cmd, "%s: expected a number from %g to %g, got '%s'", opt, lo, hi, s);
        return false;
    }
    *out = v;
    return true;
bad:
    cli_usage_error(cmd, "%s: expected a number, got '%s'", opt, s ? s : "");
    return false;
}

bool
cli_parse_threads(const char *cmd, const char *s, unsigned *out)
{
    size_t v;

    if (!cli_parse_size(cmd, "--threads", s, 0, IST_THREADS_MAX, &v))
        return false;
    *out = (unsigned)v;
    return true;
}

unsigned
cli_processors(void)
{
    long n = sysconf(_SC_NPROCESSORS_ONLN);
    return n < 1 ? 1u : n > (long)IST_THREADS_MAX ? IST_THREADS_MAX : (unsigned)n;
}

bool
cli_parse_choice(const char *cmd, const char *opt, const char *s, const char *const *choices,
                 int *out)
{
    char list[256] = "";

    for (int i = 0; choices[i]; i++) {
        if (strcmp(s, choices[i]) == 0) {
            *out = i;
            return true;
        }
        if (i)
            strncat(list, ", ", sizeof list - strlen(list) - 1);
        strncat(list, choices[i], sizeof list - strlen(list) - 1);
    }
    cli_usage_error(cmd, "%s: expected one of %s, got '%s'", opt, list, s);
    return false;
}

static bool
ends_in(const char *s, const char *end)
{
    size_t n = strlen(s), k = strlen(end);
    return n > k && strcmp(s + n - k, end) == 0;
}

bool
cli_vector_format(const char *cmd, const char *opt, const char *path, const char *choose,
                  ist_store_format *out)
{
    struct stat st;
    const char *dot = strrchr(path, '.'), *slash = strrchr(path, '/');

    if (strcmp(path, "-") == 0 || ends_in(path, ".txt") || ends_in(path, ".gz")) {
        *out = IST_STORE_TEXT;
        return true;
    }
    /* an existing device, pipe or directory has no name to go by: the writer speaks of it */
    if (ends_in(path, ".isv") || (stat(path, &st) == 0 && !S_ISREG(st.st_mode))) {
        *out = IST_STORE_NATIVE;
        return true;
    }
    if (dot && slash && dot < slash)
        dot = NULL;
    char why[112];
    if (dot)
        snprintf(why, sizeof why, "the ending '%.40s' names no vector format", dot);
    else
        snprintf(why, sizeof why, "the name has no ending to tell the vector format by");
    cli_usage_error(cmd, "%s '%s': %s; name it .isv (native file), .txt or .gz (text table)%s%s",
                    opt, path, why, choose ? ", or choose with " : "", choose ? choose : "");
    return false;
}

static volatile sig_atomic_t signals_seen;

static void
on_signal(int sig)
{
    if (signals_seen++ > 0) {
        signal(sig, SIG_DFL);
        raise(sig);
        return;
    }
    ist_cancel_request();
}

void
cli_install_signals(void)
{
    struct sigaction sa;

    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_signal;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, NULL);
    sigaction(SIGTERM, &sa, NULL);
    /* a reader that stops early (| head) must not kill the run before its files are moved
     * into place: writes to it fail with EPIPE instead, and cli_finish() takes that calmly */
    signal(SIGPIPE, SIG_IGN);
}

bool
cli_output_dir_ok(const char *cmd, const char *path)
{
    char dir[4096];
    const char *slash = strrchr(path, '/');
    struct stat st;

    if (stat(path, &st) == 0 && !S_ISREG(st.st_mode) && !S_ISDIR(st.st_mode))
        return true;   /* a device or a pipe: written in place */
    if (slash && (size_t)(slash - path) >= sizeof dir)
        return true;   /* let the writer report it */
    if (slash) {
        memcpy(dir, path, (size_t)(slash - path));
        dir[slash - path] = '\0';
    }
    if (access(!slash ? "." : slash == path ? "/" : dir, W_OK) == 0)
        return true;
    fprintf(stderr, "isthmus %s: %s: cannot write in its directory (%s)\n", cmd, path,
            strerror(errno));
    return false;
}

/* Where an output lands: the file itself when it exists, else its directory and name
 * (the writer renames a temporary over that name). */
typedef struct file_key {
    bool exists, device;
    dev_t dev;
    ino_t ino;
    const char *base;
} file_key;

static void
key_of(const char *path, file_key *k)
{
    struct stat st;
    char dir[4096];
    const char *slash = strrchr(path, '/');

    memset(k, 0, sizeof *k);
    if (stat(path, &st) == 0) {
        k->exists = true;
        k->device = !S_ISREG(st.st_mode);
        k->dev = st.st_dev;
        k->ino = st.st_ino;
        return;
    }
    k->base = slash ? slash + 1 : path;
    if (slash && (size_t)(slash - path) < sizeof dir) {
        memcpy(dir, path, (size_t)(slash - path));
        dir[slash - path] = '\0';
    }
    if (stat(!slash ? "." : slash == path ? "/" : dir, &st) == 0) {
        k->dev = st.st_dev;
        k->ino = st.st_ino;
    } else {
        k->base = NULL;    /* no directory: cli_output_dir_ok says so */
    }
}

static bool
same_key(const file_key *a, const file_key *b)
{
    if (a->exists != b->exists || a->device || b->device)
        return false;
    if (a->exists)
        return a->dev == b->dev && a->ino == b->ino;
    return a->base && b->base && a->dev == b->dev && a->ino == b->ino &&
           strcmp(a->base, b->base) == 0;
}

/* An output goes to standard output: keep the descriptor for that data alone and send
 * what the command prints there (tables, summaries) to standard error, or nowhere
 * with -q, so the data can be piped. */
static void
claim_stdout(void)
{
    int data, to;

    fflush(stdout);
    data = dup(STDOUT_FILENO);
    to = cli_g.verbosity < 0 ? open("/dev/null", O_WRONLY | O_CLOEXEC) : dup(STDERR_FILENO);
    if (data < 0 || to < 0 || dup2(to, STDOUT_FILENO) < 0) {
        if (data >= 0)
            close(data);
        if (to >= 0)
            close(to);
        return;   /* no descriptor to spare: leave standard output as it is */
    }
    close(to);
    ist_output_set_stdout(data);
}

static bool
skipped(const char *p)
{
    return !p || strcmp(p, "-") == 0;
}

int
cli_check_files(const char *cmd, const char *const *inputs, size_t nin,
                const char *const *outputs, size_t nout)
{
    for (size_t i = 0; i < nout; i++) {
        file_key ko, k;
        if (skipped(outputs[i]))
            continue;
        key_of(outputs[i], &ko);
        for (size_t j = 0; j < nin && ko.exists; j++) {
            if (skipped(inputs[j]))
                continue;
            key_of(inputs[j], &k);
            if (same_key(&ko, &k))
                return cli_usage_error(cmd, "output '%s' is the input '%s': writing it would "
                                       "destroy the input; name another file", outputs[i],
                                       inputs[j]);
        }
        for (size_t j = 0; j < i; j++) {
            if (skipped(outputs[j]))
                continue;
            key_of(outputs[j], &k);
            if (same_key(&ko, &k))
                return cli_usage_error(cmd, "outputs '%s' and '%s' name the same file; give "
                                       "each output its own name", outputs[j], outputs[i]);
        }
    }
    for (size_t i = 0; i < nout; i++)
        if (!skipped(outputs[i]) && !cli_output_dir_ok(cmd, outputs[i]))
            return CLI_EXIT_ERROR;
    size_t to_stdout = 0;
    for (size_t i = 0; i < nout; i++)
        to_stdout += outputs[i] && strcmp(outputs[i], "-") == 0;
    if (to_stdout > 1)
        return cli_usage_error(cmd, "only one output may go to standard output ('-')");
    if (to_stdout == 1)
        claim_stdout();
    return 0;
}

/* "a, b and c" of names[from..to) into buf. */
static void
name_list(char **names, size_t from, size_t to, char *buf, size_t cap)
{
    size_t len = 0;

    buf[0] = '\0';
    for (size_t i = from; i < to && len + 1 < cap; i++) {
        int n = snprintf(buf + len, cap - len, "%s%s",
                         i == from ? "" : i + 1 == to ? " and " : ", ", names[i]);
        if (n < 0)
            break;
        len += (size_t)n;
    }
}

static int
finish_group(const char *cmd, int rc)
{
    size_t n = ist_output_waiting(), done = 0;
    char **names = calloc(n ? n : 1, sizeof *names);
    char list[2048];
    ist_error err;

    for (size_t i = 0; names && i < n; i++)
        names[i] = strdup(ist_output_waiting_name(i));
    if (ist_output_release(&done, &err) != IST_OK) {
        cli_progress_done();
        if (err.code == IST_ERR_CANCELLED) {
            fprintf(stderr, "isthmus %s: stopped on request; no output file was written\n",
                    cmd);
            rc = 130;
        } else {
            char buf[1024];
            ist_error_format(&err, buf, sizeof buf);
            fprintf(stderr, "isthmus %s: %s\n", cmd, buf);
            if (names && done > 0) {
                name_list(names, 0, done, list, sizeof list);
                fprintf(stderr, "isthmus %s: written: %s\n", cmd, list);
            }
            if (names) {
                name_list(names, done, n, list, sizeof list);
                fprintf(stderr, "isthmus %s: not written: %s\n", cmd, list);
            }
            rc = CLI_EXIT_ERROR;
        }
    }
    for (size_t i = 0; names && i < n; i++)
        free(names[i]);
    free(names);
    return rc;
}

/* Standard output is a pipe whose reader has gone. */
static bool
reader_gone(int e)
{
    struct pollfd p = {STDOUT_FILENO, POLLOUT, 0};
    return e == EPIPE || (poll(&p, 1, 0) == 1 && (p.revents & POLLERR));
}

#define WROTE_MAX 16
static char *wrote_lines[WROTE_MAX];
static size_t wrote_n;

void
cli_wrote(const char *path, const char *what_fmt, ...)
{
    char what[256];
    va_list ap;

    if (!path || strcmp(path, "-") == 0 || wrote_n == WROTE_MAX)
        return;
    va_start(ap, what_fmt);
    vsnprintf(what, sizeof what, what_fmt, ap);
    va_end(ap);
    size_t len = strlen(path) + strlen(what) + 16;
    char *line = malloc(len);
    if (!line)
        return;
    snprintf(line, len, "wrote %s (%s)", path, what);
    wrote_lines[wrote_n++] = line;
}

/* The recorded "wrote" lines, printed when the files are in place, then forgotten. */
static int
say_wrote(const char *cmd, int rc)
{
    for (size_t i = 0; i < wrote_n; i++) {
        if (rc == CLI_EXIT_OK || rc == CLI_EXIT_GATE)
            cli_info("isthmus %s: %s\n", cmd, wrote_lines[i]);
        free(wrote_lines[i]);
        wrote_lines[i] = NULL;
    }
    wrote_n = 0;
    return rc;
}

static int finish_files(const char *cmd, int rc);

int
cli_finish(const char *cmd, int rc)
{
    return say_wrote(cmd, finish_files(cmd, rc));
}

static int
finish_files(const char *cmd, int rc)
{
    errno = 0;
    if (fflush(stdout) != 0 || ferror(stdout)) {
        int e = errno;
        if (reader_gone(e))   /* the reader took what it wanted (| head): not a failure */
            return rc == CLI_EXIT_OK || rc == CLI_EXIT_GATE ? finish_group(cmd, rc)
                                                           : (ist_output_discard(), rc);
        size_t n = ist_output_waiting();
        cli_progress_done();
        fprintf(stderr, "isthmus %s: standard output: cannot write%s%s%s\n", cmd,
                e ? " (" : "", e ? strerror(e) : "", e ? ")" : "");
        if (n > 0)
            fprintf(stderr, "isthmus %s: so no output file was written (%zu held back)\n",
                    cmd, n);
        ist_output_discard();
        return rc == CLI_EXIT_OK || rc == CLI_EXIT_GATE ? CLI_EXIT_ERROR : rc;
    }
    if (rc != CLI_EXIT_OK && rc != CLI_EXIT_GATE) {
        ist_output_discard();
        return rc;
    }
    return finish_group(cmd, rc);
}

double
cli_now(void)
{
    struct timespec ts;

    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static double last_progress = -1;
static int progress_shown;

bool
cli_progress_enabled(void)
{
    if (cli_g.verbosity < 0 || cli_g.progress == CLI_PROGRESS_NEVER)
        return false;
    if (cli_g.progress == CLI_PROGRESS_ALWAYS)
        return true;
    return isatty(STDERR_FILENO);
}

void
cli_progress_update(const char *fmt, ...)
{
    va_list ap;
    double t;

    if (!cli_progress_enabled())
        return;
    t = cli_now();
    if (last_progress >= 0 && t - last_progress < 0.25)
        return;
    last_progress = t;
    fputs("\r\033[K", stderr);
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fflush(stderr);
    progress_shown = 1;
}

void
cli_progress_done(void)
{
    if (progress_shown) {
        fputs("\r\033[K", stderr);
        fflush(stderr);
    }
    progress_shown = 0;
    last_progress = -1;
}

static struct {
    pthread_t thread;
    pthread_mutex_t lock;
    pthread_cond_t wake;
    bool running, stop;
    char label[160];
    double t0;
} ticker = {.lock = PTHREAD_MUTEX_INITIALIZER, .wake = PTHREAD_COND_INITIALIZER};

static void *
tick(void *arg)
{
    (void)arg;
    pthread_mutex_lock(&ticker.lock);
    while (!ticker.stop) {
        struct timespec until;
        clock_gettime(CLOCK_REALTIME, &until);
        until.tv_nsec += 250000000L;
        if (until.tv_nsec >= 1000000000L) {
            until.tv_sec++;
            until.tv_nsec -= 1000000000L;
        }
        pthread_cond_timedwait(&ticker.wake, &ticker.lock, &until);
        if (!ticker.stop)
            cli_progress_update("%s, %.0f s", ticker.label, cli_now() - ticker.t0);
    }
    pthread_mutex_unlock(&ticker.lock);
    return NULL;
}

void
cli_progress_start(const char *label)
{
    if (!cli_progress_enabled() || ticker.running)
        return;
    snprintf(ticker.label, sizeof ticker.label, "%s", label);
    ticker.t0 = cli_now();
    ticker.stop = false;
    last_progress = -1;
    cli_progress_update("%s, 0 s", ticker.label);
    ticker.running = pthread_create(&ticker.thread, NULL, tick, NULL) == 0;
}

void
cli_progress_relabel(const char *fmt, ...)
{
    va_list ap;

    if (!ticker.running)
        return;
    pthread_mutex_lock(&ticker.lock);
    va_start(ap, fmt);
    vsnprintf(ticker.label, sizeof ticker.label, fmt, ap);
    va_end(ap);
    pthread_mutex_unlock(&ticker.lock);
}

void
cli_progress_stop(void)
{
    if (ticker.running) {
        pthread_mutex_lock(&ticker.lock);
        ticker.stop = true;
        pthread_cond_signal(&ticker.wake);
        pthread_mutex_unlock(&ticker.lock);
        pthread_join(ticker.thread, NULL);
        ticker.running = false;
    }
    cli_progress_done();
}

void
cli_info(const char *fmt, ...)
{
    va_list ap;

    if (cli_g.verbosity < 0)
        return;
    cli_progress_done();
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
}


bool
cli_global_option(const char *cmd, int c, const char *arg)
{
    static const char *const when[] = {"auto", "always", "never", NULL};
    int w;

    switch (c) {
    case 'q': cli_g.verbosity = -1; return true;
    case 'v': cli_g.verbosity++; return true;
    case CLI_OPT_PROGRESS:
        if (!cli_parse_choice(cmd, "--progress", arg, when, &w))
            return false;
        cli_g.progress = (cli_progress_mode)w;
        return true;
    default: return false;
    }
}

static const char *
option_name(const void *ctx, size_t i)
{
    return ((const struct option *)ctx)[i].name;
}

static const char *
list_name(const void *ctx, size_t i)
{
    return ((const char *const *)ctx)[i];
}

/* ", --a, --b or --c" of the chosen names into buf (prefix before each, "or" last). */
static void
or_list(char *buf, size_t cap, const char *prefix, const char *(*get)(const void *, size_t),
        const void *ctx, const size_t *ix, size_t n)
{
    size_t len = strlen(buf);
    for (size_t i = 0; i < n && len + 1 < cap; i++) {
        int k = snprintf(buf + len, cap - len, "%s%s%s", i == 0 ? "" : i + 1 == n ? " or " : ", ",
                         prefix, get(ctx, ix[i]));
        if (k < 0)
            break;
        len += (size_t)k;
    }
    if (len >= cap)
        buf[cap - 1] = '\0';
}

/* Options whose help text mentions word (at least 3 letters, any case): the help is
 * read line by line; a line starting with "-x, --name" or "--name" opens an option,
 * deeper indented lines continue it. */
static size_t
help_mentions(const char *word, const struct option *opts, size_t nopts, size_t *out, size_t cap)
{
    char *text = NULL, *line, *save = NULL;
    size_t size = 0, found = 0, len = strlen(word);
    ptrdiff_t current = -1;
    FILE *f;

    if (!cli_g.help || len < 3 || !(f = open_memstream(&text, &size)))
        return 0;
    cli_g.help(f);
    fclose(f);
    for (line = strtok_r(text, "\n", &save); line; line = strtok_r(NULL, "\n", &save)) {
        const char *p = line + strspn(line, " ");
        if (p - line <= 6 && p[0] == '-') {   /* an option line: find which */
            const char *dd = strstr(p, "--");
            current = -1;
            for (size_t i = 0; dd && i < nopts; i++) {
                size_t nl = strlen(opts[i].name);
                if (strncmp(dd + 2, opts[i].name, nl) == 0 && !isalnum((unsigned char)dd[2 + nl]) &&
                    dd[2 + nl] != '-')
                    current = (ptrdiff_t)i;
            }
            p = dd ? dd + strcspn(dd, " ") : p;   /* the description, past the name */
        } else if (p - line <= 6) {
            current = -1;   /* prose, a heading or an example */
        }
        if (current < 0 || opts[current].val == 'h')
            continue;
        for (const char *q = p; *q && found < cap; q++)
            if (strncasecmp(q, word, len) == 0) {
                bool dup = false;
                for (size_t k = 0; k < found; k++)
                    dup |= out[k] == (size_t)current;
                if (!dup)
                    out[found++] = (size_t)current;
                break;
            }
    }
    free(text);
    return found;
}

bool
cli_other_option(const char *cmd, int c, const struct option *opts, char **argv)
{
    const char *arg = argv[optind - 1];
    size_t nopts = 0, near[4], nn, nm, ix[8];
    char name[128], hint[512] = "";

    if (c == 'q' || c == 'v' || c == CLI_OPT_PROGRESS)
        return cli_global_option(cmd, c, optarg);
    while (opts[nopts].name)
        nopts++;
    if (strncmp(arg, "--", 2) != 0) {   /* a short option: getopt names it in optopt */
        for (size_t i = 0; optopt && i < nopts; i++)
            if (opts[i].val == optopt && opts[i].has_arg == required_argument)
                return !cli_usage_error(cmd, "-%c: expected a value (-%c VALUE)", optopt,
                                       optopt);
        return !cli_usage_error(cmd, "unknown option '-%c'", optopt ? optopt : '?');
    }
    size_t len = strcspn(arg + 2, "=");
    bool has_value = arg[2 + len] == '=';
    snprintf(name, sizeof name, "%.*s", (int)(len < 100 ? len : 100), arg + 2);
    nm = 0;
    for (size_t i = 0; *name && i < nopts; i++)
        if (strncmp(opts[i].name, name, strlen(name)) == 0) {
            if (strcmp(opts[i].name, name) == 0) {
                ix[0] = i;
                nm = 1;
                break;
            }
            if (nm < 8)
                ix[nm++] = i;
        }
    if (nm == 1 && *name) {
        const struct option *o = &opts[ix[0]];
        if (has_value && o->has_arg == no_argument)
            return !cli_usage_error(cmd, "--%s takes no value, got '%s'", o->name, arg);
        if (!has_value && o->has_arg == required_argument)
            return !cli_usage_error(cmd, "--%s: expected a value (--%s=VALUE)", o->name, o->name);
    }
    if (nm > 1) {
        or_list(hint, sizeof hint, "--", option_name, opts, ix, nm);
        return !cli_usage_error(cmd, "'--%s' is ambiguous: it could be %s", name, hint);
    }
    nn = spell_nearest(name, option_name, opts, nopts, near, 3);
    if (nn > 0) {
        or_list(hint, sizeof hint, "--", option_name, opts, near, nn);
        return !cli_usage_error(cmd, "unknown option '--%s'; did you mean %s?", name, hint);
    }
    nn = help_mentions(name, opts, nopts, ix, 3);
    if (nn > 0) {
        or_list(hint, sizeof hint, "--", option_name, opts, ix, nn);
        return !cli_usage_error(cmd, "unknown option '--%s'; the help of %s mentions '%s'", name,
                               hint, name);
    }
    return !cli_usage_error(cmd, "unknown option '--%s'", name);
}

int
cli_unknown_name(const char *cmd, const char *what, const char *name, const char *const *names)
{
    size_t n = 0, near[3], nn;
    char hint[256] = "";

    while (names[n])
        n++;
    nn = spell_nearest(name, list_name, names, n, near, 3);
    if (nn == 0)
        return cli_usage_error(cmd, "no %s named '%s'", what, name);
    or_list(hint, sizeof hint, "", list_name, names, near, nn);
    return cli_usage_error(cmd, "no %s named '%s'; did you mean %s?", what, name, hint);
}

/* isthmus/gate.h - release gate: a thresholds file of rules, checked against a result
 * (and optionally a baseline result) to give a verdict per rule and overall.
 *
 * Owns the parsed rules (ist_thresholds) and the verdict (ist_verdict); the results it
 * judges are typed records (isthmus/result.h). The thresholds file format is in docs/formats.md, section
 * "Thresholds file"; the verdict JSON in section "Verdict JSON". A drop rule compares
 * precision@k of the new result with a baseline scored on the same test list by a paired
 * bootstrap over the test words (Koehn 2004, "Statistical significance tests for machine
 * translation evaluation"): the rule fails only when the whole 95% interval of the change
 * lies below -max_drop. Intervals of single figures are percentile bootstrap intervals
 * (Efron & Tibshirani 1993), see bootstrap.h. A verdict that passes may carry conditions:
 * leakage (test source words that are also seeds, scored with the overlap allowed) and
 * rules that could not be checked; the rules 'refuse leakage' and 'refuse unchecked' make
 * either a failure. */
#ifndef ISTHMUS_GATE_H
#define ISTHMUS_GATE_H

#include <stdbool.h>
#include <stddef.h>
#include <isthmus/error.h>
#include <isthmus/metrics.h>
#include <isthmus/result.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum ist_gate_bound { IST_GATE_MIN, IST_GATE_MAX } ist_gate_bound;

typedef enum ist_gate_figure {
    IST_GATE_PRECISION,          /* precision@k of one run, overall or in one band */
    IST_GATE_COVERAGE,           /* covered / distinct test source words */
    IST_GATE_DROP,               /* change of precision@k (new - baseline), paired bootstrap */
    IST_GATE_LEAKAGE,            /* 'refuse leakage': fails when test words are also seeds */
    IST_GATE_UNCHECKED           /* 'refuse unchecked': fails when another rule was skipped */
} ist_gate_figure;

typedef enum ist_gate_outcome { IST_GATE_PASS, IST_GATE_FAIL, IST_GATE_SKIP } ist_gate_outcome;

/* One rule as read from the file. */
typedef struct ist_gate_rule {
    size_t line;                 /* 1-based line in the thresholds file */
    const char *text;            /* the rule's words, single-spaced */
    ist_gate_bound bound_kind;
    ist_gate_figure figure;
    size_t k;                    /* precision@k: 1, 5 or 10 (0 for coverage) */
    int retrieval;               /* -1: any, else an ist_retrieval */
    const char *label;           /* "seed", "refined", or NULL: the last such run */
    bool has_band;
    size_t band_from, band_to;   /* frequency ranks; band_to 0: no upper end */
    double bound;                /* a fraction in [0, 1] */
} ist_gate_rule;

typedef struct ist_thresholds ist_thresholds;

/** Read a thresholds file (plain or gzip). Errors name the file and line and what was
 *  expected (IST_ERR_FORMAT); a file without rules is an error too.
 *  Success: *out owns the rules; release with ist_thresholds_free(). */
IST_API ist_status ist_thresholds_read(const char *path, ist_thresholds **out, ist_error *err);

/** The same from text of len bytes; name is used in messages. */
IST_API ist_status ist_thresholds_parse(const char *text, size_t len, const char *name,
                                        ist_thresholds **out, ist_error *err);

IST_API void ist_thresholds_free(ist_thresholds *t);                 /* NULL: no-op */
IST_API size_t ist_thresholds_count(const ist_thresholds *t);
/** Rule i; borrowed until ist_thresholds_free(). */
IST_API const ist_gate_rule *ist_thresholds_rule(const ist_thresholds *t, size_t i);

typedef struct ist_gate_opts {
    ist_ci_opts ci;              /* paired bootstrap, and intervals a result lacks */
} ist_gate_opts;

IST_API void ist_gate_opts_init(ist_gate_opts *opts);

/* The verdict on one rule. */
typedef struct ist_gate_check {
    const ist_gate_rule *rule;   /* a copy owned by the verdict */
    ist_gate_outcome outcome;
    double figure;               /* the measured value; for drop, new minus baseline */
    bool has_interval;
    double lo, hi;               /* its 95% interval (drop: of the change) */
    double new_value, baseline_value;    /* drop: the two precisions */
    char run[48];                /* "refined csls": the run the figure came from */
    char note[128];              /* why a rule was skipped, or "" */
} ist_gate_check;

typedef struct ist_verdict ist_verdict;

/** Check every rule against result (and baseline, may be NULL: drop rules are then
 *  skipped). A precision rule on a band that holds no test word is skipped too.
 *  IST_ERR_INVALID when a rule names a run or band the result does not hold, when the
 *  baseline was scored on a different test list (the list checksums differ, or one of
 *  the two has none), or when a drop rule meets a run without per-query outcomes.
 *  Release *out with ist_verdict_free(). */
IST_API ist_status ist_gate_evaluate(const ist_thresholds *rules, const ist_result *result,
                                     const ist_result *baseline, const ist_gate_opts *opts,
                                     ist_verdict **out, ist_error *err);
IST_API void ist_verdict_free(ist_verdict *v);                       /* NULL: no-op */

IST_API size_t ist_verdict_count(const ist_verdict *v);
/** Check i; borrowed until ist_verdict_free(). */
IST_API const ist_gate_check *ist_verdict_check(const ist_verdict *v, size_t i);
/** The thresholds file the verdict was made with, as named to the gate. Borrowed until
 *  ist_verdict_free(). */
IST_API const char *ist_verdict_thresholds(const ist_verdict *v);
/** True when no rule failed (skipped rules do not fail). */
IST_API bool ist_verdict_passed(const ist_verdict *v);
/** The conditions of a verdict, whether it passed or not: "leakage: N test source words
 *  are also seed source words" and "N rules not checked"; i from 0, NULL past the last.
 *  Borrowed until ist_verdict_free(). */
IST_API const char *ist_verdict_condition(const ist_verdict *v, size_t i);

/** Load a verdict JSON written by ist_verdict_write() and check that it belongs to
 *  result: its schema (format, version, verdict "pass" or "fail", a list of rules each
 *  with an outcome pass, fail or skip, counts that agree with the rules) and its identity
 *  (the test list checksum and the fingerprints of both vector files equal the result's).
 *  IST_ERR_FORMAT naming the file and line otherwise. Nothing is kept (ist_verdict_load()
 *  keeps it). */
IST_API ist_status ist_verdict_check_file(const char *path, const ist_result *result,
                                          ist_error *err);
/** Load a verdict JSON as ist_verdict_check_file() checks it, into a verdict the report
 *  and ist_verdict_line() take: its rules (text, line, figure, bound, band), outcomes,
 *  figures with intervals, notes and conditions. A rule's retrieval and map stage are
 *  not recorded apart from its text and run (retrieval -1, label NULL). IST_ERR_FORMAT
 *  naming the file and line for a member of the wrong type or range. Success: *out owns
 *  the verdict; release it with ist_verdict_free(). */
IST_API ist_status ist_verdict_load(const char *path, const ist_result *result,
                                    ist_verdict **out, ist_error *err);
IST_API size_t ist_verdict_tally(const ist_verdict *v, ist_gate_outcome outcome);

/** One line of text for check i (no newline): outcome, file:line, rule, figure with
 *  its interval, and the bound. Truncated to cap bytes. */
IST_API void ist_verdict_line(const ist_verdict *v, size_t i, char *buf, size_t cap);

/** Write the verdict JSON atomically ("-": standard output). */
IST_API ist_status ist_verdict_write(const ist_verdict *v, const char *path, ist_error *err);

/** Write the verdict as a JUnit-style XML report, atomically ("-": standard output): one
 *  testsuite named after the thresholds file, one testcase per rule in file order, with a
 *  failure element for a failed rule and a skipped element for one not checked
 *  (docs/formats.md "JUnit report"). */
IST_API ist_status ist_verdict_write_junit(const ist_verdict *v, const char *path,
                                           ist_error *err);

#ifdef __cplusplus
}
#endif
#endif

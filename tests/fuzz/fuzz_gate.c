/* fuzz_gate.c - the gate's inputs: any bytes as a thresholds file, and as a result JSON
 * judged against fixed rules (and against itself as a baseline). A refusal always says why;
 * a verdict always has one check per rule. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <isthmus/gate.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static const char rules_text[] =
    "min p@1 csls refined 0.5\n"
    "min coverage 0.9\n"
    "max drop p@1 csls refined 0.03\n";

int
LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    ist_thresholds *t = NULL, *fixed = NULL;
    ist_result *r = NULL;
    ist_error e;

    if (ist_thresholds_parse((const char *)data, size, "fuzz.thresholds", &t, &e) == IST_OK) {
        for (size_t i = 0; i < ist_thresholds_count(t); i++)
            if (!ist_thresholds_rule(t, i))
                abort();
        ist_thresholds_free(t);
    } else if (t != NULL || e.msg[0] == '\0') {
        abort();
    }
    if (ist_thresholds_parse(rules_text, sizeof rules_text - 1, "rules", &fixed, &e) != IST_OK)
        abort();
    if (ist_result_parse((const char *)data, size, "fuzz.json", &r, &e) == IST_OK) {
        ist_gate_opts o;
        ist_verdict *v = NULL;
        ist_gate_opts_init(&o);
        o.ci.resamples = 50;   /* keep each run short */
        if (ist_gate_evaluate(fixed, r, r, &o, &v, &e) == IST_OK) {
            if (ist_verdict_count(v) != ist_thresholds_count(fixed))
                abort();
            char line[512];
            for (size_t i = 0; i < ist_verdict_count(v); i++)
                ist_verdict_line(v, i, line, sizeof line);
            ist_verdict_free(v);
        } else if (v != NULL || e.msg[0] == '\0') {
            abort();
        }
        ist_result_free(r);
    } else if (r != NULL || e.msg[0] == '\0') {
        abort();
    }
    ist_thresholds_free(fixed);
    return 0;
}

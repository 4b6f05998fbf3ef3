/* gate_int.h - the structs behind the gate's handles, shared by gate.c (thresholds),
 * gate_eval.c (results, verdict), gate_verdict.c (verdict text and JSON) and
 * gate_verdict_load.c (a verdict JSON read back). */
#ifndef ISTHMUS_GATE_INT_H
#define ISTHMUS_GATE_INT_H

#include <isthmus/gate.h>

#include "json_int.h"

/* The verdict JSON format version written (gate_verdict.c) and read (gate_verdict_load.c). */
#define VERDICT_FORMAT_VERSION 1

struct ist_thresholds {
    char *name;                  /* file name for messages */
    ist_gate_rule *rules;
    size_t n, cap;
};

struct ist_verdict {
    char *rules_name, *result_name, *baseline_name;
    const ist_result *result;    /* borrowed while evaluating */
    bool has_list_ck, has_kept, has_fp;
    uint64_t list_ck, kept_ck, sources_hash, source_fp, target_fp;
    char *conditions[2];         /* leakage, unchecked rules; NULL when none */
    size_t nconditions;
    ist_ci_opts ci;
    ist_gate_check *checks;
    ist_gate_rule *rules;        /* copies (texts owned), so the verdict outlives the rules */
    size_t n;
};

#endif

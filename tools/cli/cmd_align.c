/* cmd_align.c - isthmus align: fit an orthogonal map from seed pairs, refine it, save it. */
#include <getopt.h>
#include <inttypes.h>
#include <stdlib.h>
#include <string.h>

#include "eval_cli.h"

#define CMD "align"

static void
help(FILE *out)
{
    fputs("Usage: isthmus align [OPTIONS] SRC TGT -o MAP\n"
          "Fit an orthogonal map from the source vectors onto the target vectors on seed word\n"
          "pairs (Procrustes), refine it on mutual CSLS neighbours, and write the map file.\n"
          "\n"
          "Arguments:\n"
          "  SRC, TGT                source and target vector files (native or text table)\n"
          "\n"
          "Options:\n"
          "  -o, --output=MAP        map file to write (required)\n"
          "      --seeds=FILE        seed pairs: 'source target' per line, tab or space\n"
          "      --spelt-alike       also use words spelt the same in both vocabularies\n"
          "      --spelt-alike-min-freq=N\n"
          "                          ...seen at least N times on both sides [default: 5]\n"
          "      --spelt-alike-codes-only\n"
          "                          ...and only those holding a letter and a digit (codes,\n"
          "                          sizes: tw-4410, 500ml; not prices such as 17.99) or a\n"
          "                          capital letter (only where case was kept)\n"
          "      --min-seeds=N       refuse to fit on fewer kept seed pairs [default: the\n"
          "                          dimension: fewer pairs leave the map undetermined]\n"
          "      --hold-out=FRACTION hold out this share of the --seeds source words as a test\n"
          "                          list (split by source word) [default: 0]\n"
          "      --split-seed=N      seed of the hold-out split [default: 1]\n"
          "      --write-test=FILE   write the held-out pairs to FILE\n"
          "      --test=FILE         score the map before and after refinement on this list\n"
          "      --standardise=STEPS steps applied to both sides before the fit, comma-\n"
          "                          separated: length (scale to length 1), mean (subtract\n"
          "                          the mean vector), alternate[=N] (length and mean in\n"
          "                          turn N times [5]), none [default: " IST_NORM_DEFAULT "]\n"
          "      --refine-rounds=N   at most N refinement rounds, 0 = none [default: 5]\n"
          "      --refine-vocab=N    refine among the N most frequent words of each side\n"
          "                          [default: 5000]\n"
          "      --refine-keep-seeds refit on the induced pairs and the seed pairs together\n"
          "                          [default: induced pairs only]\n"
          "      --mapped-out=FILE   also write the mapped source vectors as a vector file\n",
          out);
    ev_common_help(out, EV_HELP_SEARCH | EV_HELP_RANK | EV_HELP_SCORING | EV_HELP_DIAG, "both");
    fputs("  -h, --help              show this help and exit\n"
          "\n"
          "Refinement stops early when the mean CSLS of the induced pairs stops rising.\n"
          "All files are written to a temporary name and renamed into place when complete.\n"
          "\n"
          "Example (en.isv, es.isv from 'isthmus train -o en.isv data-samples/tillwick-en.txt.gz'\n"
          "and the same for es):\n"
          "  isthmus align en.isv es.isv --seeds=data-samples/demo-seed.pairs \\\n"
          "      --test=data-samples/demo-test.pairs -o shop.map\n",
          out);
}

enum {
    OPT_SEEDS = 1,
    OPT_IDENT,
    OPT_IDENT_MIN,
    OPT_IDENT_MARKED,
    OPT_HOLD_OUT,
    OPT_SPLIT_SEED,
    OPT_WRITE_TEST,
    OPT_TEST,
    OPT_NORMALISE,
    OPT_ROUNDS,
    OPT_RVOCAB,
    OPT_MAPPED,
    OPT_KEEP_SEEDS,
    OPT_MIN_SEEDS,
};

typedef struct args {
    const char *src, *tgt, *out, *seeds, *test, *write_test, *mapped, *normalise;
    bool ident, ident_marked, keep_seeds;
    uint64_t ident_min, split_seed;
    double hold_out;
    size_t rounds, rvocab, min_seeds;
    ev_common c;
} args;

/* Progress: the rounds of refinement as they end (the entry after the last allowed round
 * only checks the last refit, and is not a round of its own). */
static void
round_done(const ist_align_round *r, void *ctx)
{
    size_t most = *(const size_t *)ctx;
    if (r->round > most)
        cli_progress_relabel("align: final check after round %zu done (%zu pairs)", most,
                             r->pairs);
    else
        cli_progress_relabel("align: refinement round %zu of at most %zu done (%zu pairs)",
                             r->round, most, r->pairs);
}

/* The refinement log, from the map's history once the fit is done (after the seed fit
 * line). Entry r measures the map that went into it (the seed fit for r = 1, else the map
 * refitted in round r - 1) by the mutual CSLS neighbours it induces; entries 1..rounds refit
 * on those pairs, and entry rounds + 1 only checks the last refit. */
static void
print_refinement(const ist_map *map, size_t rounds)
{
    for (size_t i = 0; i < ist_map_rounds(map); i++) {
        ist_align_round r = ist_map_round(map, i);
        char step[48], from[48];
        if (r.round <= rounds)
            snprintf(step, sizeof step, "round %zu/%zu", r.round, rounds);
        else
            snprintf(step, sizeof step, "final check");
        if (r.round == 1)
            snprintf(from, sizeof from, "the seed fit");
        else
            snprintf(from, sizeof from, "the map of round %zu", r.round - 1);
        if (!r.kept) {
            char back[48];
            if (r.round == 2)
                snprintf(back, sizeof back, "the seed fit");
            else
                snprintf(back, sizeof back, "the map of round %zu", r.round - 2);
            cli_info("refine     %s: %s pairs %zu words both ways, mean CSLS %.4f, no gain; "
                     "back to %s\n", step, from, r.pairs, r.mean_csls, back);
        } else if (r.seed_cos == r.seed_cos) {
            cli_info("refine     %s: %s pairs %zu words both ways, mean CSLS %.4f; refit on "
                     "them: mean cosine %.4f, orthogonality error %.2g\n", step, from, r.pairs,
                     r.mean_csls, r.seed_cos, r.orth_error);
        } else {
            cli_info("refine     %s: %s pairs %zu words both ways, mean CSLS %.4f, still "
                     "rising; kept, all %zu rounds done\n", step, from, r.pairs, r.mean_csls,
                     rounds);
        }
    }
}

static int
parse(int argc, char **argv, args *a)
{
    static const struct option opts[] = {
        CLI_OPT_OUTPUT,
        {"seeds", required_argument, NULL, OPT_SEEDS},
        {"spelt-alike", no_argument, NULL, OPT_IDENT},
        {"spelt-alike-min-freq", required_argument, NULL, OPT_IDENT_MIN},
        {"spelt-alike-codes-only", no_argument, NULL, OPT_IDENT_MARKED},
        {"hold-out", required_argument, NULL, OPT_HOLD_OUT},
        {"split-seed", required_argument, NULL, OPT_SPLIT_SEED},
        {"write-test", required_argument, NULL, OPT_WRITE_TEST},
        EV_OPT_TEST_ROW(OPT_TEST),
        {"standardise", required_argument, NULL, OPT_NORMALISE},
        {"refine-rounds", required_argument, NULL, OPT_ROUNDS},
        {"refine-vocab", required_argument, NULL, OPT_RVOCAB},
        {"mapped-out", required_argument, NULL, OPT_MAPPED},
        {"refine-keep-seeds", no_argument, NULL, OPT_KEEP_SEEDS},
        {"min-seeds", required_argument, NULL, OPT_MIN_SEEDS},
        EV_OPTS_SEARCH,
        EV_OPTS_RANK,
        EV_OPTS_SCORING,
        EV_OPTS_DIAG,
        CLI_OPT_HELP,
        CLI_OPTS_GLOBAL,
        {NULL, 0, NULL, 0},
    };
    ist_error err;
    int c;

    while ((c = getopt_long(argc, argv, "o:h" CLI_SHORT_GLOBAL, opts, NULL)) != -1) {
        switch (c) {
        case 'o': a->out = optarg; break;
        case OPT_SEEDS: a->seeds = optarg; break;
        case OPT_IDENT: a->ident = true; break;
        case OPT_IDENT_MIN:
            if (!cli_parse_u64(CMD, "--spelt-alike-min-freq", optarg, 0, UINT64_MAX,
                               &a->ident_min))
                return CLI_EXIT_USAGE;
            break;
        case OPT_IDENT_MARKED: a->ident_marked = true; break;
        case OPT_HOLD_OUT:
            if (!cli_parse_double(CMD, "--hold-out", optarg, 0, 0.95, &a->hold_out))
                return CLI_EXIT_USAGE;
            break;
        case OPT_SPLIT_SEED:
            if (!cli_parse_u64(CMD, "--split-seed", optarg, 0, UINT64_MAX, &a->split_seed))
                return CLI_EXIT_USAGE;
            break;
        case OPT_WRITE_TEST: a->write_test = optarg; break;
        case OPT_TEST: a->test = optarg; break;
        case OPT_NORMALISE:
            if (ist_norm_check(optarg, &err) != IST_OK)
                return cli_usage_error(CMD, "--standardise: %s", err.msg);
            a->normalise = optarg;
            break;
        case OPT_ROUNDS:
            if (!cli_parse_size(CMD, "--refine-rounds", optarg, 0, 50, &a->rounds))
                return CLI_EXIT_USAGE;
            break;
        case OPT_RVOCAB:
            if (!cli_parse_size(CMD, "--refine-vocab", optarg, 1, 10000000, &a->rvocab))
                return CLI_EXIT_USAGE;
            break;
        case OPT_MAPPED: a->mapped = optarg; break;
        case OPT_KEEP_SEEDS: a->keep_seeds = true; break;
        case OPT_MIN_SEEDS:
            if (!cli_parse_size(CMD, "--min-seeds", optarg, 1, 100000000, &a->min_seeds))
                return CLI_EXIT_USAGE;
            break;
        case 'h': help(stdout); return CLI_EXIT_OK;
        default:
            if (c >= 1000) {
                if (!ev_common_option(CMD, &a->c, c, optarg))
                    return CLI_EXIT_USAGE;
                break;
            }
            if (!cli_other_option(CMD, c, opts, argv))
                return CLI_EXIT_USAGE;
            break;
        }
    }
    if (argc - optind != 2)
        return cli_usage_error(CMD, "expected SRC and TGT vector files, got %d argument%s",
                               argc - optind, argc - optind == 1 ? "" : "s");
    if (!a->out)
        return cli_usage_error(CMD, "expected -o MAP, the map file to write");
    if (!a->seeds && !a->ident)
        return cli_usage_error(CMD, "expected --seeds=FILE or --spelt-alike");
    if (a->hold_out > 0 && !a->seeds)
        return cli_usage_error(CMD, "--hold-out splits the --seeds list; give --seeds=FILE");
    if (a->hold_out > 0 && a->test)
        return cli_usage_error(CMD, "--hold-out and --test both name a test list; give one");
    if (a->write_test && a->hold_out <= 0)
        return cli_usage_error(CMD, "--write-test needs --hold-out");
    return CLI_GO_ON;
}

/* Too few seed pairs survive: refuse, and when the list matches far better with
 * the sides swapped, say so. Returns 0 to go on. */
static int
check_seed_count(const args *a, const ist_store *s, const ist_store *t, const ist_pairs *seeds)
{
    size_t kept = 0, need = a->min_seeds ? a->min_seeds : ist_store_dim(s);
    for (size_t i = 0; i < ist_pairs_count(seeds); i++)
        kept += ist_pairs_source_row(seeds, i) >= 0 && ist_pairs_target_row(seeds, i) >= 0;
    if (kept >= need)
        return 0;
    fprintf(stderr, "isthmus %s: %zu seed pair%s kept, fewer than the minimum of %zu (%s); "
            "a map fitted on so few is undetermined\n", CMD, kept, kept == 1 ? "" : "s", need,
            a->min_seeds ? "--min-seeds" : "the dimension of the vectors");
    if (a->seeds)
        ev_swap_hint(CMD, a->seeds, s, t, kept);
    return CLI_EXIT_ERROR;
}

/* The seed list: the file's kept pairs, the identical strings, or both. */
static int
build_seeds(args *a, const ist_store *s, const ist_store *t, ist_pairs **seeds,
            ist_pairs **test, ist_pairs_coverage *tcov)
{
    ist_pairs *file = NULL, *ident = NULL;
    ist_pairs_coverage cov;
    ist_error err;
    int rc;

    *seeds = *test = NULL;
    if (a->seeds && (rc = ev_read_pairs(CMD, "seeds", a->seeds, s, t, &file, &cov)) != 0)
        return rc;
    if (file && a->hold_out > 0) {
        ist_pairs *sp, *tp;
        if (ist_pairs_split(file, a->hold_out, a->split_seed, &sp, &tp, &err) != IST_OK) {
            ist_pairs_free(file);
            return cli_report(CMD, &err);
        }
        ist_pairs_free(file);
        file = sp;
        *test = tp;
        *tcov = cov;   /* the test part comes from the same file */
        cli_info("%-10s held out %zu pairs (share %.2f of the source words, split seed %" PRIu64
                 ") for testing; %zu pairs stay seeds\n",
               "", ist_pairs_count(tp), a->hold_out, a->split_seed, ist_pairs_count(sp));
        if (a->write_test && ist_pairs_save(tp, a->write_test, &err) != IST_OK) {
            ist_pairs_free(file);
            return cli_report(CMD, &err);
        }
        if (a->write_test)
            cli_wrote(a->write_test, "%zu held-out test pairs", ist_pairs_count(tp));
    }
    if (a->ident) {
        if (ist_pairs_identical(s, t, a->ident_min, a->ident_marked, &ident, &err) != IST_OK) {
            ist_pairs_free(file);
            return cli_report(CMD, &err);
        }
        cli_info("%-10s %zu words spelt the same on both sides (count >= %" PRIu64 "%s)\n",
                 "alike", ist_pairs_count(ident), a->ident_min,
               a->ident_marked ? ", with a letter and a digit or a capital" : "");
    }
    if (file && ident) {
        ist_status st = IST_OK;
        for (size_t i = 0; st == IST_OK && i < ist_pairs_count(ident); i++)
            st = ist_pairs_add(file, ist_pairs_source(ident, i), ist_pairs_target(ident, i),
                               &err);
        if (st == IST_OK)
            st = ist_pairs_resolve(file, s, t, &cov, &err);
        ist_pairs_free(ident);
        if (st != IST_OK) {
            ist_pairs_free(file);
            return cli_report(CMD, &err);
        }
        cli_info("%-10s %zu seed pairs in all after merging (%zu duplicates dropped)\n", "",
                 cov.kept, cov.duplicates);
        *seeds = file;
    } else {
        *seeds = file ? file : ident;
    }
    return 0;
}

/* Score the map on the test list (before and after refinement) and write the result;
 * xs, zt: the final map applied already (for --mapped-out), or NULL. */
static int
evaluate(args *a, const ist_map *map, const ist_store *s, const ist_store *t,
         const ist_pairs *test, const ist_pairs_coverage *tcov, const ist_matrix *xs,
         const ist_matrix *zt)
{
    ist_result_fit fit = {a->normalise, a->rounds, a->rvocab, a->keep_seeds, a->ident,
                          a->ident_marked, a->ident_min, a->hold_out, a->split_seed};
    char label[512];
    ist_evaluate_opts eo;
    ist_result *res = NULL;
    ist_error err;
    int rc;

    if (!test && !a->c.json_out)
        return 0;
    ev_evaluate_opts(&a->c, &eo);
    eo.command = CMD;
    /* without refinement rounds the map is the seed fit alone, scored once as "seed" */
    eo.stages = ist_map_rounds(map) > 0 ? IST_STAGE_SEED | IST_STAGE_REFINED : IST_STAGE_REFINED;
    eo.record_stages = false;
    eo.source_path = a->src;
    eo.target_path = a->tgt;
    eo.map_path = a->out;
    eo.seeds_path = a->seeds;
    if (a->ident) {
        snprintf(label, sizeof label, "%s%sidentical strings", a->seeds ? a->seeds : "",
                 a->seeds ? " and " : "");
        eo.seeds_label = label;
    }
    eo.fit = &fit;
    eo.refined_xs = xs;
    eo.refined_zt = zt;
    if ((rc = ev_evaluate(CMD, map, s, t, test, test ? tcov : NULL, &eo, &res)) != 0)
        return rc;
    if (a->c.json_out && ist_result_write(res, a->c.json_out, &err) != IST_OK)
        rc = cli_report(CMD, &err);
    else if (a->c.json_out)
        cli_wrote(a->c.json_out, "result JSON");
    ist_result_free(res);
    return rc;
}

static int
run(int argc, char **argv)
{
    args a;
    ist_store *s = NULL, *t = NULL;
    ist_pairs *seeds = NULL, *test = NULL;
    ist_pairs_coverage tcov;
    ist_matrix *xs = NULL, *zt = NULL;
    ist_align_opts ao;
    ist_map *map = NULL;
    ist_error err;
    int rc;

    memset(&a, 0, sizeof a);
    memset(&tcov, 0, sizeof tcov);
    a.ident_min = 5;
    a.split_seed = 1;
    a.normalise = IST_NORM_DEFAULT;
    a.rounds = IST_ALIGN_REFINE_ROUNDS_DEFAULT;
    a.rvocab = IST_ALIGN_REFINE_VOCAB_DEFAULT;
    ev_common_init(&a.c, EV_BOTH);
    if ((rc = parse(argc, argv, &a)) != CLI_GO_ON)
        return rc;
    a.src = argv[optind];
    a.tgt = argv[optind + 1];
    const char *ins[] = {a.src, a.tgt, a.seeds, a.test};
    const char *outs[] = {a.out, a.mapped, a.write_test, a.c.json_out};
    if ((rc = cli_check_files(CMD, ins, 4, outs, 4)) != 0)
        return rc;
    if ((rc = ev_open_stores(CMD, a.src, a.tgt, &s, &t)) != 0)
        return rc;
    if ((rc = build_seeds(&a, s, t, &seeds, &test, &tcov)) != 0)
        goto done;
    if ((rc = check_seed_count(&a, s, t, seeds)) != 0)
        goto done;
    if (a.test && (rc = ev_read_pairs(CMD, "test", a.test, s, t, &test, &tcov)) != 0)
        goto done;
    if (test) {
        size_t shared;
        if ((rc = ev_check_overlap(CMD, seeds, test, a.c.allow_overlap, &shared)) != 0)
            goto done;
    }
    ist_align_opts_init(&ao);
    ao.source_norm = ao.target_norm = a.normalise;
    ao.refine_rounds = a.rounds;
    ao.refine_vocab = a.rvocab;
    ao.refine_keep_seeds = a.keep_seeds;
    ao.min_seed_pairs = a.min_seeds;
    ao.search = a.c.search;
    double t0 = cli_now();
    ao.on_round = round_done;
    ao.ctx = &a.rounds;
    cli_progress_start("align: fitting the map on the seed pairs");
    ist_status fit = ist_align_fit(s, t, seeds, &ao, &map, &err);
    cli_progress_stop();
    if (fit != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    ist_procrustes_info fi = ist_map_seed_fit(map);
    cli_info("%-10s %zu seed pairs, dimension %zu, standardised %s; mean cosine %.4f, "
             "orthogonality error %.2g\n",
             "fit", ist_map_seed_pairs(map), ist_map_dim(map), a.normalise, fi.seed_cos,
             fi.orth_error);
    print_refinement(map, a.rounds);
    cli_info("fitted in %.1f s\n", cli_now() - t0);
    if (ist_map_save(map, a.out, &err) != IST_OK) {
        rc = cli_report(CMD, &err);
        goto done;
    }
    cli_wrote(a.out, "map, dimension %zu", ist_map_dim(map));
    if (a.mapped) {
        /* applied once: the evaluation below scores these same rows */
        if (ist_map_apply(map, s, t, &xs, &zt, &err) != IST_OK ||
            ist_map_save_mapped(map, s, xs, a.mapped, &err) != IST_OK) {
            rc = cli_report(CMD, &err);
            goto done;
        }
        cli_wrote(a.mapped, "%zu source vectors mapped, text table", ist_store_rows(s));
    }
    rc = evaluate(&a, map, s, t, test, &tcov, xs, zt);
done:
    ist_matrix_free(xs);
    ist_matrix_free(zt);
    ist_map_free(map);
    ist_pairs_free(seeds);
    ist_pairs_free(test);
    ist_store_free(s);
    ist_store_free(t);
    return rc;
}

const cli_command cmd_align = {"align", "fit an orthogonal map between two vector spaces", run,
                               help};

/* verb_check.c - `propbench check [--baseline FILE] [--require EXPR ...]
 * RUN_DIR`: compare a run with a baseline (rules in compare.h) and hold its
 * cases to absolute requirements (require.h), print a table, optionally
 * write JUnit XML and a Markdown summary. Exit 0 pass, 1 regression or
 * requirement not met, 2 bad input. */
#include <errno.h>
#include <limits.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "bench/cli/cli.h"
#include "bench/gate/baseline.h"
#include "bench/gate/compare.h"
#include "bench/gate/require.h"
#include "bench/store/summary_read.h"
#include "bench/gate/junit.h"
#include "bench/store/run_dir.h"

static void check_help(FILE *f)
{
    char names[400] = "";
    size_t n = 0;
    for (const char *const *k = pb_require_names; *k && n < sizeof names; k++)
        n += (size_t)snprintf(names + n, sizeof names - n, "%s%s%s", *k, k[1] ? "," : "",
                              k[1] && (k - pb_require_names) % 5 == 4 ? "\n                     " : k[1] ? " " : "");
    fprintf(f,
"usage: propbench check [--baseline FILE] [--require EXPR ...] RUN_DIR\n"
"                       [--tolerance REL] [--metric-tolerance NAME=REL ...]\n"
"                       [--count-tolerance NAME=REL[,NAME=REL...]] [--floor REL]\n"
"                       [--timing [--timing-ratio R]] [--strict]\n"
"                       [--methods LIST] [--problems LIST] [--only-failures]\n"
"                       [--junit FILE] [--markdown FILE]\n\n"
"Compare RUN_DIR/summary.json with a baseline made by 'propbench baseline',\n"
"hold its cases to absolute requirements, or both (at least one of the two).\n"
"  accuracy metrics   regression when worse by more than REL (default %g):\n"
"                     run > (1 + REL) * baseline + floor; the floor (default\n"
"                     %g, relative to the orbit's size or speed for positions\n"
"                     and velocities) keeps round-off noise from flagging\n"
"                     (REL from 0 to %g, the floor from 0 to %g)\n"
"  --metric-tolerance NAME=REL  another tolerance for one metric (repeatable)\n"
"  status, settings   must not change\n"
"  steps, evals, rejected, startup_steps   must not change, unless\n"
"  --count-tolerance NAME=REL,...  lets a count move by REL (e.g. steps=0.05)\n"
"  --timing           also compare CPU time per step in units of a calibration\n"
"                     kernel timed beside each case in the same run; regression\n"
"                     when slower by more than the ratio R (default %g, at most %g)\n"
"  fingerprints       bit changes are reported; --strict makes them fail\n"
"  cases              missing from the run: regression; new ones: listed\n"
"Compiler, build flags or machine differing from the baseline's: a warning.\n"
"  --require EXPR     METRIC<=VALUE (or <, >=, >) that every case must meet,\n"
"                     e.g. 'pos_err_max_m<=10' (repeatable); METRIC one of\n"
"                     %s\n"
"  --methods LIST, --problems LIST   the cases --require applies to\n"
"  --only-failures    list only the cases that fail\n"
"  --junit FILE       JUnit XML, one test case per case and metric\n"
"  --markdown FILE    a summary for a CI page\n\n"
"exit status: 0 pass, 1 regression or requirement not met, 2 bad, corrupt or\n"
"incompatible files, unknown metric names, malformed expressions\n",
            PB_CHECK_TOLERANCE, PB_CHECK_FLOOR, PB_CHECK_TOLERANCE_MAX, PB_CHECK_FLOOR_MAX,
            PB_CHECK_TIMING_RATIO, PB_CHECK_TIMING_RATIO_MAX, names);
}

static int check_rank(pb_check_verdict v)
{
    switch (v) {
    case PB_CHECK_REGRESSED: case PB_CHECK_MISSING: case PB_CHECK_UNMET: return 4;
    case PB_CHECK_IMPROVED: return 3;
    case PB_CHECK_NEW: return 2;
    case PB_CHECK_CHANGED: return 1;
    case PB_CHECK_SAME: break;
    }
    return 0;
}

static int check_is_metric(const char *item)
{
    for (const char *const *k = pb_summary_metric_keys; *k; k++)
        if (!strcmp(*k, item))
            return 1;
    return 0;
}

/* One line per case, summarised from its consecutive rows [a, b). */
typedef struct {
    const pb_check_row *status, *worst, *bits;
    int counts_same;
    pb_check_verdict verdict;
} check_case_sum;

static check_case_sum check_summarise(const pb_check_row *a, const pb_check_row *b)
{
    check_case_sum s = {NULL, NULL, NULL, 1, PB_CHECK_SAME};
    for (const pb_check_row *w = a; w < b; w++) {
        if (!strcmp(w->item, "status") || !strcmp(w->item, "case"))
            s.status = w;
        else if (!strcmp(w->item, "fingerprint"))
            s.bits = w;
        else if (!strcmp(w->item, "steps") || !strcmp(w->item, "evals") ||
                 !strcmp(w->item, "rejected") || !strcmp(w->item, "startup_steps"))
            s.counts_same &= w->verdict == PB_CHECK_SAME;
        /* the row that decides the verdict (the most severe; among equals
         * the largest change); on a case that is ok, the metric that moved most */
        int rk = check_rank(w->verdict), rs = s.worst ? check_rank(s.worst->verdict) : -1;
        if ((rk > 0 || (check_is_metric(w->item) && w->rel != 0)) &&
            (rk > rs || (rk == rs && w->rel > s.worst->rel)))
            s.worst = w;
        if (check_rank(w->verdict) > check_rank(s.verdict))
            s.verdict = w->verdict;
    }
    return s;
}

static size_t check_case_end(const pb_check_report *r, size_t i)
{
    size_t j = i + 1;
    while (j < r->n && !strcmp(r->rows[j].case_id, r->rows[i].case_id))
        j++;
    return j;
}

static int check_fails(pb_check_verdict v)
{
    return v == PB_CHECK_REGRESSED || v == PB_CHECK_MISSING || v == PB_CHECK_UNMET;
}

static void check_print_table(FILE *f, const pb_check_report *r, int only_failures)
{
    fprintf(f, "%-46s %-9s %-17s %9s %-6s %-8s %s\n", "case", "status", "worst metric", "change",
            "counts", "bits", "verdict");
    for (size_t i = 0; i < r->n;) {
        size_t j = check_case_end(r, i);
        check_case_sum s = check_summarise(&r->rows[i], &r->rows[j]);
        if (only_failures && !check_fails(s.verdict)) {
            i = j;
            continue;
        }
        const char *st = !s.status ? "-" : strcmp(s.status->item, "case") ? s.status->run
                         : s.status->verdict == PB_CHECK_MISSING ? "missing" : "new";
        fprintf(f, "%-46s %-9s %-17s %9s %-6s %-8s %s\n", r->rows[i].case_id, st,
                s.worst ? s.worst->item : "-", s.worst ? s.worst->change : "",
                s.status && !strcmp(s.status->item, "case") ? "-" : s.counts_same ? "same" : "DIFFER",
                s.bits ? (s.bits->verdict == PB_CHECK_SAME ? "same" : "changed") : "-",
                pb_check_verdict_name(s.verdict));
        i = j;
    }
}

static void check_print_details(FILE *f, const pb_check_report *r, int only_failures)
{
    int any = 0;
    for (size_t i = 0; i < r->n; i++) {
        const pb_check_row *w = &r->rows[i];
        if (w->verdict == PB_CHECK_SAME || w->verdict == PB_CHECK_NEW || w->verdict == PB_CHECK_MISSING ||
            (only_failures && !check_fails(w->verdict)))
            continue;
        if (!any++)
            fprintf(f, "\ndifferences:\n%-46s %-20s %-24s %-24s %-14s %s\n", "case", "item",
                    "baseline", "run", "change", "verdict");
        fprintf(f, "%-46s %-20s %-24s %-24s %-14s %s\n", w->case_id, w->item, w->base, w->run,
                w->change, pb_check_verdict_name(w->verdict));
    }
}

static const char *check_outcome(const pb_check_report *r, const pb_check_options *o)
{
    return pb_check_failed(r, o) ? "FAIL" : "PASS";
}

static void check_print_totals(FILE *f, const pb_check_report *r, const pb_check_options *o)
{
    if (o->n_require)
        fprintf(f, "%ld requirements checked: %ld unmet; ", r->required, r->unmet);
    fprintf(f, "%ld cases %s: %ld regressions, %ld improvements, %ld fingerprint changes%s, "
               "%ld missing, %ld new: %s\n",
            r->cases, r->compared ? "compared" : "checked",
            r->regressions, r->improvements, r->fingerprints_changed,
            o->strict ? " (strict)" : "", r->missing, r->added, check_outcome(r, o));
}

static int check_junit(const char *path, const pb_check_report *r)
{
    pb_junit *j = pb_junit_new("propbench check");
    int bad = !j;
    for (size_t i = 0; !bad && i < r->n; i++) {
        const pb_check_row *w = &r->rows[i];
        char msg[700], detail[400];
        snprintf(detail, sizeof detail, "baseline %s, run %s%s%s (%s)", w->base, w->run,
                 *w->change ? ", " : "", w->change, pb_check_verdict_name(w->verdict));
        snprintf(msg, sizeof msg, "%s %s: %s", w->case_id, w->item, detail);
        int fails = check_fails(w->verdict);
        bad = pb_junit_add(j, w->case_id, w->item, fails ? msg : NULL, fails ? NULL : detail) != 0;
    }
    for (int k = 0; !bad && k < r->n_warnings; k++)
        bad = pb_junit_add(j, "propbench.environment", "warning", NULL, r->warnings[k]) != 0;
    bad = bad || pb_junit_write(j, path);
    pb_junit_free(j);
    return bad ? -1 : 0;
}

/* Markdown table cells cannot hold '|' or line breaks. */
static void check_md_cell(FILE *f, const char *s)
{
    for (; *s; s++)
        if (*s == '|')
            fputs("\\|", f);
        else
            fputc(*s == '\n' ? ' ' : *s, f);
}

static int check_markdown(const char *path, const pb_check_report *r, const pb_check_options *o,
                          const char *base_path, const char *run_path)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    if (!f)
        return -1;
    fprintf(f, "## propbench check: %s\n\n", check_outcome(r, o));
    fprintf(f, "Run `");
    check_md_cell(f, run_path);
    if (!base_path) {
        fprintf(f, "` (no baseline).\n\n");
    } else {
        fprintf(f, "` against baseline `");
        check_md_cell(f, base_path);
        fprintf(f, "` (tolerance %g%%, round-off floor %g%s%s).\n\n", 100 * o->tolerance,
                o->floor, o->timing ? ", timing compared" : "", o->strict ? ", strict fingerprints" : "");
    }
    fprintf(f, "| cases | regressions | improvements | fingerprint changes | missing | new "
               "| requirements unmet |\n|---:|---:|---:|---:|---:|---:|---:|\n"
               "| %ld | %ld | %ld | %ld | %ld | %ld | %ld of %ld |\n\n",
            r->cases, r->regressions, r->improvements, r->fingerprints_changed, r->missing, r->added,
            r->unmet, r->required);
    for (int q = 0; q < o->n_require; q++) {
        fprintf(f, "%s `", q ? "," : "Requirements:");
        check_md_cell(f, o->require[q].text);
        fputc('`', f);
    }
    if (o->methods || o->problems) {
        fprintf(f, " on methods `");
        check_md_cell(f, o->methods ? o->methods : "all");
        fprintf(f, "` and problems `");
        check_md_cell(f, o->problems ? o->problems : "all");
        fputc('`', f);
    }
    if (o->n_require)
        fprintf(f, ".\n\n");
    for (int k = 0; k < r->n_warnings; k++) {
        fprintf(f, "- warning: ");
        check_md_cell(f, r->warnings[k]);
        fputc('\n', f);
    }
    if (r->n_warnings)
        fputc('\n', f);
    int any = 0;
    for (size_t i = 0; i < r->n; i++) {
        const pb_check_row *w = &r->rows[i];
        if (w->verdict == PB_CHECK_SAME)
            continue;
        if (!any++)
            fprintf(f, "| case | item | baseline | run | change | verdict |\n|---|---|---|---|---|---|\n");
        const char *cells[] = {w->case_id, w->item, w->base, w->run, w->change,
                               pb_check_verdict_name(w->verdict)};
        for (int k = 0; k < 6; k++) {
            fputs("| ", f);
            check_md_cell(f, cells[k]);
            fputc(' ', f);
        }
        fputs("|\n", f);
    }
    if (!any)
        fprintf(f, "Every case matches its baseline within tolerance, bit for bit.\n");
    if (fclose(f)) {
        free(buf);
        return -1;
    }
    int rc = pb_write_atomic(path, buf, len);
    free(buf);
    return rc;
}

/* What the command line asked for. */
typedef struct check_args {
    pb_check_options o;
    const char *base_path, *junit, *md, *run_dir;
    int only_failures;
} check_args;

/* check_parse's answer when the comparison should go ahead. */
enum { CHECK_GO = -1 };

/* A number option that must lie in [lo, hi]; 0, or PB_EXIT_USAGE (message printed). */
static int check_ranged(const char *opt, const char *arg, double lo, double hi, double *x)
{
    if (pb_cli_double("check", opt, arg, x))
        return PB_EXIT_USAGE;
    if (*x < lo || *x > hi)
        return pb_cli_error("check", "%s must be from %g to %g, got '%s'", opt, lo, hi, arg);
    return 0;
}

enum { O_BASE = 256, O_TOL, O_MTOL, O_FLOOR, O_TIMING, O_RATIO, O_STRICT, O_JUNIT, O_MD,
       O_CTOL, O_REQ, O_METHODS, O_PROBLEMS, O_ONLY };

/* The gate's own options (counts, requirements, filters, output); 0, or
 * PB_EXIT_USAGE after a message. */
static int check_parse_gate(int c, const char *arg, check_args *a)
{
    char err[1024];
    switch (c) {
    case O_CTOL:
        if (pb_check_options_counts(&a->o, arg, err, sizeof err))
            return pb_cli_error("check", "%s", err);
        break;
    case O_REQ:
        if (pb_require_parse(&a->o, arg, err, sizeof err))
            return pb_cli_error("check", "%s", err);
        break;
    case O_METHODS: a->o.methods = arg; break;
    case O_PROBLEMS: a->o.problems = arg; break;
    case O_ONLY: a->only_failures = 1; break;
    }
    return 0;
}

/* CHECK_GO with *a filled in, or the exit status (--help, bad options). */
static int check_parse(int argc, char **argv, check_args *a)
{
    static const struct option opts[] = {
        {"count-tolerance", required_argument, 0, O_CTOL}, {"require", required_argument, 0, O_REQ},
        {"methods", required_argument, 0, O_METHODS}, {"problems", required_argument, 0, O_PROBLEMS},
        {"only-failures", no_argument, 0, O_ONLY},
        {"baseline", required_argument, 0, O_BASE}, {"tolerance", required_argument, 0, O_TOL},
        {"metric-tolerance", required_argument, 0, O_MTOL}, {"floor", required_argument, 0, O_FLOOR},
        {"timing", no_argument, 0, O_TIMING}, {"timing-ratio", required_argument, 0, O_RATIO},
        {"strict", no_argument, 0, O_STRICT}, {"junit", required_argument, 0, O_JUNIT},
        {"markdown", required_argument, 0, O_MD}, {"help", no_argument, 0, 'h'}, {0, 0, 0, 0}};
    memset(a, 0, sizeof *a);
    pb_check_options_default(&a->o);
    char err[1024];
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        switch (c) {
        case O_BASE: a->base_path = optarg; break;
        case O_TOL:
            if (check_ranged("--tolerance", optarg, 0, PB_CHECK_TOLERANCE_MAX, &a->o.tolerance))
                return PB_EXIT_USAGE;
            break;
        case O_MTOL:
            if (pb_check_options_metric(&a->o, optarg, err, sizeof err))
                return pb_cli_error("check", "%s", err);
            break;
        case O_FLOOR:
            if (check_ranged("--floor", optarg, 0, PB_CHECK_FLOOR_MAX, &a->o.floor))
                return PB_EXIT_USAGE;
            break;
        case O_TIMING: a->o.timing = 1; break;
        case O_RATIO:
            if (check_ranged("--timing-ratio", optarg, 1, PB_CHECK_TIMING_RATIO_MAX,
                             &a->o.timing_ratio))
                return PB_EXIT_USAGE;
            a->o.timing = 1;
            break;
        case O_STRICT: a->o.strict = 1; break;
        case O_JUNIT: a->junit = optarg; break;
        case O_MD: a->md = optarg; break;
        case 'h': check_help(stdout); return PB_EXIT_OK;
        case O_CTOL: case O_REQ: case O_METHODS: case O_PROBLEMS: case O_ONLY:
            if (check_parse_gate(c, optarg, a))
                return PB_EXIT_USAGE;
            break;
        default:
            return pb_cli_error("check", c == ':' ? "option %s needs a value" : "unknown option '%s'", argv[optind - 1]);
        }
    }
    if ((!a->base_path && !a->o.n_require) || optind != argc - 1)
        return pb_cli_error("check", "give --baseline FILE or --require EXPR (or both) and one "
                            "RUN_DIR (see --help)");
    if ((a->o.methods || a->o.problems) && !a->o.n_require)
        return pb_cli_error("check", "--methods and --problems choose the cases --require "
                            "applies to: give --require too");
    a->run_dir = argv[optind];
    return CHECK_GO;
}

/* What the comparison reads and makes; all owned, freed by check_inputs_free. */
typedef struct check_inputs {
    json_t *base, *summary, *run;
    pb_check_report r;
} check_inputs;

/* Load both files and compare them; 0, or -1 with the message printed. */
static int check_load(const check_args *a, const char *run_path, check_inputs *in)
{
    char err[1024];
    if ((a->base_path && pb_baseline_load(a->base_path, &in->base, err, sizeof err)) ||
        pb_summary_load(run_path, &in->summary, err, sizeof err) ||
        pb_summary_complete(run_path, in->summary, err, sizeof err)) {
        pb_cli_error("check", "%s", err);
        return -1;
    }
    in->run = pb_baseline_from_summary(in->summary);
    if (!in->run || (a->base_path && pb_check_compare(in->base, in->run, &a->o, &in->r))) {
        pb_cli_error("check", "out of memory comparing %s with %s", run_path, a->base_path);
        return -1;
    }
    int rq = pb_require_check(in->summary, &a->o, &in->r, err, sizeof err);
    if (rq)
        pb_cli_error("check", "%s", rq > 0 ? err : "out of memory checking the requirements");
    if (!rq && !a->base_path)
        in->r.cases = in->r.required / a->o.n_require;  /* the cases they applied to */
    return rq ? -1 : 0;
}

static void check_inputs_free(check_inputs *in)
{
    pb_check_report_free(&in->r);
    json_decref(in->run);
    json_decref(in->summary);
    json_decref(in->base);
}

static void check_print(const check_args *a, const char *run_path, const pb_check_report *r)
{
    for (int k = 0; k < r->n_warnings; k++)
        fprintf(stderr, "propbench check: warning: %s\n", r->warnings[k]);
    if (a->base_path)
        printf("propbench check: %s against %s (tolerance %g%%, floor %g%s%s)\n", run_path,
               a->base_path, 100 * a->o.tolerance, a->o.floor, a->o.timing ? ", timing" : "",
               a->o.strict ? ", strict" : "");
    else
        printf("propbench check: %s\n", run_path);
    for (int q = 0; q < a->o.n_require; q++)
        printf("%s %s", q ? "," : "required:", a->o.require[q].text);
    printf("%s%s%s%s%s\n", a->o.n_require && a->o.methods ? " (methods " : "",
           a->o.n_require && a->o.methods ? a->o.methods : "",
           a->o.n_require && a->o.problems ? (a->o.methods ? "; problems " : " (problems ") : "",
           a->o.n_require && a->o.problems ? a->o.problems : "",
           a->o.n_require && (a->o.methods || a->o.problems) ? ")" : "");
    check_print_table(stdout, r, a->only_failures);
    check_print_details(stdout, r, a->only_failures);
    printf("\n");
    check_print_totals(stdout, r, &a->o);
}

/* The report files in flight, so that a failure can take them back. */
typedef struct check_files {
    char jtmp[4200], mtmp[4200];
    const char *jdone;   /* a report already renamed into place */
    char jlink[PATH_MAX], mlink[PATH_MAX];
} check_files;

/* Both reports go under temporary names first and are renamed only when
 * both are written: a failed invocation (exit 2) leaves neither behind.
 * 0, or -1 with the message printed. */
static int check_write_reports(const check_args *a, const char *run_path, const pb_check_report *r,
                               check_files *fl)
{
    /* a report that is a symbolic link is written through (README,
     * Reliability): the temporary file goes beside the file it names */
    const char *jdst = a->junit ? pb_link_target(a->junit, fl->jlink) : NULL;
    const char *mdst = a->md ? pb_link_target(a->md, fl->mlink) : NULL;
    if ((a->junit && !jdst) || (a->md && !mdst)) {
        pb_cli_error("check", "%s: a symbolic link to nothing: %s", !jdst && a->junit ? a->junit
                     : a->md, strerror(errno));
        return -1;
    }
    if (a->junit)
        snprintf(fl->jtmp, sizeof fl->jtmp, "%s.part.%ld", jdst, (long)getpid());
    if (a->md)
        snprintf(fl->mtmp, sizeof fl->mtmp, "%s.part.%ld", mdst, (long)getpid());
    if (a->junit && check_junit(fl->jtmp, r)) {
        pb_cli_error("check", "%s: cannot write the JUnit report: %s", a->junit, strerror(errno));
        return -1;
    }
    if (a->md && check_markdown(fl->mtmp, r, &a->o, a->base_path, run_path)) {
        pb_cli_error("check", "%s: cannot write the Markdown summary: %s", a->md, strerror(errno));
        return -1;
    }
    if (a->junit && rename(fl->jtmp, jdst)) {
        pb_cli_error("check", "%s: cannot write the JUnit report: %s", a->junit, strerror(errno));
        return -1;
    }
    fl->jdone = jdst;
    if (a->md && rename(fl->mtmp, mdst)) {
        pb_cli_error("check", "%s: cannot write the Markdown summary: %s", a->md, strerror(errno));
        return -1;
    }
    return 0;
}

static void check_files_discard(const check_files *fl)
{
    if (*fl->jtmp)
        unlink(fl->jtmp);
    if (*fl->mtmp)
        unlink(fl->mtmp);
    if (fl->jdone)
        unlink(fl->jdone);
}

/* An output over an input (--junit B.json replaced the baseline with XML)
 * or over the other output is refused before anything is read; 1 after a
 * message. */
static int check_outputs_clash(const check_args *a, const char *run_path)
{
    const char *out[2] = {a->junit, a->md}, *oname[2] = {"--junit", "--markdown"};
    const char *in[2] = {a->base_path, run_path}, *iname[2] = {"the baseline", "the run's summary"};
    for (int i = 0; i < 2; i++) {
        if (out[i] && pb_cli_out_path("check", oname[i], out[i], PB_CLI_RESERVE_FILE))
            return 1;
        for (int k = 0; out[i] && k < 2; k++)
            if (in[k] && pb_same_file(out[i], in[k]))
                return pb_cli_error("check", "%s %s is %s %s: an output may not replace an input",
                                    oname[i], out[i], iname[k], in[k]) != 0;
    }
    if (a->junit && a->md && pb_same_file(a->junit, a->md))
        return pb_cli_error("check", "--junit and --markdown name one file, %s: give two files",
                            a->junit) != 0;
    return 0;
}

int pb_cli_check(int argc, char **argv)
{
    check_args a;
    int rc = check_parse(argc, argv, &a);
    if (rc != CHECK_GO)
        return rc;
    char run_path[4200];
    snprintf(run_path, sizeof run_path, "%s/summary.json", a.run_dir);
    if (check_outputs_clash(&a, run_path))
        return PB_EXIT_USAGE;
    check_inputs in = {0};
    check_files fl;
    memset(&fl, 0, sizeof fl);
    rc = PB_EXIT_USAGE;
    if (check_load(&a, run_path, &in))
        goto out;
    check_print(&a, run_path, &in.r);
    if (check_write_reports(&a, run_path, &in.r, &fl))
        goto out;
    rc = pb_check_failed(&in.r, &a.o) ? PB_EXIT_FAIL : PB_EXIT_OK;
out:
    if (rc == PB_EXIT_USAGE)
        check_files_discard(&fl);
    check_inputs_free(&in);
    return rc;
}

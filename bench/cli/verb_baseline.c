/* verb_baseline.c - `propbench baseline RUN_DIR --out FILE`: keep a run's
 * settings, accuracy metrics, counts, fingerprints, compiler, flags and
 * machine as the reference a later `propbench check` compares against. */
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <string.h>
#include "bench/cli/cli.h"
#include "bench/gate/baseline.h"
#include "bench/store/summary_read.h"
#include "bench/store/run_dir.h"

static void baseline_help(FILE *f)
{
    fprintf(f, "usage: propbench baseline RUN_DIR --out FILE\n\n"
               "Write a regression baseline (\"kind\": \"%s\", format %d) from\n"
               "RUN_DIR/summary.json: every case's settings, status, accuracy metrics,\n"
               "step and evaluation counts, timing and fingerprint, plus the compiler,\n"
               "build flags and machine. Commit FILE and compare later runs with\n"
               "'propbench check --baseline FILE RUN_DIR'.\n\n"
               "exit status: 0 written, 2 unreadable run or unwritable FILE\n",
            PB_BASELINE_KIND, PB_BASELINE_FORMAT);
}

int pb_cli_baseline(int argc, char **argv)
{
    static const struct option opts[] = {{"out", required_argument, 0, 'o'},
                                         {"help", no_argument, 0, 'h'}, {0, 0, 0, 0}};
    const char *out = NULL;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":", opts, NULL)) != -1) {
        if (c == 'o')
            out = optarg;
        else if (c == 'h') {
            baseline_help(stdout);
            return PB_EXIT_OK;
        } else
            return pb_cli_error("baseline", c == ':' ? "option %s needs a value" : "unknown option '%s'", argv[optind - 1]);
    }
    if (!out || optind != argc - 1)
        return pb_cli_error("baseline", "give one RUN_DIR and --out FILE (see --help)");
    if (pb_cli_out_path("baseline", "--out", out, PB_CLI_RESERVE_FILE))
        return PB_EXIT_USAGE;
    char path[4200], err[1024];
    snprintf(path, sizeof path, "%s/summary.json", argv[optind]);
    /* written over the summary it was made from, the run could no longer
     * be reported or checked */
    if (pb_same_file(out, path))
        return pb_cli_error("baseline", "--out %s is the run's own summary %s: give another file",
                            out, path);
    json_t *summary = NULL;
    int rc = PB_EXIT_USAGE;
    if (pb_summary_load(path, &summary, err, sizeof err) ||
        pb_summary_complete(path, summary, err, sizeof err)) {
        pb_cli_error("baseline", "%s", err);
        goto out;
    }
    if (json_array_size(json_object_get(summary, "cases")) == 0) {
        /* `check` refuses such a baseline, so do not write one */
        pb_cli_error("baseline", "%s has no cases: nothing to compare", path);
        goto out;
    }
    json_t *b = pb_baseline_from_summary(summary);
    size_t n = json_array_size(json_object_get(b, "cases"));
    int bad = pb_json_write_atomic(out, b), e = errno;
    json_decref(b);
    if (bad) {
        pb_cli_error("baseline", "%s: cannot write: %s", out, strerror(e));
        goto out;
    }
    printf("wrote %s: %zu cases from %s\n", out, n, path);
    rc = PB_EXIT_OK;
out:
    json_decref(summary);
    return rc;
}

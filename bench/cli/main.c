/* main.c - propbench's command line: dispatch a verb to its handler. */
#include <stdio.h>
#include <string.h>
#include <gsl/gsl_errno.h>
#include "bench/cli/cli.h"
#include "bench/cli/cache_option.h"
#include "bench/cli/plugins.h"
#include "propbench/propbench.h"

typedef struct { const char *name; int (*fn)(int, char **); const char *what; } main_verb;

static const main_verb main_verbs[] = {
    {"list", pb_cli_list, "methods, problems and suites"},
    {"run", pb_cli_run, "one case: problem x method x step or tolerance x horizon"},
    {"sweep", pb_cli_sweep, "a suite or grid of cases (-j N workers, --shard K/N)"},
    {"merge", pb_cli_merge, "join shards of a sweep into one run"},
    {"report", pb_cli_report, "figures, report.html and report.md from a run directory"},
    {"baseline", pb_cli_baseline, "keep a run as the reference for later checks"},
    {"check", pb_cli_check, "compare a run with a baseline (exit 1 on regression)"},
    {"select", pb_cli_select, "cheapest method and step meeting a requirement over a horizon"},
    {"score", pb_cli_score, "measure another program's trajectory (CCSDS OEM) against the truth"},
    {"selftest", pb_cli_selftest, "certify a method (a plug-in's): accuracy, order, contract"},
    {NULL, NULL, NULL}
};

static const main_verb *main_find(const char *name)
{
    for (const main_verb *v = main_verbs; v->name; v++)
        if (!strcmp(name, v->name))
            return v;
    return NULL;
}

static void main_usage(FILE *f)
{
    fprintf(f, "usage: propbench VERB [options]   (propbench VERB --help, propbench help VERB)\n\nverbs:\n");
    for (const main_verb *v = main_verbs; v->name; v++)
        fprintf(f, "  %-9s %s\n", v->name, v->what);
    fprintf(f, "\n  propbench --version   the version (also summary.json's \"tool\")\n");
    fprintf(f, "\nexit status: 0 ok, 1 regression or requirement not met, 2 bad input or usage\n");
}

int main(int argc, char **argv)
{
    /* GSL's default handler aborts; every GSL status is checked where it is returned */
    gsl_set_error_handler_off();
    if (argc < 2) {
        main_usage(stderr);
        return PB_EXIT_USAGE;
    }
    if (!strcmp(argv[1], "--version") || !strcmp(argv[1], "-V")) {
        if (argc > 2) {
            fprintf(stderr, "propbench: error: --version takes no argument, got '%s'\n", argv[2]);
            return PB_EXIT_USAGE;
        }
        printf("propbench %s\n", pb_version());
        return PB_EXIT_OK;
    }
    /* `propbench help VERB` is `propbench VERB --help` */
    char help_opt[] = "--help";
    if (!strcmp(argv[1], "help") && argc == 3 && main_find(argv[2])) {
        char *hv[] = {argv[2], help_opt, NULL};
        return main_find(argv[2])->fn(2, hv);
    }
    if (!strcmp(argv[1], "help") && argc > 2)
        return pb_cli_error("help", "unknown verb '%s' (propbench --help lists them)", argv[2]);
    if (!strcmp(argv[1], "--help") || !strcmp(argv[1], "-h") || !strcmp(argv[1], "help")) {
        main_usage(stdout);
        return PB_EXIT_OK;
    }
    /* -h is --help on every verb (no option takes "-h" as its value) */
    for (int i = 2; i < argc; i++)
        if (!strcmp(argv[i], "-h"))
            argv[i] = help_opt;
    /* No option of any verb takes an empty value, and an empty path would
     * name the current folder's parent or the root ("" + "/plots"). */
    for (int i = 2; i < argc; i++)
        if (!argv[i][0])
            return pb_cli_error(argv[1], "an empty value after %s", argv[i - 1]);
    /* plug-in methods (--plugin FILE.so, PB_PLUGINS) for the verbs that take
     * a method or list them, loaded before the verb parses (and before any
     * sweep worker is forked, so the workers inherit them) */
    static const char *const with_plugins[] = {"run", "sweep", "select", "list", "selftest"};
    for (size_t i = 0; i < sizeof with_plugins / sizeof with_plugins[0]; i++)
        if (!strcmp(argv[1], with_plugins[i]) && pb_plugins_load_args(argv[1], &argc, argv))
            return PB_EXIT_USAGE;
    if (pb_cache_option_take(argv[1], &argc, argv))
        return PB_EXIT_USAGE;
    for (const main_verb *v = main_verbs; v->name; v++)
        if (!strcmp(argv[1], v->name))
            return v->fn(argc - 1, argv + 1);
    fprintf(stderr, "propbench: error: unknown verb '%s'\n", argv[1]);
    main_usage(stderr);
    return PB_EXIT_USAGE;
}

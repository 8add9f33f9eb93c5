/* markdown.c - report.md: the same tables as report.html (best values in
 * bold) with links to the PNG figures, for pasting into review documents. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/figure_scripts.h"
#include "bench/report/table.h"
#include "bench/report/markdown.h"
#include "bench/store/run_dir.h"

/* Markdown table cells: pipes and line breaks would end the cell. */
static void md_cell(FILE *f, const char *s)
{
    for (; s && *s; s++) {
        if (*s == '|' || *s == '\\' || *s == '*' || *s == '_')
            fputc('\\', f);
        fputc(*s == '\n' ? ' ' : *s, f);
    }
}

static void md_kv(FILE *f, const char *k, const json_t *v)
{
    if (json_is_string(v))
        fprintf(f, "- %s: %s\n", k, json_string_value(v));
    else if (json_is_integer(v))
        fprintf(f, "- %s: %lld\n", k, (long long)json_integer_value(v));
}

static int md_body(FILE *f, const pb_report_view *v)
{
    const pb_report_run *run = v->run;
    const json_t *doc = run->doc, *m = json_object_get(doc, "machine"), *b = json_object_get(doc, "build");
    const char *caution = json_string_value(json_object_get(doc, "caution"));
    if (!caution)
        caution = "Benchmarks on idealised problems do not validate an operational propagator; "
                  "defer to the mission's own verification and flight-dynamics practice.";
    fprintf(f, "# propbench report: %s\n\n> **Caution.** %s\n\n", v->title, caution);
    if (v->why_not_drawn)
        fprintf(f, "Figures were not drawn: %s. The data and gnuplot scripts are in plots/.\n\n", v->why_not_drawn);
    fputs("## Run settings, machine and build\n\n", f);
    md_kv(f, "tool", json_object_get(doc, "tool"));
    md_kv(f, "summary format", json_object_get(doc, "format"));
    md_kv(f, "sweep", json_object_get(doc, "sweep"));
    fprintf(f, "- cases: %d on %d problem%s\n", run->ncases, run->nproblems, run->nproblems == 1 ? "" : "s");
    const char *mk[] = {"system", "release", "arch", "cpu", "cores"};
    for (int i = 0; i < 5; i++)
        md_kv(f, mk[i], json_object_get(m, mk[i]));
    md_kv(f, "compiler", json_object_get(b, "compiler"));
    md_kv(f, "build flags", json_object_get(b, "flags"));
    for (int pi = 0; pi < run->nproblems; pi++) {
        const pb_report_problem *p = &run->problems[pi];
        fputs("\n## ", f);
        md_cell(f, p->name);
        if (p->orbits_max > 0)
            fprintf(f, ": horizon %g periods (%.4g %s)\n\n", p->orbits_max, p->horizon_max, p->time_unit);
        else
            fprintf(f, ": horizon %.4g %s\n\n", p->horizon_max, p->time_unit);
        fputc('|', f);
        for (int c = 0; c < PB_RT_NCOLS; c++) {
            char h[96];
            pb_report_table_heading(c, p, h, sizeof h);
            fputc(' ', f);
            md_cell(f, h);
            fputs(" |", f);
        }
        fputs("\n|", f);
        for (int c = 0; c < PB_RT_NCOLS; c++)
            fputs(c <= PB_RT_STATUS ? " :--- |" : " ---: |", f);
        fputc('\n', f);
        int *best = pb_report_table_best(run, p);
        if (!best)
            return -1;
        for (int i = 0; i < p->n; i++) {
            char cells[PB_RT_NCOLS][PB_RT_CELL];
            pb_report_table_cells(&run->cases[p->first + i], cells);
            fputc('|', f);
            for (int k = 0; k < PB_RT_NCOLS; k++) {
                int bb = best[i * PB_RT_NCOLS + k];
                fputs(bb ? " **" : " ", f);
                md_cell(f, cells[k]);
                fputs(bb ? "** |" : " |", f);
            }
            fputc('\n', f);
        }
        free(best);
        fputs("\nBold marks the best value of each column among cases that finished.\n\n", f);
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            if (!v->made[pi * PB_FIG_COUNT + k])
                continue;
            char base[PB_FIG_BASE_MAX];
            pb_fig_base(p->name, k, base, sizeof base);
            if (v->drawn[pi * PB_FIG_COUNT + k])
                fprintf(f, "![%s](plots/%s.png)\n\n", pb_fig_kind(k), base);
            else
                fprintf(f, "(%s: not drawn; script plots/%s.gp)\n\n", pb_fig_kind(k), base);
            fprintf(f, "*%s*\n\n", pb_report_fig_caption(k));
        }
    }
    fprintf(f, "---\n\n**Caution.** %s\n", caution);
    return 0;
}

static int md_print(FILE *f, const void *ctx)
{
    return md_body(f, ctx);
}

int pb_report_md_write(const pb_report_view *v, char *err, size_t errlen)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/report.md", v->out_dir);
    if (pb_write_atomic_printed(path, md_print, v)) {
        snprintf(err, errlen, "%s: cannot write: %s", path, strerror(errno));
        return -1;
    }
    return 0;
}

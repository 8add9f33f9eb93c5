/* markdown.c - report.md: the same tables as report.html (best values in
 * bold) with links to the PNG figures, for pasting into review documents. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/figure_scripts.h"
#include "bench/report/table.h"
#include "bench/report/markdown.h"
#include "bench/report/context.h"
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

static void md_dl(FILE *f, const pb_report_kv *kv, int n)
{
    for (int i = 0; i < n; i++)
        fprintf(f, "- %s: %s\n", kv[i].key, kv[i].val);
}

/* The summary: cheapest plain-ok case per error level, select's answer. */
static void md_summary(FILE *f, const pb_report_view *v)
{
    fputs("## Summary\n\nFewest evaluations among cases that ended plain ok:\n\n", f);
    for (int pi = 0; pi < v->run->nproblems; pi++) {
        const pb_report_problem *p = &v->run->problems[pi];
        double lv[PB_REPORT_NLEVELS];
        const char *names[PB_REPORT_NLEVELS];
        pb_report_levels(p, lv, names);
        fputs("- **", f);
        md_cell(f, p->name);
        fputs("**:", f);
        for (int l = 0; l < PB_REPORT_NLEVELS; l++) {
            int i = pb_report_cheapest(v->run, p, lv[l]);
            fprintf(f, "%s %s: ", l ? ";" : "", names[l]);
            if (i < 0) {
                fputs("none", f);
                continue;
            }
            char set[64];
            pb_report_case_setting(&v->run->cases[i], set, sizeof set);
            md_cell(f, v->run->cases[i].method);
            fprintf(f, " %s (%ld evaluations%s)", set, v->run->cases[i].evals,
                    pb_report_exact_by_construction(v->run->cases[i].method, p->name)
                        ? "; exact by construction: its map is the Kepler flow, the whole force here"
                        : "");
        }
        pb_report_select sel;
        pb_report_select_find(v->run_dir, p->name, &sel);
        if (sel.found)
            fprintf(f, "; select's answer: %s", sel.answer);
        fputc('\n', f);
    }
}

static int md_problem(FILE *f, const pb_report_view *v, int pi)
{
    const pb_report_run *run = v->run;
    const pb_report_problem *p = &run->problems[pi];
    fputs("\n## ", f);
    md_cell(f, p->name);
    fputs("\n\n", f);
    pb_report_kv kv[PB_KV_MAX];
    md_dl(f, kv, pb_report_problem_def(run, p, kv, PB_KV_MAX));
    fputs("\n|", f);
    for (int c = 0; c < PB_RT_NCOLS; c++) {
        char h[96];
        if (!pb_report_table_shown(c, p))
            continue;
        pb_report_table_heading(c, p, h, sizeof h);
        fputc(' ', f);
        md_cell(f, h);
        fputs(" |", f);
    }
    fputs("\n|", f);
    for (int c = 0; c < PB_RT_NCOLS; c++)
        if (pb_report_table_shown(c, p))
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
            if (!pb_report_table_shown(k, p))
                continue;
            int bb = best[i * PB_RT_NCOLS + k];
            fputs(bb ? " **" : " ", f);
            md_cell(f, cells[k]);
            fputs(bb ? "** |" : " |", f);
        }
        fputc('\n', f);
    }
    free(best);
    fprintf(f, "\nBold %s\n\n", pb_report_table_marks);
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
    return 0;
}

static int md_body(FILE *f, const pb_report_view *v)
{
    const pb_report_run *run = v->run;
    const char *caution = json_string_value(json_object_get(run->doc, "caution"));
    if (!caution)
        caution = "Benchmarks on idealised problems do not validate an operational propagator; "
                  "defer to the mission's own verification and flight-dynamics practice.";
    fprintf(f, "# propbench report: %s\n\n> **Caution.** %s\n\n", v->title, caution);
    if (v->why_not_drawn)
        fprintf(f, "Figures were not drawn: %s. The data and gnuplot scripts are in plots/.\n\n", v->why_not_drawn);
    md_summary(f, v);
    fputs("\n## The run: command, tool, machine and build\n\n", f);
    pb_report_kv kv[PB_KV_MAX];
    md_dl(f, kv, pb_report_run_facts(run, v->title, kv, PB_KV_MAX));
    for (int pi = 0; pi < run->nproblems; pi++)
        if (md_problem(f, v, pi))
            return -1;
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

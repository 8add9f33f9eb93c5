/* html_summary.c - the summary at the top of report.html: the caution,
 * and per problem which method reaches each error level for the fewest
 * evaluations among cases that ended plain ok (or select's answer when the
 * run folder holds one), with every method's growth classes side by side. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/report/context.h"
#include "bench/report/html.h"
#include "bench/report/table.h"

static void sum_case(FILE *f, const pb_report_case *c, const char *len_unit, const char *problem)
{
    char set[64];
    pb_report_case_setting(c, set, sizeof set);
    fputs("<td class=\"l\">", f);
    pb_report_html_text(f, c->method);
    fputs(" ", f);
    pb_report_html_text(f, set);
    fprintf(f, "</td><td>%ld</td><td>%.3e %s", c->evals, c->pos_max, len_unit);
    if (!strcmp(len_unit, "km"))
        fprintf(f, " (%.3g m)", 1e3 * c->pos_max);
    if (pb_report_exact_by_construction(c->method, problem))
        fputs(" (by construction: this method's map is the Kepler flow, the whole force "
              "here, so its error is round-off at any step and the standard suite runs it "
              "at one; see a perturbed problem)", f);
    fputs("</td>", f);
}

/* The levels table of one problem. */
static void sum_levels(FILE *f, const pb_report_view *v, const pb_report_problem *p)
{
    double lv[PB_REPORT_NLEVELS];
    const char *names[PB_REPORT_NLEVELS];
    pb_report_levels(p, lv, names);
    fputs("<table class=\"levels\">\n<tr><th class=\"l\">largest position error at most</th>"
          "<th class=\"l\">fewest evaluations: method and setting</th><th>evaluations</th>"
          "<th>its error</th></tr>\n", f);
    for (int l = 0; l < PB_REPORT_NLEVELS; l++) {
        fputs("<tr><td class=\"l\">", f);
        pb_report_html_text(f, names[l]);
        fputs("</td>", f);
        int i = pb_report_cheapest(v->run, p, lv[l]);
        if (i >= 0)
            sum_case(f, &v->run->cases[i], p->len_unit, p->name);
        else
            fputs("<td class=\"l\" colspan=\"3\">no case of this run that ended plain ok reaches it</td>", f);
        fputs("</tr>\n", f);
    }
    fputs("</table>\n", f);
}

/* Growth classes of position and energy error, one row per method. */
static void sum_growth(FILE *f, const pb_report_view *v, const pb_report_problem *p)
{
    fputs("<table class=\"growth\">\n<tr><th class=\"l\">method</th><th class=\"l\">case</th>"
          "<th class=\"l\">position error growth</th><th class=\"l\">energy error growth</th></tr>\n", f);
    for (int m = 0; m < p->nmethods; m++) {
        int i = pb_report_growth_case(v->run, p, m);
        if (i < 0)
            continue;
        const pb_report_case *c = &v->run->cases[i];
        char set[64], st[PB_RT_STATUS_CELL];
        pb_report_case_setting(c, set, sizeof set);
        pb_report_case_status(c, st, sizeof st);
        fputs("<tr><td class=\"l\">", f);
        pb_report_html_text(f, c->method);
        fputs("</td><td class=\"l\">", f);
        pb_report_html_text(f, set);
        fputs(" (", f);
        pb_report_html_text(f, st);
        fputs(")</td><td class=\"l\">", f);
        pb_report_html_text(f, c->growth_pos ? c->growth_pos : "-");
        if (isfinite(c->k_pos))
            fprintf(f, " (k = %.2f)", c->k_pos);
        fputs("</td><td class=\"l\">", f);
        pb_report_html_text(f, c->growth_energy ? c->growth_energy : "-");
        fputs("</td></tr>\n", f);
    }
    fputs("</table>\n", f);
}

void pb_report_html_summary(FILE *f, const pb_report_view *v, const char *caution)
{
    fputs("<section id=\"summary\">\n<h2>Summary</h2>\n<p class=\"caution\"><strong>Caution.</strong> ", f);
    pb_report_html_text(f, caution);
    fputs("</p>\n<p class=\"note\">Recommendations come only from cases that ended plain ok; each method's "
          "growth classes are those of its finest such case (else its finest finished one, status shown).</p>\n", f);
    for (int pi = 0; pi < v->run->nproblems; pi++) {
        const pb_report_problem *p = &v->run->problems[pi];
        fprintf(f, "<h3><a href=\"#problem-%d\">", pi);
        pb_report_html_text(f, p->name);
        fputs("</a></h3>\n", f);
        pb_report_select sel;
        pb_report_select_find(v->run_dir, p->name, &sel);
        if (sel.found) {
            fputs("<p class=\"select\">select's answer", f);
            if (isfinite(sel.max_pos_err))
                fprintf(f, " for a largest position error of %.3g %s", sel.max_pos_err, p->len_unit);
            fputs(": ", f);
            pb_report_html_text(f, sel.answer);
            fputs("</p>\n", f);
        }
        sum_levels(f, v, p);
        sum_growth(f, v, p);
    }
    fputs("</section>\n", f);
}

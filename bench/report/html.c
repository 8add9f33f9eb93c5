/* html.c - report.html: settings, per-problem tables with the best
 * values marked, figures as inline SVG (ids made unique per figure), and the
 * caution. One file, no scripts, nothing fetched from the network; figures
 * past HTML_INLINE_MAX bytes in all (or with --external-figures) are linked
 * from plots/ instead. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include "bench/report/figure_scripts.h"
#include "bench/report/table.h"
#include "bench/report/html.h"
#include "bench/report/context.h"
#include "bench/store/run_dir.h"

void pb_report_html_text(FILE *f, const char *s)
{
    for (; s && *s; s++) {
        switch (*s) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs("&quot;", f); break;
        case '\'': fputs("&#39;", f); break;
        default: fputc(*s, f);
        }
    }
}

static char *html_slurp(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    char *buf = NULL;
    size_t cap = 0, n = 0;
    for (;;) {
        if (n + 4096 + 1 > cap) {
            cap = cap ? 2 * cap : 65536;
            char *nb = realloc(buf, cap);
            if (!nb) { free(buf); fclose(f); return NULL; }
            buf = nb;
        }
        size_t got = fread(buf + n, 1, 4096, f);
        n += got;
        if (got == 0)
            break;
    }
    fclose(f);
    buf[n] = 0;
    *len = n;
    return buf;
}

/* Copy gnuplot's SVG from its <svg> element on, prefixing every id and
 * every reference to one, because several figures share one document. */
static void html_svg(FILE *f, const char *svg, const char *pfx)
{
    const char *s = strstr(svg, "<svg");
    if (!s)
        return;
    static const char *const keys[] = {"id='", "id=\"", "href='#", "href=\"#", "url(#"};
    while (*s) {
        int hit = 0;
        for (size_t k = 0; k < sizeof keys / sizeof keys[0]; k++) {
            size_t n = strlen(keys[k]);
            if (!strncmp(s, keys[k], n) && (k > 1 || s == svg || s[-1] == ' ' || s[-1] == '\t')) {
                fwrite(s, 1, n, f);
                fprintf(f, "%s-", pfx);
                s += n;
                hit = 1;
                break;
            }
        }
        if (!hit)
            fputc(*s++, f);
    }
}

static const char html_css[] =
    "body{font-family:'DejaVu Sans',Verdana,sans-serif;color:#1b1b1b;background:#f4f1ea;margin:0;}\n"
    "main{max-width:1100px;margin:0 auto;padding:1.2em 1.6em 3em;background:#fffdf8;}\n"
    "h1{font-size:1.6em;border-bottom:3px solid #005f73;padding-bottom:.3em;}\n"
    "h2{font-size:1.3em;color:#005f73;margin-top:2.2em;border-bottom:1px solid #d9d2c3;}\n"
    ".caution{border-left:6px solid #bb3e03;background:#fbeee6;padding:.7em 1em;margin:1em 0;}\n"
    "table{border-collapse:collapse;margin:.8em 0;font-size:.9em;}\n"
    "th,td{border:1px solid #d9d2c3;padding:.25em .6em;text-align:right;}\n"
    "th{background:#efe9dc;} td.l,th.l{text-align:left;}\n"
    "td.best{background:#d8efe9;font-weight:bold;} td.best::after{content:' \\2605';}\n"
    "tr.bad td{color:#a11;} tr.sat td{color:#8a5a00;} p.note{font-size:.85em;color:#444;}\n"
    "figure img{max-width:100%;height:auto;border:1px solid #e4dece;}\n"
    "figure{margin:1.4em 0;} figure svg{max-width:100%;height:auto;border:1px solid #e4dece;}\n"
    "figcaption{font-size:.9em;color:#444;margin-top:.3em;}\n"
    ".missing{color:#7a4a00;font-style:italic;}\n"
    "dl.kv{display:grid;grid-template-columns:max-content auto;gap:.2em 1em;} dl.kv dt{font-weight:bold;}\n";

static void html_kv(FILE *f, const char *k, const char *v)
{
    if (!v)
        return;
    fputs("<dt>", f); pb_report_html_text(f, k); fputs("</dt><dd>", f); pb_report_html_text(f, v); fputs("</dd>\n", f);
}

static void html_dl(FILE *f, const pb_report_kv *kv, int n)
{
    fputs("<dl class=\"kv\">\n", f);
    for (int i = 0; i < n; i++)
        html_kv(f, kv[i].key, kv[i].val);
    fputs("</dl>\n", f);
}

static void html_settings(FILE *f, const pb_report_view *v)
{
    pb_report_kv kv[PB_KV_MAX];
    int n = pb_report_run_facts(v->run, v->title, kv, PB_KV_MAX);
    fputs("<h2 id=\"settings\">The run: command, tool, machine and build</h2>\n", f);
    html_dl(f, kv, n);
}

static void html_table(FILE *f, const pb_report_view *v, const pb_report_problem *p, const int *best)
{
    fputs("<table class=\"summary\">\n<tr>", f);
    for (int c = 0; c < PB_RT_NCOLS; c++) {
        char h[96];
        if (!pb_report_table_shown(c, p))
            continue;
        pb_report_table_heading(c, p, h, sizeof h);
        fputs(c <= PB_RT_STATUS ? "<th class=\"l\">" : "<th>", f);
        pb_report_html_text(f, h);
        fputs("</th>", f);
    }
    fputs("</tr>\n", f);
    for (int i = 0; i < p->n; i++) {
        const pb_report_case *c = &v->run->cases[p->first + i];
        char cells[PB_RT_NCOLS][PB_RT_CELL];
        pb_report_table_cells(c, cells);
        fprintf(f, "<tr class=\"%s\">", !strcmp(c->status, "ok") ? (c->saturated ? "case sat" : "case")
                                                               : "case bad");
        for (int k = 0; k < PB_RT_NCOLS; k++) {
            if (!pb_report_table_shown(k, p))
                continue;
            int b = best && best[i * PB_RT_NCOLS + k];
            fprintf(f, "<td class=\"%s%s\"", k <= PB_RT_STATUS ? "l" : "", b ? " best" : "");
            if (k == PB_RT_STATUS && c->status_detail) {
                fputs(" title=\"", f);
                pb_report_html_text(f, c->status_detail);
                fputs("\"", f);
            }
            fputc('>', f);
            pb_report_html_text(f, cells[k]);
            if (k == PB_RT_STATUS && c->status_detail && strcmp(c->status, "ok")) {
                fputs(": ", f);
                pb_report_html_text(f, c->status_detail);
            }
            fputs("</td>", f);
        }
        fputs("</tr>\n", f);
    }
    fputs("</table>\n<p class=\"note\">&#9733; ", f);
    pb_report_html_text(f, pb_report_table_marks);
    fputs(" ok(sat): finished, but the position error passed a tenth of the orbit's size: the run "
          "follows another orbit.</p>\n", f);
}

/* Inline figures up to this many bytes of SVG in all; past it every
 * figure is linked, so that the page stays small enough to open and mail
 * (the standard suite's figures come to tens of megabytes). */
#define HTML_INLINE_MAX 2500000L

static long html_svg_total(const pb_report_view *v)
{
    long total = 0;
    for (int pi = 0; pi < v->run->nproblems; pi++)
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            if (!v->drawn[pi * PB_FIG_COUNT + k])
                continue;
            char base[PB_FIG_BASE_MAX], path[5000];
            struct stat st;
            pb_fig_base(v->run->problems[pi].name, k, base, sizeof base);
            snprintf(path, sizeof path, "%s/plots/%s.svg", v->out_dir, base);
            if (stat(path, &st) == 0)
                total += (long)st.st_size;
        }
    return total;
}

/* One figure: inline SVG (ids prefixed), or a link to the file. */
static void html_figure(FILE *f, const pb_report_view *v, int pi, int k, int external)
{
    const pb_report_problem *p = &v->run->problems[pi];
    char base[PB_FIG_BASE_MAX], path[5000], pfx[32];
    pb_fig_base(p->name, k, base, sizeof base);
    snprintf(path, sizeof path, "%s/plots/%s.svg", v->out_dir, base);
    snprintf(pfx, sizeof pfx, "f%d-%d", pi, k);
    fprintf(f, "<figure class=\"fig-%s\">\n", pb_fig_kind(k));
    size_t n = 0;
    int drawn = v->drawn[pi * PB_FIG_COUNT + k];
    char *svg = drawn && !external ? html_slurp(path, &n) : NULL;
    if (svg) {
        html_svg(f, svg, pfx);
        free(svg);
    } else if (drawn) {
        fputs("<img src=\"plots/", f);
        pb_report_html_text(f, base);
        fputs(".svg\" alt=\"", f);
        pb_report_html_text(f, pb_fig_kind(k));
        fputs("\" loading=\"lazy\">\n", f);
    } else {
        fputs("<p class=\"missing\">Not drawn; script: plots/", f);
        pb_report_html_text(f, base);
        fputs(".gp</p>\n", f);
    }
    fputs("<figcaption>", f);
    pb_report_html_text(f, pb_report_fig_caption(k));
    fputs("</figcaption>\n</figure>\n", f);
}

static int html_problem(FILE *f, const pb_report_view *v, int pi, int external)
{
    const pb_report_problem *p = &v->run->problems[pi];
    fprintf(f, "<section class=\"problem\" id=\"problem-%d\">\n<h2>", pi);
    pb_report_html_text(f, p->name);
    if (p->orbits_max > 0)
        fprintf(f, " &mdash; horizon %g orbits (%.4g %s)</h2>\n", p->orbits_max, p->horizon_max, p->time_unit);
    else
        fprintf(f, " &mdash; horizon %.4g %s</h2>\n", p->horizon_max, p->time_unit);
    pb_report_kv kv[PB_KV_MAX];
    int n = pb_report_problem_def(v->run, p, kv, PB_KV_MAX);
    fputs("<h3>The problem</h3>\n<div class=\"orbit-definition\">\n", f);
    html_dl(f, kv, n);
    fputs("</div>\n<h3>Cases</h3>\n", f);
    int *best = pb_report_table_best(v->run, p);
    if (!best)
        return -1;
    html_table(f, v, p, best);
    free(best);
    for (int k = 0; k < PB_FIG_COUNT; k++)
        if (v->made[pi * PB_FIG_COUNT + k])
            html_figure(f, v, pi, k, external);
    fputs("</section>\n", f);
    return 0;
}

static int html_body(FILE *f, const pb_report_view *v)
{
    const pb_report_run *run = v->run;
    const char *caution = json_string_value(json_object_get(run->doc, "caution"));
    if (!caution)
        caution = "Benchmarks on idealised problems do not validate an operational propagator; "
                  "defer to the mission's own verification and flight-dynamics practice.";
    fputs("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>propbench report: ", f);
    pb_report_html_text(f, v->title);
    fprintf(f, "</title>\n<style>\n%s</style>\n</head>\n<body>\n<main>\n<h1>propbench report: ", html_css);
    pb_report_html_text(f, v->title);
    fputs("</h1>\n", f);
    pb_report_html_summary(f, v, caution);
    if (v->why_not_drawn) {
        fputs("<p class=\"missing\">Figures were not drawn: ", f);
        pb_report_html_text(f, v->why_not_drawn);
        fputs(". The data and gnuplot scripts are in plots/; run <code>gnuplot ./NAME.gp</code> there.</p>\n", f);
    }
    long svg_total = html_svg_total(v);
    int external = v->external_figures || svg_total > HTML_INLINE_MAX;
    if (external && !v->external_figures)
        fprintf(f, "<p class=\"missing\">The figures (%.1f MB of SVG) are linked from plots/, not inlined "
                "(more than %.1f MB): keep plots/ beside this page.</p>\n", svg_total / 1e6,
                HTML_INLINE_MAX / 1e6);
    html_settings(f, v);
    for (int pi = 0; pi < run->nproblems; pi++)
        if (html_problem(f, v, pi, external))
            return -1;
    fputs("<p class=\"caution\"><strong>Caution.</strong> ", f);
    pb_report_html_text(f, caution);
    fputs("</p>\n</main>\n</body>\n</html>\n", f);
    return 0;
}

static int html_print(FILE *f, const void *ctx)
{
    return html_body(f, ctx);
}

int pb_report_html_write(const pb_report_view *v, char *err, size_t errlen)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/report.html", v->out_dir);
    if (pb_write_atomic_printed(path, html_print, v)) {
        snprintf(err, errlen, "%s: cannot write: %s", path, strerror(errno));
        return -1;
    }
    return 0;
}

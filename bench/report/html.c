/* html.c - report.html: settings, per-problem tables with the best
 * values marked, figures as inline SVG (ids made unique per figure), and the
 * caution. One file, no scripts, nothing fetched from the network. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/report/figure_scripts.h"
#include "bench/report/table.h"
#include "bench/report/html.h"
#include "bench/store/run_dir.h"

static void html_text(FILE *f, const char *s)
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
    "tr.bad td{color:#a11;}\n"
    "figure{margin:1.4em 0;} figure svg{max-width:100%;height:auto;border:1px solid #e4dece;}\n"
    "figcaption{font-size:.9em;color:#444;margin-top:.3em;}\n"
    ".missing{color:#7a4a00;font-style:italic;}\n"
    "dl.kv{display:grid;grid-template-columns:max-content auto;gap:.2em 1em;} dl.kv dt{font-weight:bold;}\n";

static void html_kv(FILE *f, const char *k, const char *v)
{
    if (!v)
        return;
    fputs("<dt>", f); html_text(f, k); fputs("</dt><dd>", f); html_text(f, v); fputs("</dd>\n", f);
}

static void html_settings(FILE *f, const pb_report_view *v)
{
    const json_t *doc = v->run->doc;
    const json_t *m = json_object_get(doc, "machine"), *b = json_object_get(doc, "build");
    char buf[256];
    fputs("<h2 id=\"settings\">Run settings, machine and build</h2>\n<dl class=\"kv\">\n", f);
    html_kv(f, "run", v->title);
    html_kv(f, "tool", json_string_value(json_object_get(doc, "tool")));
    snprintf(buf, sizeof buf, "%lld", (long long)json_integer_value(json_object_get(doc, "format")));
    html_kv(f, "summary format", buf);
    html_kv(f, "sweep", json_string_value(json_object_get(doc, "sweep")));
    snprintf(buf, sizeof buf, "%d cases on %d problem%s", v->run->ncases, v->run->nproblems,
             v->run->nproblems == 1 ? "" : "s");
    html_kv(f, "cases", buf);
    const char *mk[] = {"system", "release", "arch", "cpu"};
    for (int i = 0; i < 4; i++)
        html_kv(f, mk[i], json_string_value(json_object_get(m, mk[i])));
    if (json_is_integer(json_object_get(m, "cores"))) {
        snprintf(buf, sizeof buf, "%lld", (long long)json_integer_value(json_object_get(m, "cores")));
        html_kv(f, "cores", buf);
    }
    html_kv(f, "compiler", json_string_value(json_object_get(b, "compiler")));
    html_kv(f, "build flags", json_string_value(json_object_get(b, "flags")));
    fputs("</dl>\n", f);
}

static void html_table(FILE *f, const pb_report_view *v, const pb_report_problem *p, const int *best)
{
    fputs("<table class=\"summary\">\n<tr>", f);
    for (int c = 0; c < PB_RT_NCOLS; c++) {
        char h[96];
        pb_report_table_heading(c, p, h, sizeof h);
        fputs(c <= PB_RT_STATUS ? "<th class=\"l\">" : "<th>", f);
        html_text(f, h);
        fputs("</th>", f);
    }
    fputs("</tr>\n", f);
    for (int i = 0; i < p->n; i++) {
        const pb_report_case *c = &v->run->cases[p->first + i];
        char cells[PB_RT_NCOLS][PB_RT_CELL];
        pb_report_table_cells(c, cells);
        fprintf(f, "<tr class=\"%s\">", strcmp(c->status, "ok") ? "case bad" : "case");
        for (int k = 0; k < PB_RT_NCOLS; k++) {
            int b = best && best[i * PB_RT_NCOLS + k];
            fprintf(f, "<td class=\"%s%s\">", k <= PB_RT_STATUS ? "l" : "", b ? " best" : "");
            html_text(f, cells[k]);
            fputs("</td>", f);
        }
        fputs("</tr>\n", f);
    }
    fputs("</table>\n<p>&#9733; marks the best value of each column among cases that finished "
          "(lowest error, growth exponent nearest zero, fewest evaluations, least time per step).</p>\n", f);
}

static int html_body(FILE *f, const pb_report_view *v)
{
    const pb_report_run *run = v->run;
    const char *caution = json_string_value(json_object_get(run->doc, "caution"));
    if (!caution)
        caution = "Benchmarks on idealised problems do not validate an operational propagator; "
                  "defer to the mission's own verification and flight-dynamics practice.";
    fputs("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<title>propbench report: ", f);
    html_text(f, v->title);
    fprintf(f, "</title>\n<style>\n%s</style>\n</head>\n<body>\n<main>\n<h1>propbench report: ", html_css);
    html_text(f, v->title);
    fputs("</h1>\n<p class=\"caution\"><strong>Caution.</strong> ", f);
    html_text(f, caution);
    fputs("</p>\n", f);
    if (v->why_not_drawn) {
        fputs("<p class=\"missing\">Figures were not drawn: ", f);
        html_text(f, v->why_not_drawn);
        fputs(". The data and gnuplot scripts are in plots/; run <code>gnuplot ./NAME.gp</code> there.</p>\n", f);
    }
    html_settings(f, v);
    for (int pi = 0; pi < run->nproblems; pi++) {
        const pb_report_problem *p = &run->problems[pi];
        fprintf(f, "<section class=\"problem\" id=\"problem-%d\">\n<h2>", pi);
        html_text(f, p->name);
        char hz[128];
        if (p->orbits_max > 0)
            snprintf(hz, sizeof hz, " &mdash; horizon %g periods (%.4g %s)", p->orbits_max, p->horizon_max, p->time_unit);
        else
            snprintf(hz, sizeof hz, " &mdash; horizon %.4g %s", p->horizon_max, p->time_unit);
        fprintf(f, "%s</h2>\n", hz);
        int *best = pb_report_table_best(run, p);
        if (!best)
            return -1;
        html_table(f, v, p, best);
        free(best);
        for (int k = 0; k < PB_FIG_COUNT; k++) {
            if (!v->made[pi * PB_FIG_COUNT + k])
                continue;
            char base[PB_FIG_BASE_MAX], path[5000], pfx[32];
            pb_fig_base(p->name, k, base, sizeof base);
            snprintf(path, sizeof path, "%s/plots/%s.svg", v->out_dir, base);
            snprintf(pfx, sizeof pfx, "f%d-%d", pi, k);
            fprintf(f, "<figure class=\"fig-%s\">\n", pb_fig_kind(k));
            size_t n = 0;
            char *svg = v->drawn[pi * PB_FIG_COUNT + k] ? html_slurp(path, &n) : NULL;
            if (svg) {
                html_svg(f, svg, pfx);
                free(svg);
            } else {
                fputs("<p class=\"missing\">Not drawn; script: plots/", f);
                html_text(f, base);
                fputs(".gp</p>\n", f);
            }
            fputs("<figcaption>", f);
            html_text(f, pb_report_fig_caption(k));
            fputs("</figcaption>\n</figure>\n", f);
        }
        fputs("</section>\n", f);
    }
    fputs("<p class=\"caution\"><strong>Caution.</strong> ", f);
    html_text(f, caution);
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

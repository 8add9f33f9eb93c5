/* problem_file.c - reads user problem files (INI through inih, one case per
 * "[case NAME]" section) into problems, validating every key; the checks of
 * a finished case are in problem_file_case.c, those of its force terms in
 * problem_file_forces.c. Lines are counted by our own reader so every
 * message names file, line and key. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <ini.h>
#include "problem_file.h"
#include "problem_file_case.h"
#include "problem_file_forces.h"
#include "bodies.h"
#include "files.h"

/* inih keeps at most MAX_SECTION - 1 = 49 characters between the brackets
 * (MAX_SECTION is 50 in inih's ini.c and not exported) and cuts the rest
 * silently, so "[case NAME]" allows a NAME of 49 - strlen("case ") = 44. */
#define PF_SECTION_MAX 49
#define PF_CASE_NAME_MAX (PF_SECTION_MAX - 5)

/* In the order the "unknown key" message lists them (problem_file_case.h). */
const char *const pb_problem_file_keys[K_COUNT + 1] = {
    [K_UNITS] = "units", [K_MU] = "mu", [K_BODY] = "body", [K_FORCE] = "force",
    [K_A] = "a", [K_E] = "e", [K_I] = "i_deg", [K_RAAN] = "raan_deg", [K_ARGP] = "argp_deg",
    [K_NU] = "nu_deg", [K_R] = "r", [K_V] = "v", [K_ORBITS] = "orbits",
    [K_HORIZON] = "horizon_s", [K_RADIUS] = "radius", [K_J2] = "j2", [K_J3] = "j3", [K_J4] = "j4",
    [K_J5] = "j5", [K_J6] = "j6", [K_ZONAL] = "zonal_degree", [K_GAMMA] = "r2_potential_gamma",
    [K_DRAG] = "drag", [K_BALLISTIC] = "ballistic_m2_kg", [K_THIRD] = "third_bodies",
    [K_EPOCH] = "epoch", [K_CIRC] = "third_body_circular", [K_SRP] = "srp_area_mass_m2_kg",
    [K_CR] = "cr", [K_SHADOW] = "shadow", [K_MAN] = "manoeuvres", [K_FORM] = "formulation",
    [K_DESC] = "description",
    [K_COUNT] = NULL
};

typedef struct pf_ctx {
    const char *path;
    FILE *f;
    int line;                 /* lines read so far = line of the current key */
    int section_line;         /* line of the latest "[...]" header */
    int failed;
    char *err;
    size_t errlen;
    void (*warn)(const char *msg);
    pf_case cur;
    int have_cur;
    pb_problem *out;
    int n, cap;
    int *case_lines;          /* header line of each finished case */
    int hdr_line;             /* line of the latest header seen by the reader */
    int hdr_keys;             /* keys handled since that header */
    char hdr_text[80];        /* its text between the brackets, for messages */
    char raw[256];            /* the current line as read, before inih cuts comments */
} pf_ctx;

static void pf_fail(pf_ctx *c, int line, const char *key, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
static void pf_fail(pf_ctx *c, int line, const char *key, const char *fmt, ...)
{
    if (c->failed)
        return;
    c->failed = PB_EINVAL;
    char msg[1024];  /* room for the unknown-key message's list of keys */
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    if (key)
        snprintf(c->err, c->errlen, "%s:%d: key '%s': %s", c->path, line, key, msg);
    else
        snprintf(c->err, c->errlen, "%s:%d: %s", c->path, line, msg);
}

/* A section whose header is followed by no key would vanish without a trace
 * (inih reports only keys); say so at its header line. */
static void pf_check_empty_section(pf_ctx *c)
{
    if (!c->hdr_line || c->hdr_keys)
        return;
    const char *t = c->hdr_text;
    if (strncmp(t, "case", 4) == 0 && (t[4] == ' ' || t[4] == '\t')) {
        t += 4;
        while (*t == ' ' || *t == '\t')
            t++;
        pf_fail(c, c->hdr_line, NULL, "case '%s' has no keys", t);
    } else {
        pf_fail(c, c->hdr_line, NULL, "section '[%s]' has no keys", t);
    }
}

/* Checks that need the raw header text, before inih shortens it. */
static void pf_check_header(pf_ctx *c, const char *open)
{
    const char *close = strchr(open + 1, ']');
    size_t len = close ? (size_t)(close - open - 1) : strlen(open + 1);
    snprintf(c->hdr_text, sizeof c->hdr_text, "%.*s", (int)len, open + 1);
    c->hdr_line = c->line;
    c->hdr_keys = 0;
    if (!close || len <= PF_SECTION_MAX)
        return;  /* a missing ']' is inih's syntax error */
    const char *q = open + 1;
    if (strncmp(q, "case", 4) == 0 && (q[4] == ' ' || q[4] == '\t')) {
        q += 4;
        while (*q == ' ' || *q == '\t')
            q++;
        if ((size_t)(close - q) > PF_CASE_NAME_MAX) {
            pf_fail(c, c->line, NULL, "case name '%.*s' is longer than %d characters (%d given)",
                    (int)(close - q), q, PF_CASE_NAME_MAX, (int)(close - q));
            return;
        }
    }
    pf_fail(c, c->line, NULL, "section header is longer than %d characters between the brackets",
            PF_SECTION_MAX);
}

/* inih's line source: fgets, counting lines and noting section headers.
 * inih would join an indented line to the key above it (a continuation
 * line), which reads as that key "given twice"; indented keys, headers and
 * values are refused here instead (indented comments and blank lines pass). */
static char *pf_reader(char *str, int num, void *stream)
{
    pf_ctx *c = stream;
    if (c->failed)
        return NULL;
    size_t len = 0;
    int ch = EOF, nul = 0;
    /* fgets would hide a NUL byte from every strlen after it: a key behind
     * one would be read, "e = 0.1\0junk" accepted, /dev/zero read forever */
    while (len + 1 < (size_t)num && (ch = getc(c->f)) != EOF) {
        nul |= ch == 0;
        str[len++] = (char)ch;
        if (ch == '\n')
            break;
    }
    str[len] = 0;
    if (!len) {
        pf_check_empty_section(c);
        return NULL;
    }
    char *s = str;
    c->line++;
    if (nul) {
        pf_fail(c, c->line, NULL, "a NUL byte: not a text file");
        return NULL;
    }
    snprintf(c->raw, sizeof c->raw, "%s", s);
    if (len == (size_t)num - 1 && s[len - 1] != '\n' && !feof(c->f)) {
        /* inih's line buffer is fixed: say so rather than misparse the rest */
        pf_fail(c, c->line, NULL, "line longer than %d characters", num - 2);
        return NULL;
    }
    const char *q = s;
    while (*q == ' ' || *q == '\t')
        q++;
    if (q > s && *q && !strchr("\r\n;#", *q)) {
        pf_fail(c, c->line, NULL, "indented line: keys must start at the beginning of the line "
                "(continuation lines are not supported)");
        return NULL;
    }
    if (*q == '[') {
        pf_check_empty_section(c);
        pf_check_header(c, q);
        c->section_line = c->line;
        if (c->failed)
            return NULL;
    }
    return s;
}

static int pf_parse_number(pf_ctx *c, const char *key, const char *val, double *out)
{
    char *end;
    errno = 0;
    double x = strtod(val, &end);
    while (*end == ' ' || *end == '\t')
        end++;
    if (end == val || *end) {
        pf_fail(c, c->line, key, "not a number ('%s')", val);
        return -1;
    }
    if (!isfinite(x) || errno == ERANGE) {
        pf_fail(c, c->line, key, "value must be finite (got '%s')", val);
        return -1;
    }
    *out = x;
    return 0;
}

static int pf_parse_vec(pf_ctx *c, const char *key, const char *val, double *out)
{
    char buf[256];
    snprintf(buf, sizeof buf, "%s", val);
    char *save = NULL, *tok = strtok_r(buf, ",", &save);
    int k = 0;
    for (; tok && k < 3; k++, tok = strtok_r(NULL, ",", &save)) {
        while (*tok == ' ' || *tok == '\t')
            tok++;
        if (pf_parse_number(c, key, tok, &out[k]))
            return -1;
    }
    if (k != 3 || tok) {
        pf_fail(c, c->line, key, "needs three comma-separated numbers (got '%s')", val);
        return -1;
    }
    return 0;
}

static int pf_known_section(pf_ctx *c, const char *section, char *name)
{
    if (strncmp(section, "case", 4) != 0 || (section[4] && section[4] != ' ' && section[4] != '\t')) {
        pf_fail(c, c->section_line, NULL, "section '[%s]' is not of the form '[case NAME]'", section);
        return -1;
    }
    const char *q = section + 4;
    while (*q == ' ' || *q == '\t')
        q++;
    if (!*q) {
        pf_fail(c, c->section_line, NULL, "section '[%s]' has no case name", section);
        return -1;
    }
    /* the name becomes part of file names: letters, digits and . _ + - only */
    for (const char *p = q; *p; p++)
        if (!(isalnum((unsigned char)*p) || *p == '.' || *p == '_' || *p == '+' || *p == '-') ||
            (p == q && *p == '.')) {
            pf_fail(c, c->section_line, NULL, "case name '%s' may hold only letters, digits and "
                    ". _ + - (and may not start with '.')", q);
            return -1;
        }
    if (strlen(q) >= PB_NAME_MAX) {
        pf_fail(c, c->section_line, NULL, "case name '%s' is longer than %d characters",
                q, PB_NAME_MAX - 1);
        return -1;
    }
    for (int k = 0; k < c->n; k++)
        if (strcmp(c->out[k].name, q) == 0) {
            pf_fail(c, c->section_line, NULL, "duplicate case name '%s' (first at line %d)", q,
                    c->case_lines[k]);
            return -1;
        }
    snprintf(name, PB_NAME_MAX, "%s", q);
    return 0;
}

/* The keys of the table as "units, mu, ...", for the unknown-key message. */
static void pf_known_keys(char *buf, size_t len)
{
    size_t n = 0;
    buf[0] = '\0';
    for (int k = 0; k < K_COUNT && n < len; k++) {
        int w = snprintf(buf + n, len - n, "%s%s", k ? ", " : "", pb_problem_file_keys[k]);
        if (w < 0)
            break;
        n += (size_t)w;
    }
}

/* inih ends a value at " ;" (an inline comment), so "1 0 0.1 0 ; 2 0 0.1 0"
 * would silently lose its second manoeuvre: a comment that reads like more
 * entries is refused. */
static void pf_check_cut_list(pf_ctx *c, const char *key, const char *val)
{
    const char *eq = strchr(c->raw, '=');
    const char *at = eq ? strstr(eq, val) : NULL;
    if (!at || !*val)
        return;
    const char *q = at + strlen(val);
    while (*q == ' ' || *q == '\t')
        q++;
    if (*q != ';')
        return;
    for (q++; *q == ' ' || *q == '\t'; q++)
        ;
    if (isdigit((unsigned char)*q) || *q == '+' || *q == '-' || *q == '.')
        pf_fail(c, c->line, key, "' ;' starts a comment, which would drop the entries after it ('%.*s'); "
                "write 't dv_r dv_t dv_n; t ...' with no blank before each ';'", (int)strcspn(q, "\r\n"), q);
}

static int pf_finish(pf_ctx *c);

static int pf_handler(void *user, const char *section, const char *key, const char *val)
{
    pf_ctx *c = user;
    if (c->failed)
        return 1;
    c->hdr_keys++;
    if (!c->have_cur || c->cur.line != c->section_line) {
        if (c->have_cur && pf_finish(c))
            return 1;
        if (!*section) {
            pf_fail(c, c->line, key, "key outside a '[case NAME]' section");
            return 1;
        }
        memset(&c->cur, 0, sizeof c->cur);
        if (pf_known_section(c, section, c->cur.name))
            return 1;
        c->cur.line = c->section_line;
        c->have_cur = 1;
    }
    pf_case *cs = &c->cur;
    int k = 0;
    while (k < K_COUNT && strcmp(pb_problem_file_keys[k], key) != 0)
        k++;
    if (k == K_COUNT) {
        char known[768];
        pf_known_keys(known, sizeof known);
        pf_fail(c, c->line, key, "unknown key (known: %s)", known);
        return 1;
    }
    if (cs->kline[k]) {
        pf_fail(c, c->line, key, "given twice in case '%s' (first at line %d)", cs->name,
                cs->kline[k]);
        return 1;
    }
    cs->kline[k] = c->line;
    switch (k) {
    case K_UNITS:
        if (strcmp(val, "km-s") && strcmp(val, "normalized"))
            pf_fail(c, c->line, key, "unknown units '%s' (known: km-s, normalized)", val);
        break;
    case K_FORCE:
        if (strcmp(val, "two-body") && strcmp(val, "j2"))
            pf_fail(c, c->line, key, "unknown force model '%s' (known: two-body, j2)", val);
        break;
    case K_BODY:
        if (!pb_body_find(val))
            pf_fail(c, c->line, key, "unknown body '%s' (known: %s)", val, pb_body_names());
        break;
    case K_DESC:
        break;
    case K_FORM:
        cs->num[k] = -1;
        for (int f = 0; f < PB_FORMULATION_COUNT; f++)
            if (strcmp(val, pb_formulation_name(f)) == 0)
                cs->num[k] = f;
        if (cs->num[k] < 0)
            pf_fail(c, c->line, key, "unknown formulation '%s' (known: cartesian, sundman, ks)",
                    val);
        break;
    case K_DRAG:
    case K_THIRD:
    case K_EPOCH:
    case K_CIRC:
    case K_SHADOW:
        break;  /* read and checked with the case (problem_file_forces.c) */
    case K_MAN:
        pf_check_cut_list(c, key, val);
        break;
    case K_R:
    case K_V:
        pf_parse_vec(c, key, val, cs->vec[k == K_V]);
        break;
    default:
        pf_parse_number(c, key, val, &cs->num[k]);
        break;
    }
    snprintf(cs->str[k], sizeof cs->str[k], "%s", val);
    return 1;
}

/* Check the finished case and append it to c->out. */
static int pf_finish(pf_ctx *c)
{
    c->have_cur = 0;
    if (pb_problem_file_case(&c->cur, c->path, &c->out[c->n], c->err, c->errlen, c->warn) ||
        pb_problem_file_forces(&c->cur, c->path, &c->out[c->n], c->err, c->errlen, c->warn)) {
        c->failed = PB_EINVAL;
        return -1;
    }
    c->case_lines[c->n] = c->cur.line;
    c->n++;
    return 0;
}

/* Room for one more case before a section is finished. */
static int pf_grow(pf_ctx *c)
{
    if (c->n < c->cap)
        return 0;
    int cap = c->cap ? 2 * c->cap : 8;
    pb_problem *o = realloc(c->out, (size_t)cap * sizeof *o);
    if (!o)
        return -1;
    c->out = o;
    int *l = realloc(c->case_lines, (size_t)cap * sizeof *l);
    if (!l)
        return -1;
    c->case_lines = l;
    c->cap = cap;
    return 0;
}

static int pf_handler_grow(void *user, const char *section, const char *key, const char *val)
{
    pf_ctx *c = user;
    if (!c->failed && pf_grow(c)) {
        c->failed = PB_ENOMEM;
        snprintf(c->err, c->errlen, "%s: out of memory", c->path);
    }
    return pf_handler(user, section, key, val);
}

int pb_problem_file_read(const char *path, pb_problem **cases, int *ncases,
                         char *err, size_t errlen, void (*warn)(const char *msg))
{
    char dummy[8];
    if (!err || errlen == 0) {
        err = dummy;
        errlen = sizeof dummy;
    }
    err[0] = '\0';
    *cases = NULL;
    *ncases = 0;
    pf_ctx c;
    memset(&c, 0, sizeof c);
    c.path = path;
    c.err = err;
    c.errlen = errlen;
    c.warn = warn;
    const char *why;
    c.f = pb_open_input(path, "r", &why);
    if (!c.f) {
        snprintf(err, errlen, "%s: cannot read the problem file: %s", path, why);
        return PB_EINVAL;
    }
    int r = ini_parse_stream(pf_reader, &c, pf_handler_grow, &c);
    fclose(c.f);
    if (!c.failed && r > 0)
        pf_fail(&c, r, NULL, "syntax error (expected '[case NAME]', 'key = value' or a comment)");
    if (!c.failed && r < 0) {
        c.failed = PB_ENOMEM;
        snprintf(err, errlen, "%s: out of memory", path);
    }
    if (!c.failed && c.have_cur && pf_grow(&c) == 0)
        pf_finish(&c);
    if (!c.failed && c.n == 0)
        pf_fail(&c, c.line, NULL, "no '[case NAME]' section with keys");
    free(c.case_lines);
    if (c.failed) {
        free(c.out);
        return c.failed;
    }
    *cases = c.out;
    *ncases = c.n;
    return PB_OK;
}

/* oem_read.c - the strict OEM (KVN) reader (oem_read.h). Grammar, after
 * CCSDS 502.0-B-3 sections 5 and 7: a header (CCSDS_OEM_VERS first, then
 * CREATION_DATE, ORIGINATOR, optional MESSAGE_ID), one metadata block
 * between META_START and META_STOP, then data lines of 7 values (epoch,
 * position, velocity) or 10 (with acceleration, ignored); COMMENT lines and
 * blank lines anywhere. Covariance and further segments are refused. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/store/oem_read.h"
#include "bench/store/oem_write.h"
#include "problems/files.h"

enum { OEM_HEADER, OEM_META, OEM_DATA };

typedef struct oem_parse {
    const char *path;
    const pb_problem *p;
    pb_oem *o;
    char *err;
    size_t errlen;
    int line, part, cap;
    int have[16];             /* mandatory keywords seen, by table index */
    double start, stop;
} oem_parse;

static const char *const oem_keys[] = {
    /* header */ "CCSDS_OEM_VERS", "CREATION_DATE", "ORIGINATOR", "MESSAGE_ID",
    /* metadata */ "OBJECT_NAME", "OBJECT_ID", "CENTER_NAME", "REF_FRAME", "TIME_SYSTEM",
    "START_TIME", "STOP_TIME", "REF_FRAME_EPOCH", "USEABLE_START_TIME", "USEABLE_STOP_TIME",
    "INTERPOLATION", "INTERPOLATION_DEGREE", NULL
};
#define OEM_FIRST_META 4
#define OEM_NMANDATORY_META 7  /* OBJECT_NAME .. STOP_TIME */

static int oem_fail(oem_parse *ps, const char *key, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

static int oem_fail(oem_parse *ps, const char *key, const char *fmt, ...)
{
    int n = snprintf(ps->err, ps->errlen, "%s:%d: %s: ", ps->path, ps->line, key);
    va_list ap;
    va_start(ap, fmt);
    if (n >= 0 && (size_t)n < ps->errlen)
        vsnprintf(ps->err + n, ps->errlen - (size_t)n, fmt, ap);
    va_end(ap);
    return -1;
}

static int oem_key_index(const char *k)
{
    for (int i = 0; oem_keys[i]; i++)
        if (!strcmp(oem_keys[i], k))
            return i;
    return -1;
}

/* Check the metadata value of key index i against the problem. */
static int oem_meta_value(oem_parse *ps, int i, const char *key, const char *val)
{
    const char *center, *frame;
    pb_oem_frame(ps->p, &center, &frame);
    pb_oem *o = ps->o;
    if (!strcmp(key, "OBJECT_NAME")) snprintf(o->object_name, sizeof o->object_name, "%s", val);
    if (!strcmp(key, "OBJECT_ID")) snprintf(o->object_id, sizeof o->object_id, "%s", val);
    if (!strcmp(key, "CENTER_NAME") && strcmp(val, center))
        return oem_fail(ps, key, "'%s' does not match problem '%s', whose states are about %s",
                        val, ps->p->name, center);
    if (!strcmp(key, "REF_FRAME") && strcmp(val, frame))
        return oem_fail(ps, key, "'%s' does not match problem '%s', whose frame is %s",
                        val, ps->p->name, frame);
    if (!strcmp(key, "TIME_SYSTEM") && strcmp(val, "TT"))
        return oem_fail(ps, key, "'%s' is not supported: propbench's epochs are TT", val);
    double *dst = !strcmp(key, "START_TIME") ? &ps->start : !strcmp(key, "STOP_TIME") ? &ps->stop : NULL;
    if (dst && pb_oem_epoch_parse(val, dst))
        return oem_fail(ps, key, "'%s' is not an epoch (YYYY-MM-DDThh:mm:ss[.f])", val);
    if (!strcmp(key, "INTERPOLATION_DEGREE")) {
        char *end;
        errno = 0;
        long d = strtol(val, &end, 10);
        if (*end || errno || d < 0)
            return oem_fail(ps, key, "'%s' is not a non-negative integer", val);
    }
    ps->have[i] = 1;
    return 0;
}

/* A "KEY = value" line of the header or the metadata. */
static int oem_keyword(oem_parse *ps, char *s)
{
    char *eq = strchr(s, '=');
    if (!eq)
        return oem_fail(ps, ps->part == OEM_HEADER ? "META_START" : "META_STOP",
                        "missing before this line, which is not 'KEY = value'");
    char *ke = eq ? eq : s + strlen(s);
    while (ke > s && ke[-1] == ' ')
        ke--;
    char key[PB_OEM_LINE_MAX + 1];
    snprintf(key, sizeof key, "%.*s", (int)(ke - s), s);
    int i = oem_key_index(key);
    if (i < 0)
        return oem_fail(ps, key, "unknown keyword in the %s", ps->part == OEM_HEADER ? "header" : "metadata");
    char *val = eq + 1;
    while (*val == ' ')
        val++;
    size_t n = strlen(val);
    while (n > 0 && val[n - 1] == ' ')
        val[--n] = 0;
    if (!n)
        return oem_fail(ps, key, "no value");
    if ((ps->part == OEM_HEADER) != (i < OEM_FIRST_META))
        return oem_fail(ps, key, "belongs in the %s", i < OEM_FIRST_META ? "header" : "metadata");
    if (ps->have[i])
        return oem_fail(ps, key, "given twice");
    if (i == 0 && strcmp(val, "3.0") && strcmp(val, "2.0") && strcmp(val, "1.0"))
        return oem_fail(ps, key, "version '%s' is not one of 1.0, 2.0, 3.0", val);
    if (i == 0 || i < OEM_FIRST_META) {
        ps->have[i] = 1;
        return 0;
    }
    return oem_meta_value(ps, i, key, val);
}

/* Every mandatory keyword of the part just closed was given. */
static int oem_mandatory(oem_parse *ps, int from, int to, const char *where)
{
    for (int i = from; i < to; i++)
        if (!ps->have[i])
            return oem_fail(ps, oem_keys[i], "missing from the %s", where);
    return 0;
}

static int oem_grow(oem_parse *ps)
{
    pb_ephemeris *e = &ps->o->eph;
    if (e->n < ps->cap)
        return 0;
    int cap = ps->cap ? 2 * ps->cap : 256;
    double *t = realloc(e->t, (size_t)cap * sizeof *t);
    if (t) e->t = t;
    double *r = realloc(e->r, (size_t)cap * 3 * sizeof *r);
    if (r) e->r = r;
    double *v = realloc(e->v, (size_t)cap * 3 * sizeof *v);
    if (v) e->v = v;
    if (!t || !r || !v)
        return oem_fail(ps, "data", "out of memory");
    ps->cap = cap;
    return 0;
}

/* One data line: epoch and 6 (or 9) numbers. */
static int oem_data(oem_parse *ps, char *s)
{
    char *tok[12];
    int n = 0;
    for (char *t = strtok(s, " "); t; t = strtok(NULL, " "))
        if (n < 12)
            tok[n++] = t;
        else
            n = 12;
    if (n != 7 && n != 10)
        return oem_fail(ps, "data", "%d columns; a data line is 'epoch X Y Z X_DOT Y_DOT Z_DOT' "
                        "(7 columns, or 10 with accelerations)", n > 11 ? 12 : n);
    double el, x[9];
    if (pb_oem_epoch_parse(tok[0], &el))
        return oem_fail(ps, "EPOCH", "'%s' is not an epoch (YYYY-MM-DDThh:mm:ss[.f])", tok[0]);
    static const char *const col[] = {"X", "Y", "Z", "X_DOT", "Y_DOT", "Z_DOT",
                                      "X_DDOT", "Y_DDOT", "Z_DDOT"};
    for (int k = 1; k < n; k++) {
        char *end;
        x[k - 1] = strtod(tok[k], &end);
        if (*end || end == tok[k] || !isfinite(x[k - 1]))
            return oem_fail(ps, col[k - 1], "'%s' is not a finite number", tok[k]);
    }
    if (el < ps->start || el > ps->stop)
        return oem_fail(ps, "EPOCH", "%s lies outside START_TIME..STOP_TIME", tok[0]);
    if (el < 0)
        return oem_fail(ps, "EPOCH", "%s is before the problem's start %s", tok[0], PB_OEM_EPOCH);
    pb_ephemeris *e = &ps->o->eph;
    double t = ps->p->t0 + el;
    if (e->n > 0 && !(t > e->t[e->n - 1]))
        return oem_fail(ps, "EPOCH", "%s is not after the epoch of the line before", tok[0]);
    if (oem_grow(ps))
        return -1;
    e->t[e->n] = t;
    memcpy(e->r + 3 * e->n, x, 3 * sizeof(double));
    memcpy(e->v + 3 * e->n, x + 3, 3 * sizeof(double));
    e->n++;
    return 0;
}

/* One line (without its newline), by the part of the message it is in. */
static int oem_line(oem_parse *ps, char *s)
{
    if (!ps->have[0] && strncmp(s, "CCSDS_OEM_VERS", 14))
        return oem_fail(ps, "CCSDS_OEM_VERS", "must come first, before any other line");
    if (!strncmp(s, "COMMENT", 7) && (s[7] == 0 || s[7] == ' '))
        return 0;
    if (!strcmp(s, "META_START")) {
        if (ps->part != OEM_HEADER)
            return oem_fail(ps, "META_START", "a second segment: propbench reads one");
        ps->part = OEM_META;
        return oem_mandatory(ps, 0, 3, "header");
    }
    if (!strcmp(s, "META_STOP")) {
        if (ps->part != OEM_META)
            return oem_fail(ps, "META_STOP", "without META_START");
        ps->part = OEM_DATA;
        return oem_mandatory(ps, OEM_FIRST_META, OEM_FIRST_META + OEM_NMANDATORY_META, "metadata");
    }
    if (!strcmp(s, "COVARIANCE_START"))
        return oem_fail(ps, "COVARIANCE_START", "covariance data is not supported");
    if (ps->part == OEM_DATA)
        return oem_data(ps, s);
    return oem_keyword(ps, s);
}

/* Read and check one physical line into buf (newline removed); 1 at end of
 * file, 0, or -1 after an error. A NUL byte counts as non-printable. */
static int oem_getline(oem_parse *ps, FILE *f, char *buf, size_t len)
{
    char *line = NULL;
    size_t cap = 0;
    ssize_t got = getline(&line, &cap, f);
    if (got < 0) {
        free(line);
        return 1;
    }
    ps->line++;
    size_t n = (size_t)got;
    if (n > 0 && line[n - 1] == '\n')
        n--;
    if (n > 0 && line[n - 1] == '\r')
        n--;
    int rc = 0;
    if (n > PB_OEM_LINE_MAX)
        rc = oem_fail(ps, "line", "longer than %d characters", PB_OEM_LINE_MAX);
    for (size_t k = 0; !rc && k < n; k++) {
        unsigned char c = (unsigned char)line[k];
        if (c == '\t')
            rc = oem_fail(ps, "line", "a tab at column %zu: KVN allows spaces only", k + 1);
        else if (c < 32 || c > 126)
            rc = oem_fail(ps, "line", "a non-printable byte 0x%02x at column %zu", c, k + 1);
    }
    if (!rc) {
        memcpy(buf, line, n < len ? n : len - 1);
        buf[n < len ? n : len - 1] = 0;
    }
    free(line);
    return rc;
}

static char *oem_trim(char *s)
{
    while (*s == ' ')
        s++;
    size_t n = strlen(s);
    while (n > 0 && s[n - 1] == ' ')
        s[--n] = 0;
    return s;
}

int pb_oem_read(const char *path, const pb_problem *p, pb_oem *out, char *err, size_t errlen)
{
    memset(out, 0, sizeof *out);
    oem_parse ps = {.path = path, .p = p, .o = out, .err = err, .errlen = errlen};
    const char *why;
    FILE *f = pb_open_input(path, "rb", &why);
    if (!f) {
        snprintf(err, errlen, "%s: cannot read: %s", path, why);
        return -1;
    }
    char buf[PB_OEM_LINE_MAX + 8];
    int rc, bad = 0;
    while (!bad && (rc = oem_getline(&ps, f, buf, sizeof buf)) != 1) {
        char *s = rc ? NULL : oem_trim(buf);
        bad = rc || (*s && oem_line(&ps, s));
    }
    fclose(f);
    if (!bad && ps.part != OEM_DATA)
        bad = oem_fail(&ps, ps.part == OEM_HEADER ? "META_START" : "META_STOP", "missing");
    if (!bad && out->eph.n < 2)
        bad = oem_fail(&ps, "data", "%d data lines: scoring needs at least 2", out->eph.n);
    if (bad)
        pb_oem_free(out);
    return bad ? -1 : 0;
}

void pb_oem_free(pb_oem *o)
{
    if (o)
        pb_ephemeris_free(&o->eph);
}

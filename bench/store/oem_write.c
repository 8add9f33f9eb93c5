/* oem_write.c - CCSDS OEM (KVN) output and the epoch conventions
 * (oem_write.h). Layout of the message: CCSDS 502.0-B-3, section 5 (header,
 * metadata, data lines "epoch X Y Z X_DOT Y_DOT Z_DOT"). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "bench/store/oem_write.h"
#include "bench/store/run_dir.h"

void pb_oem_frame(const pb_problem *p, const char **center, const char **frame)
{
    *center = p->units == PB_UNITS_KM_S ? "EARTH" : "PRIMARY";
    *frame = p->force == PB_FORCE_CR3BP ? "CR3BP_ROTATING" : "EME2000";
}

/* Days from 1970-01-01 to the civil date y-m-d (proleptic Gregorian;
 * H. Hinnant's days_from_civil, common practice). */
static long oem_days_from_civil(long y, int m, int d)
{
    y -= m <= 2;
    long era = (y >= 0 ? y : y - 399) / 400;
    long yoe = y - era * 400;
    long doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
    long doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + doe - 719468;
}

static void oem_civil_from_days(long z, long *y, int *m, int *d)
{
    z += 719468;
    long era = (z >= 0 ? z : z - 146096) / 146097;
    long doe = z - era * 146097;
    long yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    long doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    long mp = (5 * doy + 2) / 153;
    *d = (int)(doy - (153 * mp + 2) / 5 + 1);
    *m = (int)(mp < 10 ? mp + 3 : mp - 9);
    *y = yoe + era * 400 + (*m <= 2);
}

/* seconds from 1970-01-01T00:00 to PB_OEM_EPOCH */
#define OEM_EPOCH_UNIX (10957L * 86400L + 43200L)

void pb_oem_epoch_format(double elapsed, char *out, size_t outlen)
{
    double whole = floor(elapsed), frac = elapsed - whole; /* both exact */
    long s = (long)whole + OEM_EPOCH_UNIX;
    long days = s >= 0 ? s / 86400 : -((-s + 86399) / 86400);
    long sod = s - days * 86400, y;
    int m, d;
    oem_civil_from_days(days, &y, &m, &d);
    char f[40];
    snprintf(f, sizeof f, "%.20f", frac); /* "0.xxx": 17+ significant digits */
    snprintf(out, outlen, "%04ld-%02d-%02dT%02ld:%02ld:%02ld%s", y, m, d, sod / 3600,
             sod / 60 % 60, sod % 60, f + 1);
}

int pb_oem_epoch_parse(const char *s, double *elapsed)
{
    int y, mo = 1, d = 1, doy = 0, hh, mm, ss, n = 0;
    if (sscanf(s, "%4d-%2d-%2dT%2d:%2d:%2d%n", &y, &mo, &d, &hh, &mm, &ss, &n) == 6 && n == 19) {
        if (mo < 1 || mo > 12 || d < 1 || d > 31)
            return -1;
    } else if (n = 0, sscanf(s, "%4d-%3dT%2d:%2d:%2d%n", &y, &doy, &hh, &mm, &ss, &n) == 5 && n == 17) {
        if (doy < 1 || doy > 366)
            return -1;
    } else {
        return -1;
    }
    if (hh > 23 || mm > 59 || ss > 60 || hh < 0 || mm < 0 || ss < 0 || s[4] != '-')
        return -1;
    const char *p = s + n;
    double frac = 0;
    if (*p == '.') {
        char buf[64] = "0";
        size_t k = strspn(p + 1, "0123456789");
        if (k == 0 || k > 40)
            return -1;
        memcpy(buf + 1, p, k + 1);
        buf[k + 2] = 0;
        frac = strtod(buf, NULL);
        p += k + 1;
    }
    if (*p == 'Z')
        p++;
    if (*p)
        return -1;
    long days = doy ? oem_days_from_civil(y, 1, 1) + doy - 1 : oem_days_from_civil(y, mo, d);
    long whole = days * 86400L + hh * 3600L + mm * 60L + ss - OEM_EPOCH_UNIX;
    *elapsed = (double)whole + frac;
    return 0;
}

typedef struct oem_job {
    const pb_case_spec *spec;
    const pb_case_result *res;
    int which;
} oem_job;

static void oem_header(FILE *f, const oem_job *j)
{
    const pb_problem *p = &j->spec->problem;
    const char *center, *frame;
    pb_oem_frame(p, &center, &frame);
    char now[32], a[64], b[64];
    time_t tt = time(NULL);
    struct tm tm;
    gmtime_r(&tt, &tm);
    strftime(now, sizeof now, "%Y-%m-%dT%H:%M:%S", &tm);
    int n = j->res->nsamples;
    pb_oem_epoch_format(n ? j->res->samples[0].t - p->t0 : 0, a, sizeof a);
    pb_oem_epoch_format(n ? j->res->samples[n - 1].t - p->t0 : 0, b, sizeof b);
    fprintf(f, "CCSDS_OEM_VERS = 3.0\n");
    fprintf(f, "COMMENT %s of case %s, written by propbench\n",
            j->which == PB_OEM_TRUTH ? "Truth (exact solution or reference)" : "States of the method",
            j->res->id);
    fprintf(f, "COMMENT The problem's start t0 = %.17g is the epoch %s TT; epochs are that plus t - t0\n",
            p->t0, PB_OEM_EPOCH);
    if (p->units != PB_UNITS_KM_S)
        fprintf(f, "COMMENT Units are normalized: positions in DU, velocities in DU/TU, "
                "epochs in TU counted as seconds\n");
    fprintf(f, "CREATION_DATE = %s\nORIGINATOR = propbench\n\nMETA_START\n", now);
    fprintf(f, "OBJECT_NAME = %s\nOBJECT_ID = %s\n",
            j->which == PB_OEM_TRUTH ? "truth" : j->spec->method->name, p->name);
    fprintf(f, "CENTER_NAME = %s\nREF_FRAME = %s\nTIME_SYSTEM = TT\n", center, frame);
    fprintf(f, "START_TIME = %s\nSTOP_TIME = %s\nMETA_STOP\n\n", a, b);
}

static int oem_body(FILE *f, const void *ctx)
{
    const oem_job *j = ctx;
    oem_header(f, j);
    for (int k = 0; k < j->res->nsamples; k++) {
        const pb_sample *s = &j->res->samples[k];
        const double *r = j->which == PB_OEM_TRUTH ? s->rt : s->r;
        const double *v = j->which == PB_OEM_TRUTH ? s->vt : s->v;
        char ep[64];
        pb_oem_epoch_format(s->t - j->spec->problem.t0, ep, sizeof ep);
        fprintf(f, "%s %.17e %.17e %.17e %.17e %.17e %.17e\n", ep, r[0], r[1], r[2],
                v[0], v[1], v[2]);
    }
    return ferror(f) ? -1 : 0;
}

int pb_oem_write(const char *path, const pb_case_spec *spec, const pb_case_result *res,
                 int which)
{
    oem_job j = {spec, res, which};
    return pb_write_atomic_printed(path, oem_body, &j);
}

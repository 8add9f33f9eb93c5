/* figure_names.c - one naming of the report's figure files (see
 * figure_names.h), shared by the report and the run folder's prune. */
#include <inttypes.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>
#include "bench/store/figure_names.h"
#include "problems/hash.h"

/* Longest problem part kept; with the hash and the longest kind the base
 * still fits PB_FIG_BASE_MAX. */
#define FIG_STEM_KEEP 100

static const char *const fig_kinds[PB_FIG_COUNT] = {"energy", "angmom", "growth", "ric", "work",
                                                    "convergence"};

/* The .tmp pair is what gnuplot writes before the runner renames it: left
 * behind when gnuplot fails, and still the earlier report's to remove. */
const char *const pb_fig_exts[] = {"png", "svg", "gp", "log", "png.tmp", "svg.tmp", NULL};

const char *pb_fig_kind(int kind)
{
    return kind >= 0 && kind < PB_FIG_COUNT ? fig_kinds[kind] : "?";
}

/* Characters a stem keeps: safe in a file name, a URL path, a gnuplot
 * single-quoted string and a shell word; '.' not first, so no stem is
 * hidden or a "..". */
static int fig_safe(char ch, size_t at)
{
    return (ch >= 'a' && ch <= 'z') || (ch >= 'A' && ch <= 'Z') || (ch >= '0' && ch <= '9') ||
           ch == '-' || ch == '_' || (ch == '.' && at > 0);
}

void pb_fig_stem(const char *problem, char *buf, size_t len)
{
    char stem[FIG_STEM_KEEP + 16];
    size_t n = strlen(problem), j = 0;
    /* an empty name would give a base that starts with the kind's '-' */
    int folded = n == 0 || n > FIG_STEM_KEEP;
    for (; j < n && j < FIG_STEM_KEEP; j++) {
        int ok = fig_safe(problem[j], j);
        stem[j] = ok ? problem[j] : '_';
        folded |= !ok;
    }
    if (j == 0)
        stem[j++] = '_';
    stem[j] = 0;
    if (folded) {
        uint64_t h = pb_fnv1a64(PB_FNV1A64_INIT, problem, n);
        snprintf(stem + j, sizeof stem - j, "~%08" PRIx32, (uint32_t)(h ^ (h >> 32)));
    }
    snprintf(buf, len, "%s", stem);
}

void pb_fig_base(const char *problem, int kind, char *buf, size_t len)
{
    char stem[PB_FIG_BASE_MAX];
    pb_fig_stem(problem, stem, sizeof stem);
    snprintf(buf, len, "%s-%s", stem, pb_fig_kind(kind));
}

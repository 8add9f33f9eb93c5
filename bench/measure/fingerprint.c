/* fingerprint.c - FNV-1a (Fowler, Noll, Vo; common practice) over state bits. */
#include <inttypes.h>
#include <stdio.h>
#include <string.h>
#include "bench/measure/fingerprint.h"

uint64_t pb_fnv1a64(uint64_t h, const void *p, size_t n)
{
    const unsigned char *b = p;
    for (size_t i = 0; i < n; i++) {
        h ^= b[i];
        h *= UINT64_C(0x100000001b3);
    }
    return h;
}

void pb_fingerprint_state(double t, const double *r, const double *v, int dim,
                          char *out, size_t outlen)
{
    uint64_t h = PB_FNV1A64_INIT;
    h = pb_fnv1a64(h, &t, sizeof t);
    h = pb_fnv1a64(h, r, (size_t)dim * sizeof(double));
    h = pb_fnv1a64(h, v, (size_t)dim * sizeof(double));
    snprintf(out, outlen, "fnv1a64:%016" PRIx64, h);
}

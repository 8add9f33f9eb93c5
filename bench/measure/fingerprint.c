/* fingerprint.c - FNV-1a (problems/hash.c) over a final state's bits. */
#include <inttypes.h>
#include <stdio.h>
#include "bench/measure/fingerprint.h"

void pb_fingerprint_state(double t, const double *r, const double *v, int dim,
                          char *out, size_t outlen)
{
    uint64_t h = PB_FNV1A64_INIT;
    h = pb_fnv1a64(h, &t, sizeof t);
    h = pb_fnv1a64(h, r, (size_t)dim * sizeof(double));
    h = pb_fnv1a64(h, v, (size_t)dim * sizeof(double));
    snprintf(out, outlen, "fnv1a64:%016" PRIx64, h);
}

/* fingerprint.h - a hash of the exact bits of a final state, so a check can
 * see any change in the numbers, even one far inside every tolerance. */
#ifndef PB_FINGERPRINT_H
#define PB_FINGERPRINT_H

#include <stddef.h>
#include "problems/hash.h" /* pb_fnv1a64, PB_FNV1A64_INIT */

/* 64-bit FNV-1a of the bytes of t, r[dim], v[dim] (IEEE-754 doubles, little
 * endian on every supported machine), written as "fnv1a64:<16 hex digits>"
 * into out (at least 25 bytes). */
void pb_fingerprint_state(double t, const double *r, const double *v, int dim,
                          char *out, size_t outlen);

#endif

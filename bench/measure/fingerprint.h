/* fingerprint.h - a hash of the exact bits of a final state, so a check can
 * see any change in the numbers, even one far inside every tolerance. */
#ifndef PB_FINGERPRINT_H
#define PB_FINGERPRINT_H

#include <stddef.h>
#include <stdint.h>

/* 64-bit FNV-1a: fold n bytes at p into h; start from PB_FNV1A64_INIT. */
#define PB_FNV1A64_INIT UINT64_C(0xcbf29ce484222325)
uint64_t pb_fnv1a64(uint64_t h, const void *p, size_t n);

/* 64-bit FNV-1a of the bytes of t, r[dim], v[dim] (IEEE-754 doubles, little
 * endian on every supported machine), written as "fnv1a64:<16 hex digits>"
 * into out (at least 25 bytes). */
void pb_fingerprint_state(double t, const double *r, const double *v, int dim,
                          char *out, size_t outlen);

#endif

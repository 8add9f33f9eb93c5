/* hash.c - 64-bit FNV-1a (Fowler, Noll, Vo; common practice), see hash.h. */
#include "problems/hash.h"

uint64_t pb_fnv1a64(uint64_t h, const void *p, size_t n)
{
    const unsigned char *b = p;
    for (size_t i = 0; i < n; i++) {
        h ^= b[i];
        h *= UINT64_C(0x100000001b3); /* the FNV 64-bit prime */
    }
    return h;
}

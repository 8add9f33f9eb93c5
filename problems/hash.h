/* hash.h - the one 64-bit FNV-1a of propbench (Fowler, Noll, Vo; common
 * practice): the reference cache key here, state fingerprints and sweep
 * identities in bench/. In problems/, the lowest layer, so that all can use it. */
#ifndef PB_HASH_H
#define PB_HASH_H

#include <stddef.h>
#include <stdint.h>

/* The FNV-1a 64-bit offset basis: the h to start a hash from. */
#define PB_FNV1A64_INIT UINT64_C(0xcbf29ce484222325)

/* Fold the n bytes at p into the hash h and return it; chained calls hash
 * the concatenation. */
uint64_t pb_fnv1a64(uint64_t h, const void *p, size_t n);

#endif

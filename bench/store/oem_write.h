/* oem_write.h - a case's states at its sample times as a CCSDS Orbit
 * Ephemeris Message (CCSDS 502.0-B-3, KVN form): the method's states
 * (--ephemeris-out) or the truth's (--truth-out). Also the conventions the
 * reader shares: the fixed epoch of t = t0, the epoch format, and the
 * CENTER_NAME and REF_FRAME a problem's states are given in. */
#ifndef PB_OEM_WRITE_H
#define PB_OEM_WRITE_H

#include <stddef.h>
#include "bench/measure/case.h"

/* Problems carry no calendar epoch: the problem's t0 is this one, in TT
 * (J2000.0). An OEM epoch is PB_OEM_EPOCH plus (t - t0) seconds (time
 * units for a normalized problem). */
#define PB_OEM_EPOCH "2000-01-01T12:00:00.000"

/* The centre and frame a problem's states are in: EARTH and EME2000 for a
 * km problem; PRIMARY and EME2000 (normalized units) for a normalized
 * two-body or J2 problem; PRIMARY and CR3BP_ROTATING for the CR3BP. */
void pb_oem_frame(const pb_problem *p, const char **center, const char **frame);

/* Elapsed seconds since PB_OEM_EPOCH as "YYYY-MM-DDThh:mm:ss.fff..." with
 * enough digits that pb_oem_epoch_parse gives the same double back. */
void pb_oem_epoch_format(double elapsed, char *out, size_t outlen);

/* Parse "YYYY-MM-DDThh:mm:ss[.f]" or "YYYY-DDDThh:mm:ss[.f]" (an optional
 * trailing Z) into seconds since PB_OEM_EPOCH; 0, or -1 when malformed. */
int pb_oem_epoch_parse(const char *s, double *elapsed);

enum { PB_OEM_METHOD = 0, PB_OEM_TRUTH = 1 };

/* Write the samples' states (which = PB_OEM_METHOD or PB_OEM_TRUTH) to path
 * atomically; 0 or -1. */
int pb_oem_write(const char *path, const pb_case_spec *spec, const pb_case_result *res,
                 int which);

#endif

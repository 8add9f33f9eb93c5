/* oem_read.h - read a CCSDS Orbit Ephemeris Message (CCSDS 502.0-B-3, KVN
 * form, one metadata block) written by another program, strictly: every
 * rejection names the file, the line and the keyword. */
#ifndef PB_OEM_READ_H
#define PB_OEM_READ_H

#include <stddef.h>
#include "bench/measure/ephemeris_method.h"

#define PB_OEM_LINE_MAX 254   /* the KVN line limit (502.0-B-3, 7.4.4) */

typedef struct pb_oem {
    char object_name[PB_OEM_LINE_MAX + 1], object_id[PB_OEM_LINE_MAX + 1];
    char center[PB_OEM_LINE_MAX + 1], frame[PB_OEM_LINE_MAX + 1];
    pb_ephemeris eph;         /* times are p->t0 + seconds after PB_OEM_EPOCH */
} pb_oem;

/* Read path against problem p (its CENTER_NAME and REF_FRAME must be the
 * ones pb_oem_frame gives, TIME_SYSTEM TT, epochs increasing, within
 * START_TIME..STOP_TIME and not before the problem's start). 0, or -1 with
 * "FILE:LINE: KEYWORD: why" in err. Owner: the caller (pb_oem_free). */
int pb_oem_read(const char *path, const pb_problem *p, pb_oem *out, char *err, size_t errlen);
void pb_oem_free(pb_oem *o);

#endif

/* propbench/propbench.h - everything a user of libpropbench includes: the
 * status codes, the method interface and the case driver, and the version. */
#ifndef PB_PUBLIC_PROPBENCH_H
#define PB_PUBLIC_PROPBENCH_H

#include "status.h"
#include "method.h"
#include "drive.h"
#include "dense.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The version of these headers; pb_version() is the library's own. */
#define PB_VERSION "0.3.0"

/* The library's version string, e.g. "0.2.0". */
PB_API const char *pb_version(void);

#ifdef __cplusplus
}
#endif

#endif

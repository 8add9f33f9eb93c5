/* status.c - texts for the pb_status codes. */
#include "status.h"

const char *pb_strerror(int status)
{
    switch (status) {
    case PB_OK: return "ok";
    case PB_ENONFINITE: return "non-finite state or force";
    case PB_EDIVERGED: return "integration diverged";
    case PB_EMAXSTEPS: return "maximum number of steps reached";
    case PB_EMINSTEP: return "step size fell below the minimum step";
    case PB_ENOMEM: return "out of memory";
    case PB_EINVAL: return "invalid argument";
    case PB_ENOCONV: return "iteration did not converge";
    case PB_EFORCE: return "force function failed";
    default: return "unknown status";
    }
}

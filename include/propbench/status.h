/* propbench/status.h - the one status enum shared by problems, methods and the
 * harness (public: installed for users who write a method or drive a case).
 * Failures are results: a method returns one of these, the harness records it
 * as the case's outcome. 0 is success (as in GSL). */
#ifndef PB_PUBLIC_STATUS_H
#define PB_PUBLIC_STATUS_H

/* The functions libpropbench.so exports; everything else in it is hidden. */
#if defined(__GNUC__)
#define PB_API __attribute__((visibility("default")))
#else
#define PB_API
#endif

#ifdef __cplusplus
extern "C" {
#endif

typedef enum pb_status {
    PB_OK = 0,
    PB_ENONFINITE,   /* a force or the state became NaN or infinite */
    PB_EDIVERGED,    /* the orbit left the region where the problem is meaningful */
    PB_EMAXSTEPS,    /* the step budget ran out before t_out */
    PB_EMINSTEP,     /* an adaptive step fell below the minimum step */
    PB_ENOMEM,       /* an allocation failed */
    PB_EINVAL,       /* bad arguments (programmer or user error) */
    PB_ENOCONV,      /* an iteration (Kepler, start-up, corrector) did not converge */
    PB_EFORCE        /* the force function reported a failure of its own */
} pb_status;

/* Human-readable text for a status; never NULL. */
PB_API const char *pb_strerror(int status);

#ifdef __cplusplus
}
#endif

#endif

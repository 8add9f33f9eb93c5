/* bodies.h - central bodies and their constants (mu, equatorial radius,
 * unnormalized zonal harmonics J2..J6, rotation rate, atmosphere), looked up
 * by name for scenarios and problem files. */
#ifndef PB_BODIES_H
#define PB_BODIES_H

typedef struct pb_body {
    const char *name;  /* lower-case key used by problem files ("earth") */
    double mu;         /* km^3/s^2 */
    double radius;     /* equatorial radius, km */
    double jn[7];      /* unnormalized J_n by n (0 where not known); J2 = jn[2] */
    int zonal_known;   /* highest degree with a published value */
    double rate;       /* rotation rate, rad/s (0: not needed) */
    int atmosphere;    /* 1: the exponential atmosphere applies (the Earth) */
} pb_body;

extern const pb_body pb_body_earth;
extern const pb_body pb_body_moon;

/* The body with this name (case-insensitive); NULL if unknown. */
const pb_body *pb_body_find(const char *name);
/* The known names, comma-separated, for messages. */
const char *pb_body_names(void);

#endif

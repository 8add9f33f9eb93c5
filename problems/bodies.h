/* bodies.h - central bodies and their gravity constants (mu, equatorial
 * radius, unnormalized J2), looked up by name for scenarios and problem files.
 * Earth: WGS-84 / EGM96 values as in common practice. */
#ifndef PB_BODIES_H
#define PB_BODIES_H

typedef struct pb_body {
    const char *name;  /* lower-case key used by problem files ("earth") */
    double mu;         /* km^3/s^2 */
    double radius;     /* equatorial radius, km */
    double j2;         /* unnormalized J2 */
} pb_body;

extern const pb_body pb_body_earth;

/* The body with this name (case-insensitive); NULL if unknown. */
const pb_body *pb_body_find(const char *name);

#endif

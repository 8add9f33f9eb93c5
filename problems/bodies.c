/* bodies.c - the built-in central bodies.
 * Earth: mu and radius are the WGS-84 values of common practice
 * (REFERENCES.md, from memory); J2..J6 are EGM96's (NIMA TR8350.2),
 * J_n = -sqrt(2n+1) C_n0 from its normalized coefficients, as REFERENCES.md
 * lists them (note: EGM96's own reference radius is 6378.1363 km, within
 * 0.8 m of WGS-84's used here); rotation 7.292115e-5 rad/s (WGS-84).
 * Moon: GM 4902.800066 km^3/s^2, radius 1737.4 km, J2 about 2.033e-4 (IAU /
 * DE constants as REFERENCES.md gives them, from memory). */
#include <stddef.h>
#include <strings.h>
#include "bodies.h"

const pb_body pb_body_earth = {
    "earth", 398600.4418, 6378.137,
    {0, 0, 1.082626683553e-3, -2.532656485332e-6, -1.619621591367e-6,
     -2.272960828687e-7, 5.406812391071e-7},
    6, 7.292115e-5, 1
};

const pb_body pb_body_moon = {
    "moon", 4902.800066, 1737.4, {0, 0, 2.033e-4, 0, 0, 0, 0}, 2, 0.0, 0
};

static const pb_body *const bodies_table[] = {&pb_body_earth, &pb_body_moon, NULL};

const pb_body *pb_body_find(const char *name)
{
    if (!name)
        return NULL;
    for (int k = 0; bodies_table[k]; k++)
        if (strcasecmp(bodies_table[k]->name, name) == 0)
            return bodies_table[k];
    return NULL;
}

const char *pb_body_names(void) { return "earth, moon"; }

/* bodies.c - the built-in central bodies. Earth constants are the WGS-84 /
 * EGM96 values of common practice (REFERENCES.md, from memory). */
#include <stddef.h>
#include <strings.h>
#include "bodies.h"

const pb_body pb_body_earth = {"earth", 398600.4418, 6378.137, 1.08262668e-3};

static const pb_body *const bodies_table[] = {&pb_body_earth, NULL};

const pb_body *pb_body_find(const char *name)
{
    if (!name)
        return NULL;
    for (int k = 0; bodies_table[k]; k++)
        if (strcasecmp(bodies_table[k]->name, name) == 0)
            return bodies_table[k];
    return NULL;
}

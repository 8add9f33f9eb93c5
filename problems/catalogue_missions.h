/* catalogue_missions.h - the built-in mission scenarios that use the force
 * terms of forces.h (drag, zonal harmonics, Sun, Moon, radiation pressure,
 * manoeuvres): our own invention, registered in catalogue.c's table. */
#ifndef PB_CATALOGUE_MISSIONS_H
#define PB_CATALOGUE_MISSIONS_H

#include "problem.h"

/* TT days from J2000.0 (JD 2451545.0) of the missions' common epoch,
 * 2026-03-10T00:00:00 TT (JD 2461109.5). */
#define PB_MISSION_EPOCH_DAYS 9564.5

/* Each fills out (km, s) and returns PB_OK, or a pb_status from the state
 * conversion. */
int pb_cat_leo_drag(pb_problem *out);
int pb_cat_geo_sun_moon_srp(pb_problem *out);
int pb_cat_heo_moon(pb_problem *out);
int pb_cat_leo_manoeuvre(pb_problem *out);
int pb_cat_lunar_orbiter(pb_problem *out);

#endif

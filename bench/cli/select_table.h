/* select_table.h - `propbench select`'s ranking table and the notes under
 * it (the requirement line above it is verb_select.c's). */
#ifndef PB_SELECT_TABLE_H
#define PB_SELECT_TABLE_H

#include "bench/study/select.h"

/* The table of the m selections (found ones first, as ranked), a column for
 * each bound of req beyond position and energy (km: metres and m/s), and
 * the notes: GSL's mark, the methods pruned at K, no answer, the ties of a
 * ranking by cost (by_cost), the cheapest and how to reproduce it. */
void pb_select_print_table(const pb_selection *sel, int m, const pb_requirement *req, int km,
                           int found, int by_cost, double K);

#endif

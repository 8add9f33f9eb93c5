/* summary_table.h - a run's summary.json as a plain-text table, one case a line. */
#ifndef PB_SUMMARY_TABLE_H
#define PB_SUMMARY_TABLE_H

#include <stdio.h>
#include <jansson.h>

void pb_summary_print(const json_t *doc, FILE *f);

#endif

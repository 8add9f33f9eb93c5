/* markdown.h - the report as Markdown, for pasting into review documents. */
#ifndef PB_REPORT_MARKDOWN_H
#define PB_REPORT_MARKDOWN_H

#include <stddef.h>
#include "bench/report/view.h"

/* Write out_dir/report.md (tables, links to the PNGs) atomically. 0, or -1
 * with err. */
int pb_report_md_write(const pb_report_view *v, char *err, size_t errlen);

#endif

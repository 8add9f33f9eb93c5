/* html.h - the report as one self-contained HTML file. */
#ifndef PB_REPORT_HTML_H
#define PB_REPORT_HTML_H

#include <stddef.h>
#include "bench/report/view.h"

/* Write out_dir/report.html (self-contained: inline SVG, no script, no
 * network) atomically. 0, or -1 with err. */
int pb_report_html_write(const pb_report_view *v, char *err, size_t errlen);

#endif

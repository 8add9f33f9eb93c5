/* junit.h - a JUnit XML report (the <testsuites>/<testsuite>/<testcase>
 * layout CI dashboards read), built in memory and written atomically.
 * Text is escaped for XML 1.0: markup characters become entities and bytes
 * XML forbids (control characters other than tab, LF, CR) become '?'. */
#ifndef PB_JUNIT_H
#define PB_JUNIT_H

#include <stddef.h>

typedef struct pb_junit pb_junit;

/* New empty report for one test suite named suite; NULL when out of memory.
 * The caller owns it and frees it with pb_junit_free. */
pb_junit *pb_junit_new(const char *suite);

/* Add one test case. failure NULL: passed; otherwise the case failed with
 * that one-line message. detail (may be NULL) goes to <system-out>.
 * Returns 0, or -1 when out of memory (the report is then unusable). */
int pb_junit_add(pb_junit *j, const char *classname, const char *name,
                 const char *failure, const char *detail);

/* Write the report to path through a temporary name and rename; 0 or -1. */
int pb_junit_write(const pb_junit *j, const char *path);

/* Escape s for XML text and attribute values into out (always terminated,
 * truncated to outlen - 1 bytes at an entity boundary); returns the length
 * the full escaped text needs, without the terminator. */
size_t pb_junit_escape(const char *s, char *out, size_t outlen);

/* Free the report; accepts NULL. */
void pb_junit_free(pb_junit *j);

#endif

/* junit.c - JUnit XML report (see junit.h). Cases are kept as already
 * escaped XML fragments so that writing is one pass over a buffer. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/gate/junit.h"
#include "bench/store/run_dir.h"

struct pb_junit {
    char *suite;           /* escaped suite name */
    char *body;            /* escaped <testcase> elements */
    size_t len, cap;
    long tests, failures;
};

static const char *junit_entity(unsigned char c)
{
    switch (c) {
    case '&': return "&amp;";
    case '<': return "&lt;";
    case '>': return "&gt;";
    case '"': return "&quot;";
    case '\'': return "&apos;";
    default: break;
    }
    return NULL;
}

size_t pb_junit_escape(const char *s, char *out, size_t outlen)
{
    size_t need = 0, w = 0;
    for (const unsigned char *p = (const unsigned char *)(s ? s : ""); *p; p++) {
        char one[2] = {(char)*p, 0};
        const char *piece = junit_entity(*p);
        if (!piece) {
            /* XML 1.0 has no way to carry these, not even as references */
            if (*p < 0x20 && *p != '\t' && *p != '\n' && *p != '\r')
                one[0] = '?';
            piece = one;
        }
        size_t n = strlen(piece);
        need += n;
        if (out && w + n < outlen) {
            memcpy(out + w, piece, n);
            w += n;
        } else if (out) {
            outlen = w + 1; /* stop at an entity boundary */
        }
    }
    if (out && outlen)
        out[w] = 0;
    return need;
}

static char *junit_escaped(const char *s)
{
    size_t n = pb_junit_escape(s, NULL, 0);
    char *e = malloc(n + 1);
    if (e)
        pb_junit_escape(s, e, n + 1);
    return e;
}

pb_junit *pb_junit_new(const char *suite)
{
    pb_junit *j = calloc(1, sizeof *j);
    if (!j)
        return NULL;
    j->suite = junit_escaped(suite);
    j->cap = 4096;
    j->body = malloc(j->cap);
    if (!j->suite || !j->body) {
        pb_junit_free(j);
        return NULL;
    }
    j->body[0] = 0;
    return j;
}

static int junit_append(pb_junit *j, const char *s)
{
    size_t n = strlen(s);
    if (j->len + n + 1 > j->cap) {
        size_t cap = j->cap;
        while (j->len + n + 1 > cap)
            cap *= 2;
        char *b = realloc(j->body, cap);
        if (!b)
            return -1;
        j->body = b;
        j->cap = cap;
    }
    memcpy(j->body + j->len, s, n + 1);
    j->len += n;
    return 0;
}

int pb_junit_add(pb_junit *j, const char *classname, const char *name,
                 const char *failure, const char *detail)
{
    char *cn = junit_escaped(classname), *nm = junit_escaped(name);
    char *fl = failure ? junit_escaped(failure) : NULL;
    char *dt = detail ? junit_escaped(detail) : NULL;
    int rc = -1;
    if (!cn || !nm || (failure && !fl) || (detail && !dt))
        goto out;
    rc = junit_append(j, "    <testcase classname=\"") || junit_append(j, cn) ||
         junit_append(j, "\" name=\"") || junit_append(j, nm) || junit_append(j, "\"");
    if (!rc && !fl && !dt)
        rc = junit_append(j, "/>\n");
    else if (!rc) {
        rc = junit_append(j, ">\n");
        if (!rc && fl)
            rc = junit_append(j, "      <failure message=\"") || junit_append(j, fl) ||
                 junit_append(j, "\" type=\"regression\">") || junit_append(j, fl) ||
                 junit_append(j, "</failure>\n");
        if (!rc && dt)
            rc = junit_append(j, "      <system-out>") || junit_append(j, dt) ||
                 junit_append(j, "</system-out>\n");
        if (!rc)
            rc = junit_append(j, "    </testcase>\n");
    }
    if (!rc) {
        j->tests++;
        j->failures += fl != NULL;
    }
out:
    free(cn);
    free(nm);
    free(fl);
    free(dt);
    return rc ? -1 : 0;
}

int pb_junit_write(const pb_junit *j, const char *path)
{
    char head[1024];
    int n = snprintf(head, sizeof head,
                     "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                     "<testsuites tests=\"%ld\" failures=\"%ld\">\n"
                     "  <testsuite name=\"", j->tests, j->failures);
    const char *mid = "\" tests=\"%ld\" failures=\"%ld\" errors=\"0\" skipped=\"0\">\n";
    const char *tail = "  </testsuite>\n</testsuites>\n";
    size_t total = (size_t)n + strlen(j->suite) + 128 + j->len + strlen(tail);
    char *doc = malloc(total);
    if (!doc)
        return -1;
    size_t w = (size_t)n;
    memcpy(doc, head, w);
    memcpy(doc + w, j->suite, strlen(j->suite));
    w += strlen(j->suite);
    w += (size_t)snprintf(doc + w, total - w, mid, j->tests, j->failures);
    memcpy(doc + w, j->body, j->len);
    w += j->len;
    memcpy(doc + w, tail, strlen(tail));
    w += strlen(tail);
    int rc = pb_write_atomic(path, doc, w);
    free(doc);
    return rc;
}

void pb_junit_free(pb_junit *j)
{
    if (!j)
        return;
    free(j->suite);
    free(j->body);
    free(j);
}

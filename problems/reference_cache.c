/* reference_cache.c - the reference cache's folder, its entries and its
 * size cap (reference_cache.h). Entry: <dir>/ref-<key>.bin holding the
 * magic, the key, n, then r, v and floor. */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>
#include "problems/reference_cache.h"
#include "problems/files.h"
#include "problems/problem.h"

#define CACHE_CAP_MB_DEFAULT 512
#define CACHE_MAX_ENTRIES 100000

static const char cache_magic[8] = "PBREF01";

const char *pb_cache_dir_default(void)
{
    static char buf[PATH_MAX];
    const char *dir = getenv("PB_CACHE_DIR");
    if (dir && *dir)
        return strlen(dir) < sizeof buf ? strcpy(buf, dir) : NULL;
    const char *xdg = getenv("XDG_CACHE_HOME"), *home = getenv("HOME");
    int n = -1;
    /* XDG: a relative XDG_CACHE_HOME is invalid and is ignored */
    if (xdg && xdg[0] == '/')
        n = snprintf(buf, sizeof buf, "%s/propbench", xdg);
    else if (home && *home)
        n = snprintf(buf, sizeof buf, "%s/.cache/propbench", home);
    return n > 0 && (size_t)n < sizeof buf ? buf : NULL;
}

uint64_t pb_cache_cap_bytes(void)
{
    const char *s = getenv("PB_CACHE_MAX_MB");
    char *end;
    errno = 0;
    long long mb = s && *s ? strtoll(s, &end, 10) : CACHE_CAP_MB_DEFAULT;
    if (s && *s && (*end || errno || mb < 1 || mb > (1LL << 40)))
        mb = CACHE_CAP_MB_DEFAULT;
    return (uint64_t)mb << 20;
}

static int cache_path(char *buf, size_t len, const char *dir, uint64_t key)
{
    int n = snprintf(buf, len, "%s/ref-%016llx.bin", dir, (unsigned long long)key);
    return n > 0 && (size_t)n < len;
}

/* The entry's build lock: lock-<key>, so that the folder's ref-* files are
 * the entries alone. */
static int cache_lock_path(char *buf, size_t len, const char *dir, const char *key_hex)
{
    int n = snprintf(buf, len, "%s/lock-%s", dir, key_hex);
    return n > 0 && (size_t)n < len;
}

int pb_ref_cache_lock(const char *dir, uint64_t key)
{
    char path[PATH_MAX], hex[24];
    snprintf(hex, sizeof hex, "%016llx", (unsigned long long)key);
    if (!dir || !cache_lock_path(path, sizeof path, dir, hex) || pb_mkdirs(dir))
        return -1;
    int fd = open(path, O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd < 0)
        return -1;
    int rc;
    while ((rc = flock(fd, LOCK_EX)) != 0 && errno == EINTR)
        ;
    if (rc) {
        close(fd);
        return -1;
    }
    return fd;
}

void pb_ref_cache_unlock(int fd)
{
    if (fd >= 0)
        close(fd); /* closing the descriptor releases its lock */
}

int pb_ref_cache_read(const char *dir, uint64_t key, int n, long double *r, long double *v,
                      double *floor)
{
    char path[PATH_MAX];
    if (!dir || !cache_path(path, sizeof path, dir, key))
        return 0;
    FILE *f = fopen(path, "rb");
    if (!f)
        return 0;
    char magic[8];
    uint64_t k;
    int nn;
    size_t m = (size_t)n * PB_DIM_MAX;
    int ok = fread(magic, 1, 8, f) == 8 && memcmp(magic, cache_magic, 8) == 0
             && fread(&k, sizeof k, 1, f) == 1 && k == key
             && fread(&nn, sizeof nn, 1, f) == 1 && nn == n
             && fread(r, sizeof *r, m, f) == m && fread(v, sizeof *v, m, f) == m
             && fread(floor, sizeof *floor, (size_t)n, f) == (size_t)n;
    fclose(f);
    if (ok)
        (void)utimensat(AT_FDCWD, path, NULL, 0); /* used now: the last to be pruned */
    return ok;
}

typedef struct cache_entry {
    char name[32];
    time_t used;
    long nsec;
    uint64_t size;
} cache_entry;

static int cache_entry_cmp(const void *a, const void *b)
{
    const cache_entry *x = a, *y = b;
    if (x->used != y->used)
        return x->used < y->used ? -1 : 1;
    return (x->nsec > y->nsec) - (x->nsec < y->nsec);
}

/* The folder's reference files, oldest use first; how many (-1: none read). */
static int cache_list(const char *dir, cache_entry **out, uint64_t *total)
{
    DIR *d = opendir(dir);
    *out = NULL;
    *total = 0;
    if (!d)
        return -1;
    int n = 0, cap = 0;
    cache_entry *e = NULL;
    struct dirent *de;
    while ((de = readdir(d)) && n < CACHE_MAX_ENTRIES) {
        size_t len = strlen(de->d_name);
        if (len >= sizeof e->name || strncmp(de->d_name, "ref-", 4) || len < 8
            || strcmp(de->d_name + len - 4, ".bin"))
            continue;
        char path[PATH_MAX];
        struct stat st;
        if (snprintf(path, sizeof path, "%s/%s", dir, de->d_name) >= (int)sizeof path
            || stat(path, &st) || !S_ISREG(st.st_mode))
            continue;
        if (n == cap) {
            cache_entry *g = realloc(e, (size_t)(cap = cap ? 2 * cap : 64) * sizeof *e);
            if (!g)
                break;
            e = g;
        }
        snprintf(e[n].name, sizeof e[n].name, "%s", de->d_name);
        e[n].used = st.st_mtim.tv_sec;
        e[n].nsec = st.st_mtim.tv_nsec;
        e[n].size = (uint64_t)st.st_size;
        *total += e[n].size;
        n++;
    }
    closedir(d);
    qsort(e, (size_t)n, sizeof *e, cache_entry_cmp);
    *out = e;
    return n;
}

/* Remove the least recently used reference files until they fit the cap;
 * keep is the entry just written, never removed. */
static void cache_prune(const char *dir, const char *keep)
{
    cache_entry *e;
    uint64_t total, cap = pb_cache_cap_bytes();
    int n = cache_list(dir, &e, &total);
    for (int i = 0; i < n && total > cap; i++) {
        char path[PATH_MAX];
        if (strcmp(e[i].name, keep) == 0
            || snprintf(path, sizeof path, "%s/%s", dir, e[i].name) >= (int)sizeof path)
            continue;
        if (remove(path) == 0) {
            total -= e[i].size;
            /* its build lock too: lock-<key> for ref-<key>.bin */
            char hex[24];
            size_t len = strlen(e[i].name);
            if (len == 24 && snprintf(hex, sizeof hex, "%.16s", e[i].name + 4) == 16
                && cache_lock_path(path, sizeof path, dir, hex))
                remove(path);
        }
    }
    free(e);
}

void pb_ref_cache_write(const char *dir, uint64_t key, int n, const long double *r,
                        const long double *v, const double *floor)
{
    char path[PATH_MAX], tmp[PATH_MAX];
    if (!dir || !cache_path(path, sizeof path, dir, key) || pb_mkdirs(dir)
        || snprintf(tmp, sizeof tmp, "%s.tmp.%ld", path, (long)getpid()) >= (int)sizeof tmp)
        return;
    FILE *f = fopen(tmp, "wb");
    if (!f)
        return;
    size_t m = (size_t)n * PB_DIM_MAX;
    int ok = fwrite(cache_magic, 1, 8, f) == 8 && fwrite(&key, sizeof key, 1, f) == 1
             && fwrite(&n, sizeof n, 1, f) == 1 && fwrite(r, sizeof *r, m, f) == m
             && fwrite(v, sizeof *v, m, f) == m
             && fwrite(floor, sizeof *floor, (size_t)n, f) == (size_t)n;
    ok = (fclose(f) == 0) && ok;
    if (!ok || rename(tmp, path)) {
        remove(tmp);
        return;
    }
    cache_prune(dir, strrchr(path, '/') + 1);
}

/* run_swap.c - the lock on a run folder, the staging folder beside it, the
 * swap that puts a new run in place, and the clean-up after a killed writer
 * (see run_swap.h). */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/syscall.h>
#include <unistd.h>
#include <jansson.h>
#include "bench/store/run_swap.h"
#include "bench/store/run_dir.h"

#ifndef RENAME_EXCHANGE
#define RENAME_EXCHANGE (1 << 1) /* linux/fs.h */
#endif

static int swap_exists(const char *path)
{
    struct stat st;
    return lstat(path, &st) == 0;
}

/* The entry's name after "." NAME "." KIND ".", if the rest is a pid; the
 * pid, or 0 when name is not such an entry. */
static long swap_owner(const char *entry, const char *name, const char *kind)
{
    size_t n = strlen(name), k = strlen(kind);
    if (entry[0] != '.' || strncmp(entry + 1, name, n) || entry[1 + n] != '.' ||
        strncmp(entry + 2 + n, kind, k) || entry[2 + n + k] != '.')
        return 0;
    const char *p = entry + 3 + n + k;
    char *end;
    long pid = *p >= '0' && *p <= '9' ? strtol(p, &end, 10) : 0;
    return pid > 0 && !*end ? pid : 0;
}

/* Split o->path into its folder and last name. */
static void swap_split(const pb_run_out *o, char *parent, size_t plen, const char **name)
{
    snprintf(parent, plen, "%s", o->path);
    char *slash = strrchr(parent, '/');
    *name = o->path + (slash - parent) + 1;
    if (slash == parent)
        slash[1] = 0;
    else
        *slash = 0;
}

/* o->path: dir resolved (an existing folder through realpath, a new one as
 * its resolved parent plus its name, the parent made if missing). */
static int swap_resolve(pb_run_out *o, const char *dir, char *err, size_t errlen)
{
    char d[4096], rp[PATH_MAX];
    if (snprintf(d, sizeof d, "%s", dir) >= (int)sizeof d || !*d) {
        snprintf(err, errlen, "the folder name '%.200s...' is too long", dir);
        return -1;
    }
    for (size_t n = strlen(d); n > 1 && d[n - 1] == '/'; n--)
        d[n - 1] = 0;
    struct stat st;
    if (stat(d, &st) == 0) {
        if (!S_ISDIR(st.st_mode)) {
            snprintf(err, errlen, "cannot create the folder %s: %s", dir, strerror(ENOTDIR));
            return -1;
        }
        if (!realpath(d, rp) || snprintf(o->path, sizeof o->path, "%s", rp) >= (int)sizeof o->path) {
            snprintf(err, errlen, "cannot resolve the folder %s: %s", dir, strerror(errno));
            return -1;
        }
    } else {
        char *slash = strrchr(d, '/');
        const char *name = slash ? slash + 1 : d;
        if (slash)
            slash == d ? (void)(slash[1] = 0) : (void)(*slash = 0);
        const char *parent = slash ? d : ".";
        if (!strcmp(name, ".") || !strcmp(name, "..")) {
            snprintf(err, errlen, "cannot create the folder %s: %s", dir, strerror(ENOENT));
            return -1;
        }
        char nm[NAME_MAX + 1];
        snprintf(nm, sizeof nm, "%s", name);
        if (pb_mkdirs(parent) || !realpath(parent, rp)) {
            snprintf(err, errlen, "cannot create the folder %s: %s", parent, strerror(errno));
            return -1;
        }
        if (snprintf(o->path, sizeof o->path, "%s/%s", strcmp(rp, "/") ? rp : "", nm) >=
            (int)sizeof o->path) {
            snprintf(err, errlen, "the folder name '%.200s...' is too long", dir);
            return -1;
        }
    }
    if (!strcmp(o->path, "/")) {
        snprintf(err, errlen, "cannot write a run into the root folder");
        return -1;
    }
    return 0;
}

/* An existing run folder can take a run: its summary.json a file, its
 * series/ a folder, it and its parent writable. */
static int swap_check(const pb_run_out *o, const char *parent, char *err, size_t errlen)
{
    char p[4400];
    snprintf(p, sizeof p, "%s/summary.json", o->path);
    if (pb_path_blocked(p)) {
        snprintf(err, errlen, "%s/summary.json is there and is not a file: the summary could not be written",
                 o->dir);
        return -1;
    }
    struct stat st;
    snprintf(p, sizeof p, "%s/series", o->path);
    if (lstat(p, &st) == 0 && !S_ISDIR(st.st_mode)) {
        snprintf(err, errlen, "cannot create the folder %s/series: %s", o->dir, strerror(EEXIST));
        return -1;
    }
    if (swap_exists(o->path) && access(o->path, W_OK | X_OK)) {
        snprintf(err, errlen, "cannot write in %s: %s", o->dir, strerror(errno));
        return -1;
    }
    if (access(parent, W_OK | X_OK)) {
        snprintf(err, errlen, "cannot write in %s (the folder that holds %s): %s", parent, o->dir,
                 strerror(errno));
        return -1;
    }
    return 0;
}

/* Take the lock on o->lock; 0, -1 (err) or -2 (held: err names the pid).
 * The lock file is removed by its holder at the end, so a lock taken on a
 * file that was meanwhile removed (or replaced) is taken again. */
static int swap_lock(pb_run_out *o, char *err, size_t errlen)
{
    for (int tries = 0; tries < 100; tries++) {
        int fd = open(o->lock, O_RDWR | O_CREAT | O_CLOEXEC, 0644);
        if (fd < 0) {
            snprintf(err, errlen, "cannot create the lock file %s: %s", o->lock, strerror(errno));
            return -1;
        }
        struct flock fl = {.l_type = F_WRLCK, .l_whence = SEEK_SET, .l_start = 0, .l_len = 0};
        if (fcntl(fd, F_SETLK, &fl)) {
            int e = errno;
            struct flock q = {.l_type = F_WRLCK, .l_whence = SEEK_SET, .l_start = 0, .l_len = 0};
            int got = fcntl(fd, F_GETLK, &q) == 0 && q.l_type != F_UNLCK;
            close(fd);
            if (e != EAGAIN && e != EACCES) {
                snprintf(err, errlen, "cannot lock %s: %s", o->lock, strerror(e));
                return -1;
            }
            if (!got) /* released meanwhile: try again */
                continue;
            snprintf(err, errlen, "%s is being written by another propbench (process %ld); "
                     "run one writer per folder", o->dir, (long)q.l_pid);
            return -2;
        }
        struct stat a, b;
        if (fstat(fd, &a) == 0 && stat(o->lock, &b) == 0 && a.st_dev == b.st_dev && a.st_ino == b.st_ino) {
            char pid[32];
            int n = snprintf(pid, sizeof pid, "%ld\n", (long)getpid());
            if (ftruncate(fd, 0) == 0 && pwrite(fd, pid, (size_t)n, 0) < 0)
                (void)0; /* the pid in the file is for people; the lock is what counts */
            o->lock_fd = fd;
            return 0;
        }
        close(fd);
    }
    snprintf(err, errlen, "cannot lock %s: it keeps changing", o->lock);
    return -1;
}

/* Move what the earlier folder `from` holds that its run did not write into
 * `to` (where the name is free), then remove `from`. Series and plots are
 * merged one level down, as the new run has its own series/ folder. */
static void swap_carry(const char *from, const char *to)
{
    json_t *prev = pb_run_dir_previous(from);
    pb_run_dir_prune(from, prev, NULL); /* the earlier run's series, figures and reports */
    json_decref(prev);
    char a[4700], b[4700];
    snprintf(a, sizeof a, "%s/summary.json", from);
    unlink(a);
    static const char *const subs[] = {"", "series", "plots", NULL};
    for (const char *const *s = subs; *s; s++) {
        char fd[4300], td[4300];
        snprintf(fd, sizeof fd, "%s%s%s", from, **s ? "/" : "", *s);
        snprintf(td, sizeof td, "%s%s%s", to, **s ? "/" : "", *s);
        DIR *d = opendir(fd);
        if (!d)
            continue;
        struct dirent *e;
        while ((e = readdir(d))) {
            const char *n = e->d_name;
            if (!strcmp(n, ".") || !strcmp(n, "..") || !strncmp(n, ".work.", 6))
                continue;
            snprintf(b, sizeof b, "%s/%s", td, n);
            struct stat st;
            if (!**s && (!strcmp(n, "series") || !strcmp(n, "plots")) && stat(b, &st) == 0 &&
                S_ISDIR(st.st_mode))
                continue; /* merged entry by entry on its own pass */
            snprintf(a, sizeof a, "%s/%s", fd, n);
            if (!swap_exists(b))
                rename(a, b);
        }
        closedir(d);
    }
    pb_rm_tree(from);
}

/* Clear what writers that were killed left beside the folder: staging
 * folders, and with own = 1 (the writer's own folder) half-done swaps and
 * the work folders inside it too. */
static void swap_clear_stale(const pb_run_out *o, const char *parent, const char *name, int own)
{
    DIR *d = opendir(parent);
    if (d) {
        struct dirent *e;
        char p[4400];
        while ((e = readdir(d))) {
            long np = swap_owner(e->d_name, name, "pb-new"), op = own ? swap_owner(e->d_name, name, "pb-old") : 0;
            if ((!np && !op) || np == (long)getpid() || op == (long)getpid())
                continue;
            snprintf(p, sizeof p, "%s/%s", parent, e->d_name);
            struct stat st;
            if (np && lstat(p, &st) == 0 && S_ISDIR(st.st_mode))
                pb_rm_tree(p);
            else if (np)
                continue; /* not a folder: not one of ours */
            else if (!swap_exists(o->path) && rename(p, o->path) == 0)
                continue; /* a swap without exchange, killed between its renames */
            else
                swap_carry(p, o->path);
        }
        closedir(d);
    }
    /* the work folders an earlier propbench kept inside the run folder */
    d = own ? opendir(o->path) : NULL;
    if (d) {
        struct dirent *e;
        char p[4400];
        while ((e = readdir(d)))
            if (!strncmp(e->d_name, ".work.", 6)) {
                snprintf(p, sizeof p, "%s/%s", o->path, e->d_name);
                pb_rm_tree(p);
            }
        closedir(d);
    }
}

/* The run folder's name in a writer's lock file or staging folder beside
 * it (".NAME.pb-lock", ".NAME.pb-new.<pid>"), copied into name; 0 if the
 * entry is neither. */
static int swap_entry_name(const char *entry, char *name, size_t len)
{
    static const char lock[] = ".pb-lock", stage[] = ".pb-new.";
    size_t n = strlen(entry), nl = sizeof lock - 1, ns = sizeof stage - 1;
    const char *end;
    if (entry[0] != '.')
        return 0;
    if (n > nl + 1 && !strcmp(entry + n - nl, lock)) {
        end = entry + n - nl;
    } else {
        const char *p = entry + n;
        while (p > entry && p[-1] >= '0' && p[-1] <= '9')
            p--;
        if (p == entry + n || (size_t)(p - entry) < ns + 2 || strncmp(p - ns, stage, ns))
            return 0;
        end = p - ns;
    }
    size_t k = (size_t)(end - entry - 1);
    if (k == 0 || k >= len)
        return 0;
    memcpy(name, entry + 1, k);
    name[k] = 0;
    return 1;
}

/* 1 if path is a plain file holding nothing or a pid, as a lock file does. */
static int swap_is_lock_file(const char *path)
{
    struct stat st;
    if (lstat(path, &st) || !S_ISREG(st.st_mode) || st.st_size > 24)
        return 0;
    char buf[32] = "";
    FILE *f = fopen(path, "r");
    size_t n = f ? fread(buf, 1, sizeof buf - 1, f) : 0;
    if (f)
        fclose(f);
    buf[n] = 0;
    return strspn(buf, "0123456789\n") == n;
}

/* What killed writers left beside the other run folders of the same parent
 * (staging folders, half-done swaps, lock files), cleared for each folder
 * whose lock can be had at once: no writer is at work there. */
static void swap_clear_neighbours(const char *parent, const char *mine)
{
    DIR *d = opendir(parent);
    if (!d)
        return;
    const char *sep = strcmp(parent, "/") ? "/" : "";
    struct dirent *e;
    char other[NAME_MAX + 1], err[64];
    while ((e = readdir(d))) {
        if (!swap_entry_name(e->d_name, other, sizeof other) || !strcmp(other, mine))
            continue;
        pb_run_out n;
        memset(&n, 0, sizeof n);
        n.dir = other;
        n.lock_fd = -1;
        if (snprintf(n.path, sizeof n.path, "%s%s%s", parent, sep, other) >= (int)sizeof n.path ||
            snprintf(n.lock, sizeof n.lock, "%s%s.%s.pb-lock", parent, sep, other) >= (int)sizeof n.lock)
            continue;
        if ((!swap_exists(n.lock) || swap_is_lock_file(n.lock)) && swap_lock(&n, err, sizeof err) == 0) {
            swap_clear_stale(&n, parent, other, 0);
            pb_run_out_close(&n);
        }
    }
    closedir(d);
}

int pb_run_out_open(pb_run_out *o, const char *dir, char *err, size_t errlen)
{
    memset(o, 0, sizeof *o);
    o->dir = dir;
    o->lock_fd = -1;
    if (swap_resolve(o, dir, err, errlen))
        return -1;
    char parent[4096];
    const char *name;
    swap_split(o, parent, sizeof parent, &name);
    const char *sep = strcmp(parent, "/") ? "/" : "";
    if (snprintf(o->lock, sizeof o->lock, "%s%s.%s.pb-lock", parent, sep, name) >= (int)sizeof o->lock ||
        snprintf(o->stage, sizeof o->stage, "%s%s.%s.pb-new.%ld", parent, sep, name, (long)getpid()) >=
            (int)sizeof o->stage ||
        snprintf(o->old, sizeof o->old, "%s%s.%s.pb-old.%ld", parent, sep, name, (long)getpid()) >=
            (int)sizeof o->old) {
        snprintf(err, errlen, "the folder name '%.200s...' is too long", dir);
        return -1;
    }
    if (swap_check(o, parent, err, errlen))
        return -1;
    int rc = swap_lock(o, err, errlen);
    if (rc)
        return rc;
    swap_clear_stale(o, parent, name, 1);
    swap_clear_neighbours(parent, name);
    return 0;
}

int pb_run_out_stage(pb_run_out *o, char *err, size_t errlen)
{
    char s[4300];
    pb_rm_tree(o->stage);
    snprintf(s, sizeof s, "%s/series", o->stage);
    if (mkdir(o->stage, 0777) || (o->staged = 1, mkdir(s, 0777))) {
        snprintf(err, errlen, "cannot create the folder %s: %s", o->stage, strerror(errno));
        pb_run_out_discard(o);
        return -1;
    }
    return 0;
}

/* Make the renames durable before anything else is removed. */
static void swap_sync_parent(const pb_run_out *o)
{
    char parent[4096];
    const char *name;
    swap_split(o, parent, sizeof parent, &name);
    int fd = open(parent, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (fd >= 0) {
        fsync(fd);
        close(fd);
    }
}

int pb_run_out_commit(pb_run_out *o, char *err, size_t errlen)
{
    if (!swap_exists(o->path)) {
        if (rename(o->stage, o->path)) {
            snprintf(err, errlen, "cannot move the new run into %s: %s", o->dir, strerror(errno));
            pb_run_out_discard(o);
            return -1;
        }
        o->staged = 0;
        swap_sync_parent(o);
        return 0;
    }
    /* The new run takes the name .NAME.pb-old.<pid> for the instant before the
     * exchange, so that whatever sits under that name after a kill is
     * either a whole run or the earlier folder, never a half-written one. */
    const char *old = o->old;
    /* a writer asked to write the folder it stands in (--out .) follows it */
    struct stat here, there;
    int in_it = stat(".", &here) == 0 && stat(o->path, &there) == 0 && here.st_dev == there.st_dev &&
                here.st_ino == there.st_ino;
    if (stat(o->path, &there) == 0 && S_ISDIR(there.st_mode))
        chmod(o->stage, there.st_mode & 07777); /* the folder keeps its permissions */
    int e = 0;
    if (rename(o->stage, old))
        e = errno;
    else if (syscall(SYS_renameat2, AT_FDCWD, old, AT_FDCWD, o->path, RENAME_EXCHANGE)) {
        e = errno;
        rename(old, o->stage);
        if ((e == EINVAL || e == ENOSYS || e == EOPNOTSUPP) && rename(o->path, old) == 0) {
            /* no exchange here: two renames, which the next writer completes or undoes */
            e = rename(o->stage, o->path) ? errno : 0;
            if (e)
                rename(old, o->path);
        }
    }
    if (e) {
        snprintf(err, errlen, "cannot move the new run into %s: %s", o->dir, strerror(e));
        pb_run_out_discard(o);
        return -1;
    }
    o->staged = 0;
    swap_sync_parent(o);
    if (in_it && chdir(o->path))
        (void)0; /* the new folder is there: only a race could remove it */
    swap_carry(old, o->path);
    return 0;
}

void pb_run_out_discard(pb_run_out *o)
{
    if (o->staged)
        pb_rm_tree(o->stage);
    o->staged = 0;
}

void pb_run_out_close(pb_run_out *o)
{
    pb_run_out_discard(o);
    if (o->lock_fd >= 0) {
        unlink(o->lock); /* while still held: the next writer checks the file is the one it locked */
        close(o->lock_fd);
    }
    o->lock_fd = -1;
}

/* files.c - file-system helpers shared by every layer (see files.h). */
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdlib.h>
#include <stdio.h>
#include <unistd.h>
#include <string.h>
#include <sys/stat.h>
#include "problems/files.h"

int pb_mkdirs(const char *path)
{
    char buf[4096];
    if (!path[0]) {
        errno = ENOENT; /* as mkdir("") */
        return -1;
    }
    if (strlen(path) >= sizeof buf) {
        errno = ENAMETOOLONG;
        return -1;
    }
    strcpy(buf, path);
    for (char *p = buf + 1; *p; p++) {
        if (*p != '/')
            continue;
        *p = 0;
        if (mkdir(buf, 0777) && errno != EEXIST)
            return -1;
        *p = '/';
    }
    if (mkdir(buf, 0777) && errno != EEXIST)
        return -1;
    /* EEXIST alone could be a file of that name, which no write below it
     * could get through */
    struct stat st;
    if (stat(buf, &st))
        return -1;
    if (!S_ISDIR(st.st_mode)) {
        errno = ENOTDIR;
        return -1;
    }
    return 0;
}

FILE *pb_open_input(const char *path, const char *mode, const char **why)
{
    /* O_NONBLOCK: opening a FIFO for reading would otherwise wait for a
     * writer before fstat could tell what it is */
    int fd = open(path, O_RDONLY | O_NONBLOCK | O_CLOEXEC);
    if (fd < 0) {
        *why = strerror(errno);
        return NULL;
    }
    struct stat st;
    if (fstat(fd, &st)) {
        *why = strerror(errno);
        close(fd);
        return NULL;
    }
    if (!S_ISREG(st.st_mode)) {
        *why = S_ISDIR(st.st_mode) ? "is a folder, not a file"
             : S_ISFIFO(st.st_mode) ? "is a pipe (FIFO), not a regular file"
             : S_ISCHR(st.st_mode) || S_ISBLK(st.st_mode) ? "is a device, not a regular file"
             : "is not a regular file";
        close(fd);
        return NULL;
    }
    int fl = fcntl(fd, F_GETFL);
    if (fl >= 0)
        fcntl(fd, F_SETFL, fl & ~O_NONBLOCK);
    FILE *f = fdopen(fd, mode);
    if (!f) {
        *why = strerror(errno);
        close(fd);
    }
    return f;
}

/* realpath of path's folder, then "/" and its last name; -1 if the folder
 * cannot be resolved or the result does not fit. */
static int files_canonical(const char *path, char *out, size_t len)
{
    const char *slash = strrchr(path, '/');
    const char *name = slash ? slash + 1 : path;
    char dir[PATH_MAX], real[PATH_MAX];
    if (!slash)
        snprintf(dir, sizeof dir, ".");
    else if ((size_t)(slash - path) >= sizeof dir)
        return -1;
    else
        snprintf(dir, sizeof dir, "%.*s", slash == path ? 1 : (int)(slash - path), path);
    if (!realpath(dir, real))
        return -1;
    return snprintf(out, len, "%s/%s", real, name) < (int)len ? 0 : -1;
}

int pb_same_file(const char *a, const char *b)
{
    struct stat sa, sb;
    int ea = stat(a, &sa) == 0, eb = stat(b, &sb) == 0;
    if (ea && eb)
        return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
    if (ea != eb)
        return 0;
    char ca[PATH_MAX + 256], cb[PATH_MAX + 256];
    if (files_canonical(a, ca, sizeof ca) || files_canonical(b, cb, sizeof cb))
        return !strcmp(a, b);
    return !strcmp(ca, cb);
}

const char *pb_link_target(const char *path, char *buf)
{
    struct stat st;
    if (lstat(path, &st) || !S_ISLNK(st.st_mode))
        return path;
    return realpath(path, buf) ? buf : NULL;
}

int pb_rm_tree(const char *path)
{
    struct stat st;
    if (lstat(path, &st))
        return errno == ENOENT ? 0 : -1;
    if (!S_ISDIR(st.st_mode))
        return unlink(path);
    DIR *d = opendir(path);
    if (!d)
        return -1;
    int rc = 0;
    struct dirent *e;
    char sub[4400];
    while ((e = readdir(d)))
        if (strcmp(e->d_name, ".") && strcmp(e->d_name, "..")) {
            if ((size_t)snprintf(sub, sizeof sub, "%s/%s", path, e->d_name) >= sizeof sub)
                rc = -1;
            else if (pb_rm_tree(sub))
                rc = -1;
        }
    closedir(d);
    return rmdir(path) ? -1 : rc;
}

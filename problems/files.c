/* files.c - file-system helpers shared by every layer (see files.h). */
#include <errno.h>
#include <fcntl.h>
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

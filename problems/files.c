/* files.c - file-system helpers shared by every layer (see files.h). */
#include <errno.h>
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

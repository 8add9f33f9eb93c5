/* files.h - file-system helpers for every layer, kept in problems/ (the
 * lowest) so that no layer carries its own copy: the reference cache here,
 * the run folders in bench/store/. */
#ifndef PB_FILES_H
#define PB_FILES_H

/* mkdir -p: make path and every missing parent (mode 0777 less the umask).
 * 0, or -1 with errno: ENAMETOOLONG past 4095 bytes, ENOTDIR when path
 * exists but is not a directory, or mkdir's own. */
int pb_mkdirs(const char *path);

#endif

/* files.h - file-system helpers for every layer, kept in problems/ (the
 * lowest) so that no layer carries its own copy: the reference cache here,
 * the run folders in bench/store/. */
#ifndef PB_FILES_H
#define PB_FILES_H

#include <stdio.h>

/* mkdir -p: make path and every missing parent (mode 0777 less the umask).
 * 0, or -1 with errno: ENAMETOOLONG past 4095 bytes, ENOTDIR when path
 * exists but is not a directory, or mkdir's own. */
int pb_mkdirs(const char *path);

/* rm -rf: remove path and everything below it (symbolic links are removed,
 * not followed); 0, or -1 when something could not be removed. */
int pb_rm_tree(const char *path);

/* Open an input file for reading, refusing anything but a regular file: a
 * folder, a FIFO (whose open would wait for a writer), a device such as
 * /dev/zero (endless) or a socket. The open itself does not block. The
 * stream, or NULL with the reason (a fixed phrase or strerror's) in *why. */
FILE *pb_open_input(const char *path, const char *mode, const char **why);

/* 1 if paths a and b name one file: the same inode when both exist (links
 * followed), else the same folder (by realpath) and the same last name; 0
 * otherwise. Used to refuse an output that would replace an input or
 * another output. */
int pb_same_file(const char *a, const char *b);

/* Where a write to path lands: path itself, or, when path is a symbolic
 * link, the file it names (resolved into buf, PATH_MAX bytes), so that an
 * output link is written through and stays a link. NULL with errno
 * (ENOENT) for a link that names nothing. */
const char *pb_link_target(const char *path, char *buf);

#endif

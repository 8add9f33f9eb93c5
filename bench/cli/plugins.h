/* plugins.h - plug-in methods for every verb: --plugin FILE.so (repeatable)
 * and PB_PLUGINS=a.so:b.so, loaded before the verb parses its options. */
#ifndef PB_CLI_PLUGINS_H
#define PB_CLI_PLUGINS_H

#include <stddef.h>

/* Load PB_PLUGINS, then every `--plugin FILE` / `--plugin=FILE` of argv[2..],
 * removing those from argv (argc updated). 0, or PB_EXIT_USAGE after a
 * message naming the file and the reason. */
int pb_plugins_load_args(const char *verb, int *argc, char **argv);

/* Load one shared object and register its methods; 0, or -1 with the reason
 * (naming the file) in err. */
int pb_plugin_load(const char *path, char *err, size_t errlen);

/* The SHA-256 of a file's bytes as 64 lower-case hex digits; 0 or -1. */
int pb_sha256_file(const char *path, char out[65]);

/* The SHA-256 of a buffer as 64 lower-case hex digits. */
void pb_sha256_hex(const void *data, size_t len, char out[65]);

#endif

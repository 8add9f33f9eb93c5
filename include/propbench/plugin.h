/* propbench/plugin.h - methods in a shared object (public): a plug-in
 * exports pb_plugin_open, which returns a pack of method records and the
 * sizes of the structs it was built with, so that propbench refuses a
 * plug-in built against other headers instead of misreading it. Load one
 * with `propbench VERB --plugin FILE.so` or PB_PLUGINS=a.so:b.so. */
#ifndef PB_PUBLIC_PLUGIN_H
#define PB_PUBLIC_PLUGIN_H

#include "method.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct pb_method_pack {
    unsigned abi;            /* PB_METHOD_ABI of the headers it was built with */
    unsigned pack_size;      /* sizeof(pb_method_pack) */
    unsigned type_size;      /* sizeof(pb_method_type) */
    unsigned force_size;     /* sizeof(pb_force) */
    unsigned config_size;    /* sizeof(pb_method_config) */
    unsigned stats_size;     /* sizeof(pb_method_stats) */
    const char *version;     /* the plug-in's own version, e.g. "1.0" */
    const pb_method_type *const *methods;  /* NULL-terminated */
} pb_method_pack;

/* The first fields of every pack: `{ PB_METHOD_PACK_HEAD, .version = ... }`. */
#define PB_METHOD_PACK_HEAD                                                          \
    .abi = PB_METHOD_ABI, .pack_size = (unsigned)sizeof(pb_method_pack),             \
    .type_size = (unsigned)sizeof(pb_method_type),                                   \
    .force_size = (unsigned)sizeof(pb_force),                                        \
    .config_size = (unsigned)sizeof(pb_method_config),                               \
    .stats_size = (unsigned)sizeof(pb_method_stats)

/* The one symbol a plug-in exports (exported even under -fvisibility=hidden). */
#define PB_PLUGIN_SYMBOL "pb_plugin_open"
typedef const pb_method_pack *(*pb_plugin_open_fn)(void);
PB_API const pb_method_pack *pb_plugin_open(void);

#ifdef __cplusplus
}
#endif

#endif

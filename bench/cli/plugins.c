/* plugins.c - loading plug-in methods: dlopen (RTLD_NOW | RTLD_LOCAL), the
 * pb_plugin_open symbol, the pack's ABI and struct sizes, pb_method_check on
 * every record and a name no other method has; the SHA-256 of the file
 * (nettle) is kept as the methods' provenance. A plug-in is never unloaded:
 * its records live as long as the program. */
#include <dlfcn.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <limits.h>
#include <string.h>
#include <nettle/sha2.h>
#include "bench/cli/cli.h"
#include "bench/cli/plugins.h"
#include "integrators/method.h"
#include "propbench/plugin.h"

#define PLUGINS_MAX 16

static pb_method_origin plugins_origin[PLUGINS_MAX];
static int plugins_n;

static void plugins_hex(const uint8_t *d, char out[65])
{
    for (int i = 0; i < SHA256_DIGEST_SIZE; i++)
        snprintf(out + 2 * i, 3, "%02x", d[i]);
}

void pb_sha256_hex(const void *data, size_t len, char out[65])
{
    struct sha256_ctx c;
    uint8_t d[SHA256_DIGEST_SIZE];
    sha256_init(&c);
    sha256_update(&c, len, data);
    sha256_digest(&c, sizeof d, d);
    plugins_hex(d, out);
}

int pb_sha256_file(const char *path, char out[65])
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return -1;
    struct sha256_ctx c;
    uint8_t buf[65536], d[SHA256_DIGEST_SIZE];
    size_t n;
    sha256_init(&c);
    while ((n = fread(buf, 1, sizeof buf, f)) > 0)
        sha256_update(&c, n, buf);
    int bad = ferror(f);
    fclose(f);
    if (bad)
        return -1;
    sha256_digest(&c, sizeof d, d);
    plugins_hex(d, out);
    return 0;
}

/* The pack's head against this propbench's: NULL or the reason. */
static const char *plugins_pack_check(const pb_method_pack *p, char *buf, size_t len)
{
    if (!p)
        return "pb_plugin_open returned NULL";
    if (p->abi != PB_METHOD_ABI) {
        snprintf(buf, len, "built for interface version %u, this propbench has version %u: "
                 "rebuild it against these headers", p->abi, PB_METHOD_ABI);
        return buf;
    }
    unsigned got[] = {p->pack_size, p->type_size, p->force_size, p->config_size, p->stats_size};
    size_t want[] = {sizeof(pb_method_pack), sizeof(pb_method_type), sizeof(pb_force),
                     sizeof(pb_method_config), sizeof(pb_method_stats)};
    const char *what[] = {"pb_method_pack", "pb_method_type", "pb_force", "pb_method_config",
                          "pb_method_stats"};
    for (int i = 0; i < 5; i++)
        if (got[i] != want[i]) {
            snprintf(buf, len, "%s is %u bytes in it, %zu in this propbench: rebuild it "
                     "against these headers", what[i], got[i], want[i]);
            return buf;
        }
    if (!p->methods || !p->methods[0])
        return "its pack holds no method";
    return NULL;
}

/* dlopen searches the library path for a name without a slash: a file
 * named on the command line is a file, so "x.so" becomes "./x.so". */
static void *plugins_open(const char *path)
{
    char buf[4200];
    if (!strchr(path, '/')) {
        snprintf(buf, sizeof buf, "./%s", path);
        path = buf;
    }
    return dlopen(path, RTLD_NOW | RTLD_LOCAL);
}

int pb_plugin_load(const char *path, char *err, size_t errlen)
{
    char why[320];
    if (plugins_n == PLUGINS_MAX) {
        snprintf(err, errlen, "plug-in %s: more than %d plug-ins", path, PLUGINS_MAX);
        return -1;
    }
    pb_method_origin *o = &plugins_origin[plugins_n];
    if (strlen(path) >= sizeof o->path || pb_sha256_file(path, o->sha256)) {
        snprintf(err, errlen, "plug-in %s: cannot read it: %s", path,
                 strlen(path) >= sizeof o->path ? "path too long" : strerror(errno));
        return -1;
    }
    /* the same file named twice (PB_PLUGINS and --plugin, say) is loaded once */
    char real[PATH_MAX], prev[PATH_MAX];
    for (int i = 0; i < plugins_n; i++)
        if (!strcmp(plugins_origin[i].sha256, o->sha256) && realpath(path, real) &&
            realpath(plugins_origin[i].path, prev) && !strcmp(real, prev))
            return 0;
    void *h = plugins_open(path);
    if (!h) {
        const char *e = dlerror();
        snprintf(err, errlen, "plug-in %s: not loadable: %s", path, e ? e : "dlopen failed");
        return -1;
    }
    pb_plugin_open_fn fn;
    void *sym = dlsym(h, PB_PLUGIN_SYMBOL);
    memcpy(&fn, &sym, sizeof fn);  /* object to function pointer, as POSIX allows */
    if (!sym) {
        snprintf(err, errlen, "plug-in %s: no symbol %s (a plug-in exports "
                 "const pb_method_pack *pb_plugin_open(void))", path, PB_PLUGIN_SYMBOL);
        dlclose(h);
        return -1;
    }
    const pb_method_pack *p = fn();
    const char *bad = plugins_pack_check(p, why, sizeof why);
    if (bad) {
        snprintf(err, errlen, "plug-in %s: %s", path, bad);
        dlclose(h);
        return -1;
    }
    snprintf(o->path, sizeof o->path, "%s", path);
    snprintf(o->version, sizeof o->version, "%s", p->version ? p->version : "");
    for (const pb_method_type *const *m = p->methods; *m; m++)
        if (pb_method_register(*m, o, why, sizeof why)) {
            /* methods registered before this one stay: the program exits now */
            snprintf(err, errlen, "plug-in %s: %s", path, why);
            return -1;
        }
    plugins_n++;
    return 0;
}

static int plugins_one(const char *verb, const char *path)
{
    char err[1024 + 4200];
    if (pb_plugin_load(path, err, sizeof err))
        return pb_cli_error(verb, "%s", err);
    return 0;
}

/* PB_PLUGINS=a.so:b.so (an empty item is skipped) */
static int plugins_env(const char *verb)
{
    const char *env = getenv("PB_PLUGINS");
    if (!env || !*env)
        return 0;
    char *copy = strdup(env), *save = NULL;
    if (!copy)
        return pb_cli_error(verb, "out of memory");
    int rc = 0;
    for (char *s = strtok_r(copy, ":", &save); s && !rc; s = strtok_r(NULL, ":", &save))
        rc = plugins_one(verb, s);
    free(copy);
    return rc;
}

int pb_plugins_load_args(const char *verb, int *argc, char **argv)
{
    if (plugins_env(verb))
        return PB_EXIT_USAGE;
    int out = 2;
    for (int i = 2; i < *argc; i++) {
        const char *path = NULL;
        if (!strcmp(argv[i], "--plugin")) {
            if (i + 1 >= *argc)
                return pb_cli_error(verb, "--plugin needs a FILE.so");
            path = argv[++i];
        } else if (!strncmp(argv[i], "--plugin=", 9)) {
            path = argv[i] + 9;
            if (!*path)
                return pb_cli_error(verb, "--plugin needs a FILE.so");
        } else {
            argv[out++] = argv[i];
            continue;
        }
        if (plugins_one(verb, path))
            return PB_EXIT_USAGE;
    }
    argv[out] = NULL;
    *argc = out;
    return 0;
}

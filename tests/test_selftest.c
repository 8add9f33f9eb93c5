/* test_selftest.c - `propbench selftest` certifies every built-in method
 * (each is correct by its own tests), so a failure it reports on a user's
 * method is the method's, not the certifier's. */
#include <criterion/criterion.h>
#include <string.h>
#include "integrators/method.h"
#include "test_support.h"

Test(selftest, every_builtin_method_passes, .timeout = 120)
{
    static char out[1 << 14], err[1 << 12];
    for (const pb_method_type *const *m = pb_method_table; *m; m++) {
        const char *args[] = {"selftest", "--method", (*m)->name, NULL};
        int rc = pbt_run_cli(args, out, sizeof out, err, sizeof err);
        cr_assert_eq(rc, 0, "selftest %s exit %d:\n%s%s", (*m)->name, rc, out, err);
        cr_assert(strstr(out, "9 of 9 checks passed"), "%s:\n%s", (*m)->name, out);
    }
}

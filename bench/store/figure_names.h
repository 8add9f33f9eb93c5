/* figure_names.h - the file names of a report's figures in plots/. They live
 * in the store layer because two layers need the very same names: the report
 * writes the figures, and a rerun's prune of the run folder removes the
 * earlier report's; one function for both means a rerun removes exactly
 * what the earlier report made. */
#ifndef PB_STORE_FIGURE_NAMES_H
#define PB_STORE_FIGURE_NAMES_H

#include <stddef.h>

enum { PB_FIG_ENERGY, PB_FIG_ANGMOM, PB_FIG_GROWTH, PB_FIG_RIC, PB_FIG_WORK, PB_FIG_CONV,
       PB_FIG_COUNT };

/* Bytes a figure base (with its NUL) or a problem's stem can take. */
#define PB_FIG_BASE_MAX 128

/* "energy", "angmom", "growth", "ric", "work", "convergence"; "?" otherwise. */
const char *pb_fig_kind(int kind);

/* What follows "<base>." in each file a figure may leave in plots/ (the
 * script, gnuplot's log, both drawings and the drawings gnuplot had not
 * finished), NULL-terminated. */
extern const char *const pb_fig_exts[];

/* The problem's part of its figure names. A name of letters, digits and
 * . _ - only (not starting with '.'), of up to 100 characters, is kept as
 * it is; any other has every other character folded to '_', is cut to 100
 * characters, and gets '~' and 8 hex digits of a hash of the raw name
 * appended. No kept name holds a '~', so a folded name never equals a kept
 * one, and two folded names are equal only when their hashes are. */
void pb_fig_stem(const char *problem, char *buf, size_t len);

/* File base "<stem>-<kind>" of a problem's figure of one kind (kinds hold
 * no '-', so a base tells its stem and kind apart). buf should have
 * PB_FIG_BASE_MAX bytes. */
void pb_fig_base(const char *problem, int kind, char *buf, size_t len);

#endif

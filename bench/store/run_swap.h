/* run_swap.h - one writer at a time per run folder, and a new run staged
 * whole beside it and swapped in, so that a kill at any moment leaves the
 * folder holding either the earlier run or the new one, never a mix.
 *
 * For a run folder P/NAME the writer holds a lock on P/.NAME.pb-lock (a POSIX
 * record lock, so the refusal can name the holder's pid), writes the new run
 * into P/.NAME.pb-new.<pid>/ and exchanges it with P/NAME in one rename
 * (renameat2 RENAME_EXCHANGE; on a file system without it, two renames and
 * a recovery by the next writer). What the earlier folder held that its run
 * did not write (a user's notes, say) is moved into the new folder; the rest
 * of it, now at P/.NAME.pb-old.<pid>/, is removed. The next writer to the same
 * folder clears what a killed one left: staging folders, a half-done swap,
 * and work folders (.work.<pid>) of an earlier propbench; a writer to any
 * folder of P does the same beside every other folder of P whose lock it can
 * take at once (no writer is at work there). */
#ifndef PB_RUN_SWAP_H
#define PB_RUN_SWAP_H

#include <stddef.h>

typedef struct pb_run_out {
    const char *dir;     /* the folder as the user named it (messages) */
    char path[4096];     /* the same, resolved: parent/name, no symbolic link */
    char lock[4200];     /* parent/.name.pb-lock */
    char stage[4200];    /* parent/.name.pb-new.<pid>: where the new run is written */
    char old[4200];      /* parent/.name.pb-old.<pid>: the swap's other name */
    int lock_fd;         /* -1 when no lock is held */
    int staged;          /* 1 while the staging folder exists */
} pb_run_out;

/* Check dir can take a run (an existing dir is a folder, its summary.json
 * a file, its series/ a folder, and it can be written), take the lock and
 * clear what killed writers left. 0; -1 with a one-line reason naming the
 * path in err; -2 when another process holds the lock (err names its pid). */
int pb_run_out_open(pb_run_out *o, const char *dir, char *err, size_t errlen);

/* Make the staging folder o->stage and o->stage/series; 0 or -1 (err). */
int pb_run_out_stage(pb_run_out *o, char *err, size_t errlen);

/* Swap the staged run in, keep what the earlier folder held that is not an
 * earlier run's, and remove the earlier run; 0, or -1 (err) with the
 * earlier folder as it was and the staging folder removed. */
int pb_run_out_commit(pb_run_out *o, char *err, size_t errlen);

/* Remove the staging folder (a run that will not be swapped in). */
void pb_run_out_discard(pb_run_out *o);

/* Remove the staging folder if still there, then release the lock and
 * remove the lock file. Safe to call more than once. */
void pb_run_out_close(pb_run_out *o);

#endif

/*
 * signals.h - what ionmix does on SIGINT, SIGTERM and SIGHUP.
 *
 * Outside the interactive shell (scripts, -e, standard input) each of the
 * three removes every temporary file the file writer has open
 * (fio_remove_temps) and then ends the process by the same signal with its
 * default action, so the parent sees the conventional status (128 + the
 * signal number in a shell).  No partial output and no side note is left.
 *
 * In the interactive shell SIGINT does not end the program: it sets a
 * cancel flag that long-running loops poll (sig_cancelled): the CSV
 * correction at every buffer refill, `sweep` before each point, Planck's
 * and the free-diffusion solvers at every Newton iteration (and
 * ljp_compute after its models, so `junction ... model all` fails whole),
 * and the line loop before each line (a cancelled `run` stops its
 * script).  Such a loop stops, its command fails with SIG_CANCELLED_MSG
 * and is rolled back like any failed command, and the shell returns to
 * its prompt.  The shell clears
 * the flag before each command (sig_clear).  SIGTERM and SIGHUP end the
 * shell as outside it.
 *
 * Only main (or the shell) installs; library code only polls.
 */
#ifndef IONMIX_SIGNALS_H
#define IONMIX_SIGNALS_H

/* Install the handlers.  interactive: 1 in the shell (SIGINT cancels the
 * running command), 0 otherwise (SIGINT ends the program).  May be called
 * again to switch.  Returns 0, or -1 when sigaction failed (then the
 * default actions stay; not fatal). */
int sig_install(int interactive);

/* 1 when SIGINT arrived in the shell since the last sig_clear. */
int sig_cancelled(void);

/* Forget an earlier SIGINT (before each command). */
void sig_clear(void);

/* The message a cancelled command fails with. */
#define SIG_CANCELLED_MSG "cancelled (interrupt)"

#endif

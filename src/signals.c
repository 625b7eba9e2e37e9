/*
 * signals.c - SIGINT/SIGTERM/SIGHUP: temporaries removed and the
 * conventional exit outside the shell, a cancel flag inside it.  See
 * signals.h.
 */
#include "signals.h"

#include <signal.h>
#include <string.h>

#include "fileio.h"

static volatile sig_atomic_t cancel_flag;
static volatile sig_atomic_t shell_mode;

/* Remove the temporaries, then die by the same signal with its default
 * action.  Only async-signal-safe calls. */
static void on_fatal(int sig)
{
	struct sigaction dfl;
	sigset_t set;
	fio_remove_temps();
	memset(&dfl, 0, sizeof dfl);
	dfl.sa_handler = SIG_DFL;
	sigemptyset(&dfl.sa_mask);
	sigaction(sig, &dfl, NULL);
	sigemptyset(&set);
	sigaddset(&set, sig);
	sigprocmask(SIG_UNBLOCK, &set, NULL);
	raise(sig);
}

static void on_signal(int sig)
{
	if (sig == SIGINT && shell_mode) {
		cancel_flag = 1;
		return;
	}
	on_fatal(sig);
}

int sig_install(int interactive)
{
	static const int sigs[] = {SIGINT, SIGTERM, SIGHUP};
	struct sigaction sa;
	int rc = 0;
	shell_mode = interactive ? 1 : 0;
	cancel_flag = 0;
	memset(&sa, 0, sizeof sa);
	sa.sa_handler = on_signal;
	sigemptyset(&sa.sa_mask);
	for (size_t i = 0; i < sizeof sigs / sizeof sigs[0]; i++)
		sigaddset(&sa.sa_mask, sigs[i]);  /* one handler at a time */
	sa.sa_flags = SA_RESTART;                 /* reads go on; loops poll the flag */
	for (size_t i = 0; i < sizeof sigs / sizeof sigs[0]; i++)
		if (sigaction(sigs[i], &sa, NULL) != 0)
			rc = -1;
	return rc;
}

int sig_cancelled(void)
{
	return cancel_flag != 0;
}

void sig_clear(void)
{
	cancel_flag = 0;
}

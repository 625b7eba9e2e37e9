/*
 * shell.c - readline prompt, history and completion around cmd_exec.
 */
#include "shell.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/select.h>
#include <sys/stat.h>

#include <readline/history.h>
#include <readline/readline.h>

#include "common.h"
#include "signals.h"
#include "userdb.h"

static im_ctx *sh_ctx; /* readline's callbacks take no user pointer */

char *shell_history_path(void)
{
	const char *xdg = getenv("XDG_STATE_HOME"), *home = getenv("HOME");
	char buf[4096];
	if (xdg && *xdg == '/')
		snprintf(buf, sizeof buf, "%s/ionmix/history", xdg);
	else if (home && *home)
		snprintf(buf, sizeof buf, "%s/.local/state/ionmix/history", home);
	else
		return NULL;
	return im_xstrdup(buf);
}

/* ---- completion ---- */

static compl_kind want;     /* what the word being completed is */
static char **saved_names;  /* saved solutions, fetched once per completion */
static int nsaved;

static const char *candidate(int i)
{
	im_ctx *c = sh_ctx;
	int n;
	switch (want) {
	case COMPL_COMMAND: {
		const cmd_def *t = cmd_table(&n);
		return i < n ? t[i].name : NULL;
	}
	case COMPL_COMPOUND:
		n = refdb_ncompounds(c->ses->ref);
		if (i < n)
			return refdb_compound_at(c->ses->ref, i)->name;
		i -= n;
		return i < refdb_naliases(c->ses->ref) ? refdb_alias_at(c->ses->ref, i) : NULL;
	case COMPL_ION:
		return i < refdb_nions(c->ses->ref) ? refdb_ion_at(c->ses->ref, i)->symbol : NULL;
	case COMPL_SOLUTION:
		if (i < c->ses->ws.n)
			return c->ses->ws.sol[i]->name;
		i -= c->ses->ws.n;
		return i < nsaved ? saved_names[i] : NULL;
	case COMPL_SAVED:
		return i < nsaved ? saved_names[i] : NULL;
	default:
		return NULL;
	}
}

static char *generator(const char *text, int state)
{
	static int i;
	static size_t len;
	const char *s;
	if (!state) {
		i = 0;
		len = strlen(text);
	}
	while ((s = candidate(i++))) {
		if (strncasecmp(s, text, len) != 0)
			continue;
		if (!strchr(s, ' '))
			return im_xstrdup(s);
		if (want == COMPL_COMPOUND && refdb_compound(sh_ctx->ses->ref, s) &&
		    strcmp(refdb_compound(sh_ctx->ses->ref, s)->name, s) == 0) {
			/* a canonical name with a space completes quoted; aliases
			 * with spaces are left out (too many near-duplicates) */
			char *q = im_xmalloc(strlen(s) + 3);
			sprintf(q, "\"%s\"", s);
			return q;
		}
	}
	return NULL;
}

static void fetch_saved(void)
{
	char err[IM_ERRLEN];
	int failed;
	struct userdb *u = ses_userdb(sh_ctx->ses, 0, err, &failed);
	for (int i = 0; i < nsaved; i++)
		free(saved_names[i]);
	free(saved_names);
	saved_names = NULL;
	nsaved = 0;
	if (u) {
		int n = udb_list(u, &saved_names, err);
		nsaved = n > 0 ? n : 0;
	}
}

static char **complete(const char *text, int start, int end)
{
	char *argv[CMD_ARGS_MAX], buf[CMD_LINE_MAX + 1], err[IM_ERRLEN];
	int argc;
	const cmd_def *d;
	(void)end;
	rl_attempted_completion_over = 1;
	snprintf(buf, sizeof buf, "%.*s", start, rl_line_buffer);
	{ /* complete within the last ';'-separated command */
		char *semi = strrchr(buf, ';');
		argc = cmd_split(semi ? semi + 1 : buf, argv, CMD_ARGS_MAX, err);
	}
	if (argc < 0)
		return NULL;
	if (argc == 0) {
		want = COMPL_COMMAND;
	} else {
		d = cmd_lookup(argv[0]);
		if (!d)
			return NULL;
		want = argc == 1 ? d->compl : d->compl_rest;
	}
	if (want == COMPL_NONE)
		return NULL;
	if (want == COMPL_FILE) {
		rl_attempted_completion_over = 0;
		return rl_completion_matches(text, rl_filename_completion_function);
	}
	if (want == COMPL_SOLUTION || want == COMPL_SAVED)
		fetch_saved();
	return rl_completion_matches(text, generator);
}

/* ---- the loop ---- */

static void make_parent(const char *path)
{
	char buf[4096];
	snprintf(buf, sizeof buf, "%s", path);
	for (char *p = buf + 1; *p; p++)
		if (*p == '/') {
			*p = '\0';
			mkdir(buf, 0700);
			*p = '/';
		}
}

/* ---- reading a line: readline's callback interface, so that Ctrl-C at
 * the prompt clears the line being typed and keeps the shell ---- */

static char *cb_line;
static int cb_done;

static void on_line(char *line)
{
	cb_line = line;
	cb_done = 1;
	rl_callback_handler_remove();
}

/* A line from the terminal (caller frees), or NULL at end of input. */
static char *read_line(const char *prompt)
{
	FILE *in = rl_instream ? rl_instream : stdin;
	cb_done = 0;
	cb_line = NULL;
	rl_callback_handler_install(prompt, on_line);
	while (!cb_done) {
		fd_set fds;
		int rc;
		FD_ZERO(&fds);
		FD_SET(fileno(in), &fds);
		rc = select(fileno(in) + 1, &fds, NULL, NULL, NULL);
		if (sig_cancelled()) { /* Ctrl-C: drop what was typed, a new prompt */
			sig_clear();
			rl_free_line_state();
			rl_callback_sigcleanup();
			rl_replace_line("", 0);
			rl_point = rl_end = 0;
			fputs("^C", rl_outstream ? rl_outstream : stdout);
			rl_crlf();
			rl_on_new_line();
			rl_redisplay();
			continue;
		}
		if (rc < 0 && errno == EINTR)
			continue;
		if (rc < 0) {
			rl_callback_handler_remove();
			return NULL;
		}
		rl_callback_read_char();
	}
	return cb_line;
}

/* The readline reader of cmd_loop: a prompt naming the current
 * solution and the temperature, history kept in history_path. */
typedef struct rl_reader {
	im_ctx *ctx;
	const char *history_path;
	char *line;
	int eof;      /* 1: Ctrl-D (end of input) ended the loop */
} rl_reader;

static int rl_next(void *arg, char **line, size_t *len)
{
	rl_reader *r = arg;
	char prompt[128];
	session *ses = r->ctx->ses;
	solution *s = ses->ws.current >= 0 ? ses->ws.sol[ses->ws.current] : NULL;
	if (ses->keep_ws && ses->keep_err[0]) { /* said once; then no more tries */
		out_printf(r->ctx->out, "note: the workspace is no longer kept for the next "
			   "start: %s\n", ses->keep_err);
		ses->keep_ws = 0;
	}
	fflush(r->ctx->out->fp);
	free(r->line);
	snprintf(prompt, sizeof prompt, "ionmix [%s, %.1f C]> ", s ? s->name : "no solution",
		 ses->temp_C);
	r->line = read_line(prompt);
	sig_clear(); /* a Ctrl-C before this command is not for it */
	if (!r->line) {
		r->eof = 1;
		return 0;
	}
	if (r->line[strspn(r->line, " \t")] != '\0') {
		add_history(r->line);
		if (r->history_path) {
			make_parent(r->history_path);
			if (append_history(1, r->history_path) != 0)
				write_history(r->history_path);
		}
	}
	*line = r->line;
	*len = strlen(r->line);
	return 1;
}

/* The names of the workspace solutions that differ from what is saved,
 * comma-separated into buf; returns how many. */
static int unsaved_names(im_ctx *ctx, char *buf, size_t n)
{
	char err[IM_ERRLEN];
	size_t len = 0;
	int count = 0;
	buf[0] = '\0';
	for (int i = 0; i < ctx->ses->ws.n; i++) {
		const solution *s = ctx->ses->ws.sol[i];
		if (ses_unsaved(ctx->ses, s, err) == 0)
			continue;
		count++;
		if (len < n)
			len += snprintf(buf + len, n - len, "%s%s", len ? ", " : "", s->name);
	}
	if (len >= n && n > 4)
		strcpy(buf + n - 4, "...");
	return count;
}

/* Leaving with unsaved solutions: name them and ask once.  1: leave. */
static int confirm_leave(im_ctx *ctx)
{
	char names[512], *answer;
	int n = unsaved_names(ctx, names, sizeof names), yes;
	if (n == 0)
		return 1;
	out_printf(ctx->out, "\nnot saved: %s%s\n", names,
		   ctx->ses->keep_ws ? " (the workspace is kept for the next start; `save NAME` "
				       "keeps a solution for good)" : "");
	fflush(ctx->out->fp);
	answer = read_line("leave anyway? [y/N] ");
	sig_clear();
	if (!answer) /* a second Ctrl-D: leave */
		return 1;
	yes = answer[0] == 'y' || answer[0] == 'Y';
	free(answer);
	return yes;
}

/* Restore the workspace kept by the last session, saying so in one line. */
static void restore_kept(im_ctx *ctx)
{
	char err[IM_ERRLEN], names[256];
	size_t len = 0;
	int n;
	session *s = ctx->ses;
	if (!s->db_path)
		return;
	n = 0;
	if (ses_restore_kept(s, &n, err) < 0) {
		out_printf(ctx->out, "note: the workspace of the last session was not restored: "
			   "%s\n", err);
		return;
	}
	s->keep_ws = 1;
	if (n == 0)
		return;
	names[0] = '\0';
	for (int i = 0; i < s->ws.n && len < sizeof names; i++)
		len += snprintf(names + len, sizeof names - len, "%s%s", i ? ", " : "",
				s->ws.sol[i]->name);
	if (len >= sizeof names)
		strcpy(names + sizeof names - 4, "...");
	out_printf(ctx->out, "restored the workspace of the last session: %d solution%s (%s), "
		   "%.1f C%s%s\n", n, n == 1 ? "" : "s", names, s->temp_C,
		   s->ws.current >= 0 ? ", current " : "",
		   s->ws.current >= 0 ? s->ws.sol[s->ws.current]->name : "");
}

int shell_run(im_ctx *ctx, const char *history_path)
{
	char err[IM_ERRLEN];
	int line;
	rl_reader rr = {ctx, history_path, NULL, 0};
	cmd_reader rd = {rl_next, &rr};
	sh_ctx = ctx;
	rl_readline_name = "ionmix";
	rl_attempted_completion_function = complete;
	rl_basic_word_break_characters = " \t\n\"';";
	rl_catch_signals = 0; /* SIGINT is signals.c's: a flag read_line polls */
	using_history();
	stifle_history(2000);
	if (history_path)
		read_history(history_path);
	out_printf(ctx->out, "ionmix: type `help` for the commands, `quit` or Ctrl-D to leave\n");
	restore_kept(ctx);
	for (;;) {
		rr.eof = 0;
		if (cmd_loop(ctx, &rd, &line, err)) { /* only when the output fails */
			out_error(ctx->out, NULL, 0, err);
			break;
		}
		if (confirm_leave(ctx))
			break;
		ctx->quit = 0;
	}
	free(rr.line);
	if (history_path)
		history_truncate_file(history_path, 2000);
	for (int i = 0; i < nsaved; i++)
		free(saved_names[i]);
	free(saved_names);
	saved_names = NULL;
	nsaved = 0;
	out_printf(ctx->out, "\n");
	return 0;
}

/*
 * mkcompletion.c - a build-time tool: writes the bash completion file of
 * ionmix on standard output from the command table itself (cmd_table),
 * so that no list of commands is kept by hand.
 *
 * Usage: mkcompletion OPTION...   (the options of the binary, as its
 * --help names them; the Makefile passes them).  Exit 0, or 1 when
 * standard output cannot be written.
 *
 * The file completes: options; the argument of --db (file names); the
 * argument of -e/--execute (a command word, then the file names for the
 * commands whose arguments name files); script file names otherwise.
 */
#include <stdio.h>
#include <string.h>

#include "command.h"

int main(int argc, char **argv)
{
	int n;
	const cmd_def *t = cmd_table(&n);
	printf("# bash completion for ionmix.  Generated at build time by\n"
	       "# src/tools/mkcompletion.c from the command table; do not edit.\n\n");
	printf("_ionmix_commands='");
	for (int i = 0; i < n; i++)
		printf("%s%s", i ? " " : "", t[i].name);
	printf("'\n_ionmix_file_commands='");
	for (int i = 0, k = 0; i < n; i++)
		if (t[i].compl == COMPL_FILE || t[i].compl_rest == COMPL_FILE)
			printf("%s%s", k++ ? " " : "", t[i].name);
	printf("'\n_ionmix_options='");
	for (int i = 1; i < argc; i++)
		printf("%s%s", i > 1 ? " " : "", argv[i]);
	printf("'\n\n");
	fputs("_ionmix()\n"
	      "{\n"
	      "\tlocal cur prev word\n"
	      "\tCOMPREPLY=()\n"
	      "\tcur=${COMP_WORDS[COMP_CWORD]}\n"
	      "\tprev=${COMP_WORDS[COMP_CWORD-1]}\n"
	      "\tcase $prev in\n"
	      "\t--db)\n"
	      "\t\tCOMPREPLY=($(compgen -f -- \"$cur\"))\n"
	      "\t\treturn 0 ;;\n"
	      "\t-e|--execute)\n"
	      "\t\t# a command: its first word, then file names where it takes them\n"
	      "\t\tcur=${cur#[\\'\\\"]}\n"
	      "\t\tcase $cur in\n"
	      "\t\t*' '*)\n"
	      "\t\t\tword=${cur%% *}\n"
	      "\t\t\tcase \" $_ionmix_file_commands \" in\n"
	      "\t\t\t*\" $word \"*)\n"
	      "\t\t\t\tCOMPREPLY=($(compgen -f -- \"${cur##* }\")) ;;\n"
	      "\t\t\tesac ;;\n"
	      "\t\t*)\n"
	      "\t\t\tCOMPREPLY=($(compgen -W \"$_ionmix_commands\" -- \"$cur\")) ;;\n"
	      "\t\tesac\n"
	      "\t\treturn 0 ;;\n"
	      "\tesac\n"
	      "\tcase $cur in\n"
	      "\t--db=*)\n"
	      "\t\tCOMPREPLY=($(compgen -f -- \"${cur#--db=}\")) ;;\n"
	      "\t-*)\n"
	      "\t\tCOMPREPLY=($(compgen -W \"$_ionmix_options\" -- \"$cur\")) ;;\n"
	      "\t*)\n"
	      "\t\tCOMPREPLY=($(compgen -f -- \"$cur\")) ;;\n"
	      "\tesac\n"
	      "\treturn 0\n"
	      "}\n"
	      "complete -o filenames -F _ionmix ionmix\n", stdout);
	return fflush(stdout) == 0 && !ferror(stdout) ? 0 : 1;
}

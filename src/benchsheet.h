/*
 * benchsheet.h - the bench sheet of a solution: what to weigh or pipette,
 * in the order the work is done, with the targets, the cautions and the
 * final checks; built once from a solution and its computed state, then
 * rendered as terminal text (cmd_weigh), a one-page printable HTML sheet
 * (A4 and Letter) or CSV (RFC 4180).
 *
 * Amounts: a solid in g from 1 g up ("7.456 g"), below that in mg to
 * 0.1 mg ("149.1 mg", "8.5 mg"), the readability of an analytical
 * balance; a stock as the volume to pipette (weigh_fmt_volume).  A
 * titrant is never given in grams: from its stock, the volume to start
 * from; without one, the amount in mmol and the volume of a suggested
 * 1 M stock.
 *
 * Order of work (common practice, the trade's habits): water first;
 * solids; stocks; a bicarbonate saline gassed before its Ca2+ is added
 * (calcium carbonate precipitates otherwise); nucleotides (ATP, GTP)
 * added fresh, on ice; titration to the pH before making up to volume;
 * then the volume; then the checks with a pH meter and an osmometer.
 */
#ifndef IONMIX_BENCHSHEET_H
#define IONMIX_BENCHSHEET_H

#include <stdio.h>

#include "solution.h"

/* The suggested stock of a titrant given without one, mM (common
 * practice: 1 M NaOH, KOH, CsOH or HCl). */
#define BS_TITRANT_STOCK_mM 1000.0

typedef enum bs_how {
	BS_WEIGH,           /* weigh the solid */
	BS_STOCK,           /* pipette from the stock the user set */
	BS_TITRANT_STOCK,   /* titrant from the user's stock: a start volume */
	BS_TITRANT_SUGGEST  /* titrant without a stock: mmol, and a suggested stock */
} bs_how;

typedef struct bs_line {
	const rd_compound *c;  /* borrowed from the refdb */
	double fw_g_mol;       /* used to weigh: the bottle's (`fw`) or the compound's */
	double mM;             /* final concentration */
	bs_how how;
	double grams;          /* the mass in the final volume (also for stocks) */
	double mmol;           /* the amount in the final volume */
	double stock_mM;       /* the stock used or suggested; 0 for BS_WEIGH */
	double stock_mL;       /* its volume; 0 for BS_WEIGH */
	char amount[48];       /* "7.456 g", "8.5 mg", "2.00 mL", "130.2 uL" (ASCII) */
	char amount_num[24];   /* the number of amount alone ("7.456") */
	char amount_unit[8];   /* "g", "mg", "mL", "uL" */
	char stock[24];        /* "1 M" or "" */
	int step;              /* index into the sheet's steps */
} bs_line;

typedef struct bs_sheet {
	char name[SOL_NAME_MAX];
	char date[16];          /* YYYY-MM-DD */
	double volume_mL;
	double t_rec_C;         /* the recording (computation) temperature */
	double t_prep_C;        /* NAN when not given */
	double ph_target;       /* NAN when none */
	double pH;              /* computed; NAN without speciation */
	double free_ca_mM;      /* computed; NAN when the solution has no Ca2+ */
	double total_ca_mM;
	double osm_mOsm_kg;     /* estimate; NAN without Pitzer data */
	int bicarbonate;        /* 1: gassed with CO2 or holding HCO3- */
	double co2_frac;        /* > 0 when the gas is known */
	int nucleotides;        /* 1: ATP/GTP present */
	bs_line *lines;         /* in the order of work (owned) */
	int n;
	char **steps;           /* the order of work, one sentence each (owned) */
	int nsteps;
	char **checks;          /* the final checks (owned) */
	int nchecks;
} bs_sheet;

/* Build the sheet of s for volume_mL, with st computed by sol_compute at
 * t_rec_C (for the expected pH, free Ca2+ and osmolality).  ref resolves
 * ions; date "YYYY-MM-DD".  -1 with err on an empty solution or a bad
 * volume.  Free with bs_free. */
int bs_build(const solution *s, const sol_state *st, const refdb *ref, double volume_mL,
	     double t_rec_C, double t_prep_C, const char *date, bs_sheet *out, char *err);
void bs_free(bs_sheet *b);

/* Write the standalone HTML page (XHTML-compatible HTML5, UTF-8, print CSS
 * for A4 and Letter) or the CSV to fp.  version names the program in the
 * footer.  Write errors are the caller's to check (fileio). */
void bs_write_html(FILE *fp, const bs_sheet *b, const char *version);
void bs_write_csv(FILE *fp, const bs_sheet *b);

/* Today's date, YYYY-MM-DD, UTC; SOURCE_DATE_EPOCH (the reproducible-
 * builds convention) fixes it for tests. */
void bs_today(char *buf, size_t n);

#endif

/*
 * benchpair.h - the pair the in-process benchmarks measure: a
 * 12-compound bicarbonate bath gassed with 5 % CO2 and a 12-compound
 * K-gluconate pipette titrated to pH 7.3, in a context whose output goes
 * to /dev/null and which has no user database.  bench_pair returns 0, or
 * -1 after printing why on stderr; the caller owns *db and ctx.
 */
#ifndef IONMIX_BENCHPAIR_H
#define IONMIX_BENCHPAIR_H

#include <stdio.h>

#include "command.h"
#include "common.h"

static int bench_pair(refdb **db, im_ctx *ctx, out *o)
{
	char err[IM_ERRLEN];
	if (refdb_open(db, err)) {
		fprintf(stderr, "%s\n", err);
		return -1;
	}
	o->fp = fopen("/dev/null", "w");
	ctx_init(ctx, *db, o);
	ctx->ses->db_path = "/nonexistent/bench.db";
	if (ctx_load_chemistry(ctx, err)) {
		fprintf(stderr, "%s\n", err);
		return -1;
	}
	if (cmd_exec(ctx, "solution bath; add NaCl 125; add KCl 2.5; add CaCl2.2H2O 2;"
			  "add MgCl2.6H2O 1; add NaHCO3 26; add NaH2PO4.H2O 1.25;"
			  "add glucose 25; add HEPES 5; add Na-pyruvate 2; add sucrose 5;"
			  "add MgSO4.7H2O 0.5; add \"choline chloride\" 1; gas co2 5%", err) ||
	    cmd_exec(ctx, "solution pip; add K-gluconate 120; add KCl 10; add HEPES 10;"
			  "add EGTA 0.5; add MgCl2.6H2O 2; add Na2ATP 4; add Na2GTP 0.3;"
			  "add Na2-phosphocreatine 10; add NaCl 2; add CaCl2 0.1; add sucrose 5;"
			  "ph 7.3 with KOH", err)) {
		fprintf(stderr, "set-up: %s\n", err);
		return -1;
	}
	return 0;
}

#endif

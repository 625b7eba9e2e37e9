/*
 * cmd_correct.h - the shell command `correct`: subtract the liquid junction
 * potential from recorded voltages, Vm = Vrecorded - LJP (LJP: the bath
 * relative to the pipette solution, in mV).  A handler of type cmd_fn
 * (command.h); it changes nothing in the workspace.  Synopses:
 *   correct FILE|- [column N|NAME]... by MV|for PIPETTE BATH [to OUT|-]
 *           [skip N] [skip-bad] [whole-cell|outside-out|inside-out|cell-attached]
 *   correct value MV [MV...] by MV|for PIPETTE BATH
 * FILE `-` is standard input; `to -` standard output.  `skip N` keeps the
 * first N lines verbatim as metadata (lines starting with '#' always are);
 * the configuration chooses the form of the correction (correct.h), and
 * defaults to whole-cell.  Without `to`, a regular file larger than
 * CMD_CORRECT_TTY_MAX bytes is refused when the output is a terminal.
 *   correct FILE.nwb by MV|for PIPETTE BATH [series NAME...] [to OUT.nwb] [again]
 * `by MV` gives the LJP; `for PIPETTE BATH` computes it from two solutions
 * of the workspace with the Henderson equation (concentrations, at the
 * `temp` temperature) and rounds it to 0.1 mV, the value then subtracted.
 * Without `to OUT` the corrected data goes to the output stream and the
 * summary to the error stream, so that the data stays clean; with it, OUT
 * is written atomically with a side note OUT.ionmix.txt (see correct.h)
 * and the summary is the command's result.  A file named `value` is
 * reached as ./value.  A file ending in .nwb (or starting with the HDF5
 * signature) is an NWB recording: its membrane and command potential
 * series get their offset changed, the data untouched (nwb.h).
 */
#ifndef IONMIX_CMD_CORRECT_H
#define IONMIX_CMD_CORRECT_H

#include "command.h"

/* Decimals the LJP from `for PIPETTE BATH` is rounded to (0.1 mV). */
#define CMD_CORRECT_HENDERSON_DECIMALS 1
/* Largest input poured onto a terminal without `to` (bytes). */
#define CMD_CORRECT_TTY_MAX (256L * 1024)
/* Largest `skip N`. */
#define CMD_CORRECT_SKIP_MAX 1000000

int cmd_correct(im_ctx *ctx, int argc, char **argv, char *err);

/* `list FILE.nwb`: the patch-clamp series of an NWB file with their
 * units, offsets and any LJP correction already recorded.  0 or -1. */
int cmd_correct_list_nwb(im_ctx *ctx, const char *path, char *err);

#endif

/*
 * nernst.h - equilibrium (Nernst) potentials.
 * E = (RT/zF) ln(c_out/c_in): inside relative to outside, in mV.
 */
#ifndef IONMIX_NERNST_H
#define IONMIX_NERNST_H

/* Fails (-1, err) when z == 0, a side is zero or negative (the potential
 * is then infinite), or an input is not finite. */
int nernst_mV(int z, double in_mM, double out_mM, double t_C, double *E_mV,
	      char *err);

#endif

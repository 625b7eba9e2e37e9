/*
 * activity.h - ionic strength and single-ion activity coefficients.
 *
 * Molar scale throughout (concentrations in mM = mmol/L); the Debye-Hueckel
 * constants A (L^1/2 mol^-1/2) and B (per Angstrom, L^1/2 mol^-1/2) follow
 * the temperature through the dielectric constant and density of water.
 */
#ifndef IONMIX_ACTIVITY_H
#define IONMIX_ACTIVITY_H

/* Dielectric constant of water at t_C, 0-100 C (Malmberg & Maryott 1956). */
double act_water_epsilon(double t_C);
/* Density of water at t_C, g/cm3, 0-100 C (Kell 1975). */
double act_water_density_g_cm3(double t_C);
/* Debye-Hueckel A (log10 base) and B (1/Angstrom) at t_C. */
double act_dh_A(double t_C);
double act_dh_B_per_A(double t_C);

/* Ionic strength in mM from n charges and concentrations (mM). */
double act_ionic_strength_mM(const int *z, const double *c_mM, int n);

/* Davies (1962): log10 g = -A z^2 (sqrt(I)/(1+sqrt(I)) - 0.3 I), I in M. */
double act_davies(int z, double I_mM, double t_C);

/* Extended Debye-Hueckel with the Kielland (1937) ion size a (pm):
 * log10 g = -A z^2 sqrt(I) / (1 + B a sqrt(I)). */
double act_extended_dh(int z, double a_pm, double I_mM, double t_C);

#endif

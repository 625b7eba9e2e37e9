/*
 * activity.c - Debye-Hueckel constants, ionic strength, Davies and
 * extended Debye-Hueckel activity coefficients.
 */
#include "activity.h"

#include <math.h>

#include "common.h"

/* Malmberg C.G. & Maryott A.A. (1956) J Res Natl Bur Stand 56:1-8,
 * eq. for 0-100 C (coefficients from memory). 78.30 at 25 C. */
double act_water_epsilon(double t_C)
{
	return 87.740 - 0.40008 * t_C + 9.398e-4 * t_C * t_C - 1.410e-6 * t_C * t_C * t_C;
}

/* Kell G.S. (1975) J Chem Eng Data 20:97-105, density of air-free water at
 * 1 atm (coefficients from memory); 0.997047 g/cm3 at 25 C. */
double act_water_density_g_cm3(double t_C)
{
	double t = t_C;
	double num = 999.83952 + 16.945176 * t - 7.9870401e-3 * t * t -
		     46.170461e-6 * t * t * t + 105.56302e-9 * t * t * t * t -
		     280.54253e-12 * t * t * t * t * t;
	return num / (1.0 + 16.879850e-3 * t) / 1000.0;
}

/* A = 1.82483e6 sqrt(rho) (eps T)^-3/2 and B = 50.2916 sqrt(rho) (eps T)^-1/2
 * per Angstrom: the Debye-Hueckel constants in their usual numerical form
 * (e.g. Truesdell & Jones 1974; from memory).  0.5108 and 0.3292 at 25 C. */
double act_dh_A(double t_C)
{
	double et = act_water_epsilon(t_C) * (t_C + IM_ZERO_C_K);
	return 1.82483e6 * sqrt(act_water_density_g_cm3(t_C)) / (et * sqrt(et));
}

double act_dh_B_per_A(double t_C)
{
	double et = act_water_epsilon(t_C) * (t_C + IM_ZERO_C_K);
	return 50.2916 * sqrt(act_water_density_g_cm3(t_C)) / sqrt(et);
}

double act_ionic_strength_mM(const int *z, const double *c_mM, int n)
{
	double s = 0;
	for (int i = 0; i < n; i++)
		s += c_mM[i] * z[i] * z[i];
	return 0.5 * s;
}

double act_davies(int z, double I_mM, double t_C)
{
	double I = I_mM / 1000.0, r = sqrt(I);
	if (z == 0)
		return 1.0;
	return pow(10.0, -act_dh_A(t_C) * z * z * (r / (1.0 + r) - 0.3 * I));
}

double act_extended_dh(int z, double a_pm, double I_mM, double t_C)
{
	double r = sqrt(I_mM / 1000.0);
	if (z == 0)
		return 1.0;
	return pow(10.0, -act_dh_A(t_C) * z * z * r /
				 (1.0 + act_dh_B_per_A(t_C) * (a_pm / 100.0) * r));
}

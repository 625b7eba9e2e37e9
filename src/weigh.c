/*
 * weigh.c - masses and stock volumes for the bench sheet.
 */
#include "weigh.h"

#include <stdio.h>

double weigh_grams(double conc_mM, double fw_g_mol, double volume_mL)
{
	return conc_mM * 1e-3 * volume_mL * 1e-3 * fw_g_mol;
}

double weigh_stock_mL(double conc_mM, double stock_mM, double volume_mL)
{
	return volume_mL * conc_mM / stock_mM;
}

void weigh_fmt_mass(char *buf, size_t n, double g)
{
	if (g >= 1.0)
		snprintf(buf, n, "%.3f g", g);
	else
		snprintf(buf, n, "%.1f mg", g * 1000.0);
}

void weigh_fmt_volume(char *buf, size_t n, double mL, int utf8)
{
	if (mL >= 1000.0)
		snprintf(buf, n, "%.3f L", mL / 1000.0);
	else if (mL >= 1.0)
		snprintf(buf, n, "%.2f mL", mL);
	else
		snprintf(buf, n, "%.1f %s", mL * 1000.0, utf8 ? "\xc2\xb5L" : "uL");
}

/*
 * weigh.h - the bench sheet: masses to weigh and stock volumes to pipette.
 */
#ifndef IONMIX_WEIGH_H
#define IONMIX_WEIGH_H

#include <stddef.h>

/* Mass in g of a compound of fw_g_mol for conc_mM in volume_mL:
 * g = mM * 1e-3 mol/L * volume_mL * 1e-3 L * fw. */
double weigh_grams(double conc_mM, double fw_g_mol, double volume_mL);

/* Volume in mL of a stock of stock_mM giving conc_mM in volume_mL. */
double weigh_stock_mL(double conc_mM, double stock_mM, double volume_mL);

/* Format a mass the way a bench sheet wants it, the unit chosen per
 * amount by one rule: 1 g and above in g with three decimals ("7.456 g"),
 * below 1 g in mg to 0.1 mg, the readability of an analytical balance
 * ("149.1 mg", "8.5 mg"); never "0.0149 g" beside "8.51 mg". */
void weigh_fmt_mass(char *buf, size_t n, double grams);

/* Format a volume: 1 L and above in L to 1 mL, 1 mL and above in mL to
 * 0.01 mL, below in uL (µL when utf8) to 0.1 uL. */
void weigh_fmt_volume(char *buf, size_t n, double mL, int utf8);

/* Below this a balance cannot weigh a compound well, g (common practice:
 * about 10 mg on a 0.1 mg analytical balance gives 1 %). */
#define WEIGH_MIN_GOOD_g 0.010

#endif

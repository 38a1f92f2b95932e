/* tobler: walking speed on a slope after Tobler's hiking function (Tobler 1993,
 * "Three presentations on geographical analysis and modeling", NCGIA TR 93-1):
 * W = 6 exp(-3.5 |S + 0.05|) km/h, where S = dh/dx is the elevation change over
 * the horizontal distance, signed in the direction of travel (uphill > 0).
 * The fastest pace (6 km/h) is on a gentle descent, S = -0.05. */
#ifndef TOBLER_H
#define TOBLER_H

/* Tobler's walking speed in km/h for slope 'S' (dimensionless, rise over run). */
double tobler_kmh(double S);
/* The same normalised to flat ground: W(S) / W(0); 1 on the flat, > 1 on gentle
 * descents (max exp(0.175) = 1.19 at S = -0.05), < 1 uphill and on steep descents. */
double tobler_factor(double S);

#endif

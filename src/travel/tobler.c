/* tobler: Tobler's hiking function (see include/tobler.h). */
#include "tobler.h"

#include <math.h>

double tobler_kmh(double S)
{
    return 6.0 * exp(-3.5 * fabs(S + 0.05));
}

double tobler_factor(double S)
{
    /* W(S)/W(0) = exp(-3.5 (|S + 0.05| - 0.05)); written out so that flat
     * ground gives exactly 1 rather than a ratio of two rounded values. */
    return exp(-3.5 * (fabs(S + 0.05) - 0.05));
}

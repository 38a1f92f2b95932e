/* synth: synthetic inputs and clocks for the benchmark tools: a square grid of
 * random people on rolling hills, a road lattice joined at its crossings, wall
 * and CPU clocks and the peak resident size. Benchmarks only; never tests. */
#ifndef SYNTH_H
#define SYNTH_H

#include <stdint.h>

#include "grid.h"
#include "roads.h"

/* Deterministic pseudo-random numbers (64-bit LCG, Knuth's MMIX constants). */
typedef struct synth_rng {
    uint64_t state;
} synth_rng_t;
uint64_t synth_rnd(synth_rng_t *r);

double synth_now_s(void);     /* monotonic wall clock */
double synth_cpu_s(void);     /* CPU seconds of the whole process (all threads) */
double synth_peak_bytes(void);/* peak resident size (getrusage ru_maxrss) */

/* n x n cells of 'cell' metres, 0..39 people each, hills of about 2 km wavelength
 * and 40 m relief (slopes up to ~0.1). NULL when out of memory; free with grid_free. */
grid_t *synth_grid(int n, double cell, synth_rng_t *rng);
/* Roads along every 'step'-th row and column (5 km/h walking, 40 km/h by vehicle),
 * joined at the crossings. Free with roads_free. */
roads_t *synth_roads(const grid_t *g, int step);

#endif

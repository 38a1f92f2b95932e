/* progress: terminal progress lines (see include/progress.h). */
#include "progress.h"

#include <stdio.h>
#include <stdlib.h>
#include <time.h>
#include <unistd.h>

double progress_now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

void progress_init(progress_t *p, int quiet)
{
    const char *ci = getenv("CI");
    p->enabled = !quiet && isatty(STDERR_FILENO) && (ci == NULL || ci[0] == '\0');
    p->stage = NULL;
    p->t0 = p->last_draw = 0;
    p->drawn = 0;
}

void progress_start(progress_t *p, const char *stage)
{
    p->stage = stage;
    p->t0 = progress_now();
    p->last_draw = 0;
    p->drawn = 0;
    /* Name the stage at once: most stages never call progress_update, and a
     * long one (building the network, the nearest-site pass) would otherwise
     * leave the terminal silent. progress_end clears it again if it was short. */
    if (p->enabled && stage != NULL) {
        fprintf(stderr, "\r%-28s ...", stage);
        fflush(stderr);
        p->drawn = 1;
    }
}

void progress_update(progress_t *p, double done, double total)
{
    double t, pct;

    if (!p->enabled || p->stage == NULL) return;
    t = progress_now();
    if (t - p->t0 < 1.0 || t - p->last_draw < 0.2) return;
    pct = total > 0 ? 100.0 * done / total : 0.0;
    if (pct > 100) pct = 100;
    fprintf(stderr, "\r%-28s %5.1f%%  %6.1f s", p->stage, pct, t - p->t0);
    fflush(stderr);
    p->last_draw = t;
    p->drawn = 1;
}

double progress_end(progress_t *p)
{
    double el = progress_now() - p->t0;
    if (p->enabled && p->drawn) {
        /* Stages under a second leave no line behind (ANSI erase to end of line). */
        if (el >= 1.0) fprintf(stderr, "\r%-28s done    %6.1f s\n", p->stage, el);
        else fprintf(stderr, "\r\033[K");
        fflush(stderr);
    }
    p->stage = NULL;
    p->drawn = 0;
    return el;
}

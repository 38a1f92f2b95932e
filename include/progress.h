/* progress: one progress line per stage on a terminal: the stage name as it
 * starts ("stage ..."), a percentage once it has run for about a second when the
 * stage reports one ("stage  45%  3.2 s"), and "stage done 3.2 s" at its end if
 * it took a second or more (shorter stages erase their line). Silent when
 * stderr is not a terminal, in CI, or with --quiet. State travels in a progress_t. */
#ifndef PROGRESS_H
#define PROGRESS_H

typedef struct progress {
    int enabled;        /* 1 when lines may be drawn */
    const char *stage;  /* current stage name (borrowed) */
    double t0;          /* stage start, seconds (monotonic) */
    double last_draw;   /* when the line was last drawn */
    int drawn;          /* 1 when a line is on screen */
} progress_t;

/* Decide once whether to draw: stderr is a terminal, CI is unset, not quiet. */
void progress_init(progress_t *p, int quiet);
void progress_start(progress_t *p, const char *stage);
/* Report 'done' of 'total' units; cheap to call often (draws at most 5 times a second). */
void progress_update(progress_t *p, double done, double total);
/* End the stage; returns its elapsed seconds. */
double progress_end(progress_t *p);
/* Monotonic clock in seconds. */
double progress_now(void);

#endif

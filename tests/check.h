/* check.h: the tiny test harness every tests/test_*.c uses.
 * CHECK(cond) and CHECK_NEAR(a, b, tol) report file:line on failure and count;
 * CHECK_STR_HAS(s, sub) checks a message names what it should.
 * CHECK_DONE() prints "NAME: N passed, M failed" and returns the exit status. */
#ifndef CHECK_H
#define CHECK_H

#include <math.h>
#include <stdio.h>
#include <string.h>

static int check_passed, check_failed;

#define CHECK(cond) do { \
    if (cond) check_passed++; \
    else { check_failed++; fprintf(stderr, "%s:%d: FAIL: %s\n", __FILE__, __LINE__, #cond); } \
} while (0)

#define CHECK_NEAR(a, b, tol) do { \
    double check_a_ = (double)(a), check_b_ = (double)(b); \
    if (fabs(check_a_ - check_b_) <= (double)(tol)) check_passed++; \
    else { check_failed++; fprintf(stderr, "%s:%d: FAIL: %s = %.10g, expected %.10g (tol %g)\n", \
                                   __FILE__, __LINE__, #a, check_a_, check_b_, (double)(tol)); } \
} while (0)

/* Relative tolerance: |a-b| <= rel * max(|b|, 1e-300). */
#define CHECK_REL(a, b, rel) CHECK_NEAR(a, b, (rel) * fmax(fabs((double)(b)), 1e-300))

#define CHECK_STR_HAS(s, sub) do { \
    const char *check_s_ = (s); \
    if (check_s_ != NULL && strstr(check_s_, (sub)) != NULL) check_passed++; \
    else { check_failed++; fprintf(stderr, "%s:%d: FAIL: \"%s\" does not contain \"%s\"\n", \
                                   __FILE__, __LINE__, check_s_ ? check_s_ : "(null)", (sub)); } \
} while (0)

#define CHECK_DONE(name) ( \
    printf("%s: %d passed, %d failed\n", (name), check_passed, check_failed), \
    check_failed ? 1 : 0)

#endif

/* render_internal: drawing helpers the map and chart modules share. Internal to
 * src/report/. */
#ifndef RENDER_INTERNAL_H
#define RENDER_INTERNAL_H

#include <stddef.h>

#include <cairo.h>

/* Copy 's' into buf (of 'size' bytes), cut with an ellipsis until it is at most
 * max_w pixels wide in the current font; cuts never split a UTF-8 character. */
void render_fit_text(cairo_t *cr, const char *s, double max_w, char *buf, size_t size);

#endif

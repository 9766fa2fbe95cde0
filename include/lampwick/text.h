/*
 * text.h - text helpers: bounded copies, UTF-8 validation (RFC 3629), bytes
 * escaped for terminals, and the edit distance behind "did you mean".
 */
#ifndef LW_TEXT_H
#define LW_TEXT_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

/* Copy src into dst (size bytes), always NUL-terminated; returns false if cut. */
bool lw_text_copy(char *dst, const char *src, size_t size);

/* Is s[0..n) valid UTF-8 (no overlong forms, no surrogates, at most
 * U+10FFFF)?  On false, *at (may be NULL) is the offset of the first bad
 * byte. */
bool lw_text_utf8_valid(const char *s, size_t n, size_t *at);

/* Copy text into out (size bytes) with control characters, DEL and bytes of
 * invalid UTF-8 written as \xNN; returns the length written. */
size_t lw_text_escape(char *out, size_t size, const char *text);

/* Levenshtein distance of two short strings (capped at 99). */
int lw_text_edit_distance(const char *a, const char *b);

/* Write text into an XML or HTML document: markup characters (< > & ")
 * escaped; characters XML 1.0 does not allow (C0 controls but tab, newline
 * and return) and bytes of invalid UTF-8 written as U+FFFD, so the
 * document stays well formed whatever the text.  s may be NULL. */
void lw_text_xml_write(FILE *fp, const char *s);

#endif

/*
 * text.c - text helpers: bounded copies, UTF-8 validation, escaping for
 * terminals, edit distance (see text.h).
 */
#include "lampwick/text.h"

#include <ctype.h>
#include <stdio.h>
#include <string.h>

bool lw_text_copy(char *dst, const char *src, size_t size)
{
    if (size == 0)
        return false;
    size_t n = strlen(src);
    if (n >= size) {
        memcpy(dst, src, size - 1);
        dst[size - 1] = '\0';
        return false;
    }
    memcpy(dst, src, n + 1);
    return true;
}

/* (see error.h) */
bool lw_text_utf8_valid(const char *s, size_t n, size_t *at)
{
    size_t i = 0;
    while (i < n) {
        unsigned char c = (unsigned char)s[i];
        size_t len = c < 0x80 ? 1 : (c >> 5) == 6 ? 2 : (c >> 4) == 14 ? 3 : (c >> 3) == 30 ? 4 : 0;
        if (len == 0 || i + len > n || (len == 2 && c < 0xC2) || (len == 4 && c > 0xF4))
            goto bad;
        for (size_t k = 1; k < len; k++)
            if (((unsigned char)s[i + k] & 0xC0) != 0x80)
                goto bad;
        if (len == 3) {
            unsigned char c1 = (unsigned char)s[i + 1];
            if ((c == 0xE0 && c1 < 0xA0) || (c == 0xED && c1 >= 0xA0)) /* overlong, surrogate */
                goto bad;
        }
        if (len == 4) {
            unsigned char c1 = (unsigned char)s[i + 1];
            if ((c == 0xF0 && c1 < 0x90) || (c == 0xF4 && c1 >= 0x90))
                goto bad;
        }
        i += len;
    }
    return true;
bad:
    if (at)
        *at = i;
    return false;
}

/* Copy text into out (room for size), with every byte that could steer a
 * terminal -- a control character, DEL, or a byte of invalid UTF-8 --
 * written as \xNN.  Returns the length written. */
size_t lw_text_escape(char *out, size_t size, const char *text)
{
    size_t o = 0;
    const unsigned char *s = (const unsigned char *)text;
    while (*s && o + 5 <= size) { /* room for one \xNN and the NUL */
        unsigned char c = *s;
        size_t len = c < 0x80 ? 1 : (c >> 5) == 6 ? 2 : (c >> 4) == 14 ? 3 : (c >> 3) == 30 ? 4 : 0;
        size_t avail = strnlen((const char *)s, 4);
        bool ok = len > 0 && len <= avail && c >= 0x20 && c != 0x7F &&
                  lw_text_utf8_valid((const char *)s, len, NULL);
        if (ok && o + len < size) {
            memcpy(out + o, s, len);
            o += len;
            s += len;
        } else {
            o += (size_t)snprintf(out + o, size - o, "\\x%02X", c);
            s++;
        }
    }
    out[o] = '\0';
    return o;
}

int lw_text_edit_distance(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    if (la > 63 || lb > 63)
        return 99;
    int row[64];
    for (size_t j = 0; j <= lb; j++)
        row[j] = (int)j;
    for (size_t i = 1; i <= la; i++) {
        int diag = row[0];
        row[0] = (int)i;
        for (size_t j = 1; j <= lb; j++) {
            int up = row[j];
            int cost = tolower((unsigned char)a[i - 1]) != tolower((unsigned char)b[j - 1]);
            int best = diag + cost;
            if (row[j - 1] + 1 < best)
                best = row[j - 1] + 1;
            if (up + 1 < best)
                best = up + 1;
            row[j] = best;
            diag = up;
        }
    }
    return row[lb];
}

void lw_text_xml_write(FILE *fp, const char *s)
{
    for (; s && *s; s++) {
        unsigned char c = (unsigned char)*s;
        if (c >= 0x80) {
            size_t n = strnlen(s, 4), len = (c >> 5) == 6    ? 2
                                        : (c >> 4) == 14 ? 3
                                        : (c >> 3) == 30 ? 4
                                                         : 0;
            if (len && len <= n && lw_text_utf8_valid(s, len, NULL)) {
                fwrite(s, 1, len, fp);
                s += len - 1;
            } else {
                fputs("\xEF\xBF\xBD", fp);
            }
            continue;
        }
        if (c < 0x20 && c != '\t' && c != '\n' && c != '\r') {
            fputs("\xEF\xBF\xBD", fp);
            continue;
        }
        switch (*s) {
        case '<':
            fputs("&lt;", fp);
            break;
        case '>':
            fputs("&gt;", fp);
            break;
        case '&':
            fputs("&amp;", fp);
            break;
        case '"':
            fputs("&quot;", fp);
            break;
        default:
            fputc(*s, fp);
        }
    }
}

/*
 * search.c - the cell search path (see search.h).
 */
#include "lampwick/search.h"

#include <string.h>
#include "lampwick/text.h"

void lw_search_add(lw_search *s, const char *dir)
{
    if (!dir || !dir[0] || s->n == LW_SEARCH_MAX)
        return;
    lw_text_copy(s->dirs[s->n++], dir, LW_PATH_MAX);
}

void lw_search_add_list(lw_search *s, const char *list)
{
    if (!list)
        return;
    while (*list) {
        const char *colon = strchr(list, ':');
        size_t n = colon ? (size_t)(colon - list) : strlen(list);
        char dir[LW_PATH_MAX];
        if (n > 0 && n < sizeof dir) {
            memcpy(dir, list, n);
            dir[n] = '\0';
            lw_search_add(s, dir);
        }
        list += n;
        if (*list == ':')
            list++;
    }
}

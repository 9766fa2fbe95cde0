/*
 * search.c - the cell search path (see search.h).
 */
#include "lampwick/search.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lw_config.h"
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

void lw_search_default(lw_search *s)
{
    memset(s, 0, sizeof *s);
    lw_search_add_list(s, getenv("LAMPWICK_CELLS"));
    const char *xdg = getenv("XDG_DATA_HOME"), *home = getenv("HOME");
    char user[LW_PATH_MAX];
    int n = -1;
    if (xdg && xdg[0] == '/')
        n = snprintf(user, sizeof user, "%s/lampwick/cells", xdg);
    else if (home && home[0] == '/')
        n = snprintf(user, sizeof user, "%s/.local/share/lampwick/cells", home);
    if (n > 0 && (size_t)n < sizeof user)
        lw_search_add(s, user);
    lw_search_add(s, LW_DATADIR "/cells");
}

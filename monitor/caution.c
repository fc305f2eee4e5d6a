/*
 * caution.c - the advisory caution every human-facing output carries.
 */
#include "commands.h"

#include <string.h>

const char *const fg_caution =
	"floodgauge is advisory: it is not a safety system. Correlations hold only within their "
	"published ranges (results outside them are flagged); local codes, site procedures and "
	"licensed engineers govern.";

void fg_caution_print(FILE *f)
{
	/* Wrapped at 78 columns for a terminal; words are never split. */
	const char *p = fg_caution;
	while (*p != '\0') {
		size_t n = strlen(p);
		if (n > 78) {
			n = 78;
			while (n > 0 && p[n] != ' ')
				n--;
			if (n == 0)
				n = 78;
		}
		fprintf(f, "%.*s\n", (int)n, p);
		p += n;
		while (*p == ' ')
			p++;
	}
}

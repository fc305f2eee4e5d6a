/*
 * offline.c - see offline.h.
 */
#include "offline.h"

#include <stdio.h>
#include <stdlib.h>

#include "commands.h"

int offline_setup(const char *path, struct fg_config **cfg, struct engine **eng)
{
	*cfg = malloc(sizeof(**cfg));
	*eng = malloc(sizeof(**eng));
	if (*cfg == NULL || *eng == NULL)
		return EXIT_RUNTIME;
	return config_load(*cfg, path, stderr) != 0 ? EXIT_USAGE : 0;
}

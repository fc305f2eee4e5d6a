/*
 * caution.c - the advisory caution every human-facing output carries.
 */
#include "commands.h"

const char *const fg_caution =
	"floodgauge is advisory: it is not a safety system. Correlations hold only within their "
	"published ranges (results outside them are flagged); local codes, site procedures and "
	"licensed engineers govern.";

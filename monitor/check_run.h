/*
 * check_run.h - `floodgauge check`'s look at what `run` would trip over:
 * the MQTT URI scheme, UTF-8 of the names paho and the broker take,
 * password and CA files, host names (resolved only), the export listening
 * beyond loopback, serial devices.
 */
#ifndef CHECK_RUN_H
#define CHECK_RUN_H

#include <stdbool.h>
#include <stdio.h>

#include "config.h"

/*
 * Prints each finding to out as "FILE:LINE: what" (errors: run would stop)
 * or "FILE:LINE: warning: what" (run starts and retries or reports). Returns
 * the number of errors; *warnings (may be NULL) gets the number of warnings.
 */
int check_run(const struct fg_config *cfg, FILE *out, unsigned *warnings);

/* True when s is well-formed UTF-8 (RFC 3629: no overlong forms, no
 * surrogates, nothing above U+10FFFF). */
bool check_run_utf8_ok(const char *s);

#endif

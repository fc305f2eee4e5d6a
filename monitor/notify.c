/*
 * notify.c - see notify.h.
 */
#include "notify.h"

#include <stdbool.h>
#include <stdio.h>

#include <systemd/sd-daemon.h>

static int64_t last_kick_mono_ms = INT64_MIN / 2;
static int64_t kick_every_ms = -1; /* -1: not asked yet; 0: no watchdog */

void notify_ready(const char *status)
{
	char msg[256];
	snprintf(msg, sizeof msg, "READY=1\nSTATUS=%s", status != NULL ? status : "running");
	(void)sd_notify(0, msg);
}

void notify_reloading(void)
{
	(void)sd_notify(0, "RELOADING=1");
}

void notify_stopping(void)
{
	(void)sd_notify(0, "STOPPING=1");
}

void notify_watchdog(int64_t now_mono_ms)
{
	if (kick_every_ms < 0) {
		uint64_t usec = 0;
		/* > 0: WATCHDOG_USEC is set for this very process */
		kick_every_ms = sd_watchdog_enabled(0, &usec) > 0 ? (int64_t)(usec / 2000) : 0;
	}
	if (kick_every_ms == 0 || now_mono_ms - last_kick_mono_ms < kick_every_ms)
		return;
	last_kick_mono_ms = now_mono_ms;
	(void)sd_notify(0, "WATCHDOG=1");
}

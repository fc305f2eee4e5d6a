/*
 * notify.h - telling systemd how the daemon is (sd_notify(3), libsystemd):
 * READY=1 once the links are open, WATCHDOG=1 from the loop while it runs
 * (at most every half WatchdogSec; a loop that stops kicking is restarted
 * by systemd), RELOADING=1 / READY=1 around a SIGHUP reload, STOPPING=1 at
 * a clean stop. Every call is a no-op when not started by systemd with
 * Type=notify (no NOTIFY_SOCKET).
 */
#ifndef NOTIFY_H
#define NOTIFY_H

#include <stdint.h>

void notify_ready(const char *status);
void notify_reloading(void);
void notify_stopping(void);
/* Kicks the watchdog if systemd asked for one and half its interval has
 * passed since the last kick (now_mono_ms: CLOCK_MONOTONIC, ms). */
void notify_watchdog(int64_t now_mono_ms);

#endif

/*
 * sig.h - signal flags. The handlers only set these (the only thing a
 * handler may portably do); the loops look at them once per iteration.
 */
#ifndef SIG_H
#define SIG_H

#include <signal.h>

extern volatile sig_atomic_t sig_stop;   /* SIGTERM or SIGINT */
extern volatile sig_atomic_t sig_reload; /* SIGHUP */
extern volatile sig_atomic_t sig_reopen; /* SIGUSR1: reopen the events file */

/* Installs the handlers (without SA_RESTART, so sleeps return early). */
void sig_install(void);

#endif

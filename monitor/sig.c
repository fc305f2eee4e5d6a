/*
 * sig.c - see sig.h.
 */
#include "sig.h"

#include <string.h>

volatile sig_atomic_t sig_stop;
volatile sig_atomic_t sig_reload;
volatile sig_atomic_t sig_reopen;

static void on_stop(int signo)
{
	(void)signo;
	sig_stop = 1;
}

static void on_reopen(int signo)
{
	(void)signo;
	sig_reopen = 1;
}

static void on_reload(int signo)
{
	(void)signo;
	sig_reload = 1;
}

void sig_install(void)
{
	struct sigaction sa;
	memset(&sa, 0, sizeof(sa));
	sigemptyset(&sa.sa_mask);
	sa.sa_handler = on_stop;
	sigaction(SIGTERM, &sa, NULL);
	sigaction(SIGINT, &sa, NULL);
	sa.sa_handler = on_reload;
	sigaction(SIGHUP, &sa, NULL);
	sa.sa_handler = on_reopen;
	sigaction(SIGUSR1, &sa, NULL);
	signal(SIGPIPE, SIG_IGN);
}

/*
 * fuzz_config.c - libFuzzer target: the config loader (INI reading, every
 * key handler, cross-references and geometry checks) on arbitrary bytes. A refused config must say so on
 * the error stream; an accepted one must name at least one section.
 */
#include <assert.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include "check_run.h"
#include "config.h"
#include "fuzz_util.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	static struct fg_config cfg;
	char path[64];
	int fd = fuzz_file(data, size, path, sizeof path);
	if (fd < 0)
		return 0;
	FILE *errs = fopen("/dev/null", "w");
	int rc = config_load(&cfg, path, errs);
	if (rc == 0) {
		assert(cfg.section_count > 0);
		/* Names that reach MQTT are checked as UTF-8 by check (not run
		 * here: check also resolves host names, which needs a resolver). */
		(void)check_run_utf8_ok(cfg.monitor.name);
	} else {
		assert(rc < 0);
	}
	fclose(errs);
	close(fd);
	return 0;
}

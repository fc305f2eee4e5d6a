/*
 * fuzz_command.c - libFuzzer target: the MQTT command parser, the age check,
 * the reply writer and the log escaper on arbitrary payloads. Checks the
 * parser's promises: a refused payload says why; an accepted one has an op
 * and a NUL-free, control-free alarm name; the escaped log text is printable
 * ASCII only.
 */
#include <assert.h>
#include <errno.h>
#include <stdint.h>
#include <string.h>

#include "command.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	struct command c;
	char err[COMMAND_ERR_MAX + 64], reply[1024], shown[256];
	int rc = command_parse((const char *)data, size, &c, err, sizeof err);
	if (rc != 0) {
		assert(rc == -EINVAL);
		assert(err[0] != '\0');
	} else {
		assert(c.op != COMMAND_OP_NONE);
		assert(c.alarm[0] != '\0');
		for (const char *p = c.alarm; *p != '\0'; p++)
			assert((unsigned char)*p >= 0x20 && *p != 0x7f);
		(void)command_check_age(&c, INT64_C(1772600767000), 30.0, err, sizeof err);
	}
	int n = command_reply_json(rc == 0 ? &c : NULL, rc == 0, rc == 0 ? NULL : err, "normal",
				   reply, sizeof reply);
	assert(n < (int)sizeof reply);
	size_t k = command_log_escape((const char *)data, size, shown, sizeof shown);
	assert(k == strlen(shown));
	for (size_t i = 0; i < k; i++)
		assert(shown[i] >= 0x20 && shown[i] < 0x7f);
	return 0;
}

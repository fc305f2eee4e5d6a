/*
 * fuzz_alarmstate.c - libFuzzer target: the alarm state file reader on
 * arbitrary bytes, restoring into three configured alarms. Whatever it
 * accepts leaves every alarm consistent (alarm_is_consistent), as the daemon
 * relies on after a restart; whatever it refuses leaves them as they were.
 */
#include <assert.h>
#include <stdint.h>
#include <stdio.h>

#include "alarm.h"
#include "alarmstate.h"
#include "fuzz_util.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void init_alarms(struct alarm *a)
{
	static const char *const names[3] = {"C401_FLOOD_H", "C401_DIAG", "R404_SWELL_H"};
	for (unsigned i = 0; i < 3; i++) {
		struct alarm_cfg c;
		alarm_cfg_defaults(&c);
		snprintf(c.name, sizeof c.name, "%s", names[i]);
		c.kind = i == 1 ? ALARM_KIND_DIAGNOSTIC : ALARM_KIND_HIGH;
		c.field = i == 1 ? ALARM_FIELD_QUALITY : RF_FLOOD_INDEX;
		c.setpoint = 80.0;
		c.deadband = 2.0;
		alarm_init(&a[i], &c, i);
	}
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	static struct alarm alarms[3], fresh[3];
	char path[64], err[512];
	int fd = fuzz_file(data, size, path, sizeof path);
	if (fd < 0)
		return 0;
	init_alarms(alarms);
	init_alarms(fresh);
	int rc = alarmstate_load(path, alarms, 3, err, sizeof err);
	for (unsigned i = 0; i < 3; i++)
		assert(alarm_is_consistent(&alarms[i]));
	if (rc < 0)
		for (unsigned i = 0; i < 3; i++) {
			assert(alarms[i].state == fresh[i].state);
			assert(alarms[i].unacked == fresh[i].unacked);
			assert(alarms[i].shelved == fresh[i].shelved);
		}
	else
		assert(rc <= 3);
	close(fd);
	return 0;
}

/*
 * fuzz_csvread.c - libFuzzer target: the historian CSV reader (header,
 * delimiters, time formats, long and wide forms, text cells) on arbitrary
 * bytes, bound to two tag names. Rows come back in strictly increasing time
 * (the reader's promise) and the reader ends.
 */
#include <assert.h>
#include <stdint.h>

#include "csvread.h"
#include "fuzz_util.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	static struct csvread r;
	static const char *const names[] = {"C401_FI_GAS", "C401_PDI"};
	char path[64], err[512];
	int fd = fuzz_file(data, size, path, sizeof path);
	if (fd < 0)
		return 0;
	if (csvread_open(&r, path, err, sizeof err) == 0) {
		bool found[2];
		if (csvread_bind_some(&r, names, 2, found, err, sizeof err) == 0) {
			int64_t t_ms, last = INT64_MIN;
			double v[2];
			unsigned rows = 0;
			/* csvread.h: out-of-order and duplicate rows are skipped, so the
			 * times returned strictly increase */
			while (csvread_next(&r, &t_ms, v, 2) > 0 && rows < 100000) {
				assert(t_ms > last);
				last = t_ms;
				rows++;
			}
		}
		csvread_close(&r);
	}
	close(fd);
	return 0;
}

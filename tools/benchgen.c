/*
 * benchgen.c - writes the historian file `make bench` replays: one row a
 * second for tools/bench.ini (a tray and a packed section of the invented
 * Tarnwick unit 40, 7 tags).
 *
 *   benchgen ROWS > FILE
 *
 * Loads swing slowly over hours with a few upsets towards flooding each day,
 * plus measurement noise, so the solvers see both the steady state and jumps.
 * A fixed-seed generator makes the file the same on every run.
 */
#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

static uint64_t rng_state = 0x9e3779b97f4a7c15u;

/* xorshift64*: uniform in [0, 1). */
static double uniform(void)
{
	rng_state ^= rng_state >> 12;
	rng_state ^= rng_state << 25;
	rng_state ^= rng_state >> 27;
	return (double)((rng_state * 2685821657736338717u) >> 11) * 0x1p-53;
}

static double noise(double sd)
{
	return sd * (uniform() + uniform() + uniform() - 1.5) * 2.0;
}

/* Days since 1970-01-01 to a civil date (H. Hinnant's algorithm). */
static void civil(int64_t z, int *y, int *m, int *d)
{
	z += 719468;
	int64_t era = (z >= 0 ? z : z - 146096) / 146097;
	int64_t doe = z - era * 146097;
	int64_t yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
	int64_t doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
	int64_t mp = (5 * doy + 2) / 153;
	*d = (int)(doy - (153 * mp + 2) / 5 + 1);
	*m = (int)(mp < 10 ? mp + 3 : mp - 9);
	*y = (int)(yoe + era * 400 + (*m <= 2));
}

int main(int argc, char **argv)
{
	if (argc != 2) {
		fprintf(stderr, "usage: benchgen ROWS\n");
		return 2;
	}
	long long rows = atoll(argv[1]);
	const int64_t t0 = 1767225600; /* 2026-01-01T00:00:00Z */
	static char buf[1 << 16];
	setvbuf(stdout, buf, _IOFBF, sizeof buf);
	puts("time,T_FI_GAS,T_FI_LIQ,T_PDI,T_PI,P_FI_GAS,P_FI_LIQ,P_PDI");
	for (long long i = 0; i < rows; i++) {
		int64_t t = t0 + i;
		double h = (double)i / 3600.0;
		/* Daily swing, and an upset of about 40 min every 7 h. */
		double load = 0.85 + 0.12 * sin(2.0 * M_PI * h / 24.0);
		double up = fmod(h, 7.0);
		if (up > 5.0 && up < 5.7)
			load *= 1.0 + 0.35 * sin(M_PI * (up - 5.0) / 0.7);
		double tg = 24.0 * load + noise(0.2);
		double tl = 40.0 * (0.9 + 0.1 * load) + noise(0.3);
		double tdp = 235.0 * load * load + noise(2.0);
		double tp = 0.6 + noise(0.005);
		double pg = 2700.0 * load + noise(15.0);
		double pl = 30.0 * (0.9 + 0.1 * load) + noise(0.2);
		double pdp = 40.0 * load * load * (load > 1.1 ? 1.0 + 3.0 * (load - 1.1) : 1.0) +
			     noise(0.2);
		int y, mo, d;
		civil(t / 86400, &y, &mo, &d);
		int s = (int)(t % 86400);
		printf("%04d-%02d-%02dT%02d:%02d:%02dZ,%.3f,%.3f,%.2f,%.4f,%.1f,%.3f,%.3f\n", y, mo,
		       d, s / 3600, s / 60 % 60, s % 60, tg, tl, tdp, tp, pg, pl, pdp);
	}
	return fflush(stdout) != 0;
}

/*
 * softsense.c - see softsense.h.
 */
#include "softsense.h"

#include <assert.h>
#include <math.h>
#include <string.h>

#include "ewma.h"

/* RLS covariance is re-inflated only while its trace stays below this:
 * without excitation, forgetting would otherwise grow P without bound. */
#define RLS_TRACE_MAX 1e4
/* Bounds of the model's DP exponent used to invert the relation. */
#define DP_EXPONENT_MIN 0.5
#define DP_EXPONENT_MAX 3.0

void softsense_cfg_defaults(struct softsense_cfg *c)
{
	assert(c != NULL);
	c->dp_factor = 1.0;
	c->steady_window_s = SOFTSENSE_STEADY_WINDOW_DEFAULT_S;
	c->steady_load_band = SOFTSENSE_STEADY_BAND_DEFAULT;
	c->normal_dp_sigmas = SOFTSENSE_NORMAL_SIGMAS_DEFAULT;
}

void softsense_init(struct softsense *s, const struct softsense_cfg *c)
{
	assert(s != NULL);
	memset(s, 0, sizeof(*s));
	if (c != NULL)
		s->cfg = *c;
	else
		softsense_cfg_defaults(&s->cfg);
	s->corr = fmin(SOFTSENSE_CORR_MAX, fmax(SOFTSENSE_CORR_MIN, s->cfg.dp_factor));
	s->p[0][0] = s->p[1][1] = 1e3;
	s->theta[1] = 2.0; /* prior: turbulent DP ~ F^2 */
	s->slope_normal = NAN;
	s->cv_base = NAN;
	s->resid = NAN;
	s->load_ratio_ln = NAN;
	s->w_dt_s = NAN;
}

double softsense_sigma(const struct softsense *s)
{
	assert(s != NULL);
	/* The short-term scatter of DP / (corr model DP) is the noise baseline
	 * (a coefficient of variation is, for small values, the standard
	 * deviation of the logarithm). */
	return isfinite(s->cv_base) ? fmax(SOFTSENSE_SIGMA_MIN, s->cv_base) : SOFTSENSE_SIGMA_PRIOR;
}

/* The weights of softsense.w, in order. */
enum {
	W_STEADY, W_NOISE_BASE, W_INV, W_DP_LOAD, W_WARMUP, W_CORR, W_SLOPE_LAMBDA, W_COUNT
};
_Static_assert(W_COUNT <= sizeof(((struct softsense *)0)->w) / sizeof(double),
	       "softsense.w holds every weight");

/* s->w at step length dt_s: ewma_weight per time constant, and the RLS
 * forgetting factor exp(-dt/tau) (dt below zero counts as zero). */
static void weights_at(struct softsense *s, double dt_s)
{
	if (dt_s == s->w_dt_s)
		return;
	s->w[W_STEADY] = ewma_weight(dt_s, s->cfg.steady_window_s);
	s->w[W_NOISE_BASE] = ewma_weight(dt_s, SOFTSENSE_NOISE_BASE_TAU_S);
	s->w[W_INV] = ewma_weight(dt_s, SOFTSENSE_INV_TAU_S);
	s->w[W_DP_LOAD] = ewma_weight(dt_s, SOFTSENSE_DP_LOAD_TAU_S);
	s->w[W_WARMUP] = ewma_weight(dt_s, SOFTSENSE_WARMUP_TAU_S);
	s->w[W_CORR] = ewma_weight(dt_s, SOFTSENSE_CORR_TAU_S);
	s->w[W_SLOPE_LAMBDA] = exp(-(dt_s > 0.0 ? dt_s : 0.0) / SOFTSENSE_SLOPE_TAU_S);
	s->w_dt_s = dt_s;
}

static bool gas_steady(struct softsense *s, double gas_kgs)
{
	if (!isfinite(gas_kgs))
		return false;
	if (!s->started) {
		s->g_mean = gas_kgs;
		s->g_sq = gas_kgs * gas_kgs;
		return false;
	}
	double band = s->cfg.steady_load_band;
	double a = s->w[W_STEADY];
	s->g_mean += a * (gas_kgs - s->g_mean);
	s->g_sq += a * (gas_kgs * gas_kgs - s->g_sq);
	double var = fmax(0.0, s->g_sq - s->g_mean * s->g_mean);
	return s->g_mean > 0.0 && sqrt(var) / s->g_mean < band &&
	       fabs(gas_kgs - s->g_mean) / s->g_mean < band;
}

static double slope_step(struct softsense *s, double f, double dp)
{
	if (!(f > 0.0) || !(dp > 0.0) || !isfinite(f) || !isfinite(dp))
		return NAN;
	double lambda = s->w[W_SLOPE_LAMBDA];
	double x = log(f), y = log(dp);
	double phi[2] = {1.0, x};
	double pphi[2] = {s->p[0][0] * phi[0] + s->p[0][1] * phi[1],
			  s->p[1][0] * phi[0] + s->p[1][1] * phi[1]};
	double denom = lambda + phi[0] * pphi[0] + phi[1] * pphi[1];
	double k[2] = {pphi[0] / denom, pphi[1] / denom};
	double err = y - (s->theta[0] + s->theta[1] * x);
	s->theta[0] += k[0] * err;
	s->theta[1] += k[1] * err;
	double trace = s->p[0][0] + s->p[1][1];
	double inflate = trace < RLS_TRACE_MAX ? 1.0 / lambda : 1.0;
	double np[2][2];
	for (int i = 0; i < 2; i++)
		for (int j = 0; j < 2; j++)
			np[i][j] = (s->p[i][j] - k[i] * pphi[j]) * inflate;
	memcpy(s->p, np, sizeof(np));
	/* Forgetting-weighted moments of x decide whether the slope is defined. */
	s->w_sum = lambda * s->w_sum + 1.0;
	double b = 1.0 / s->w_sum;
	s->x_mean += b * (x - s->x_mean);
	s->x_sq += b * (x * x - s->x_sq);
	double var = fmax(0.0, s->x_sq - s->x_mean * s->x_mean);
	return sqrt(var) >= SOFTSENSE_SLOPE_MIN_STD ? s->theta[1] : NAN;
}

/* The coefficient of variation of the last SOFTSENSE_NOISE_WINDOW ratios
 * (softsense.h). */
double softsense_window_cv(struct softsense *s, double ratio)
{
	assert(s != NULL);
	const unsigned n = SOFTSENSE_NOISE_WINDOW;
	if (!isfinite(ratio)) {
		s->ring_count = 0; /* a gap restarts the window */
		return NAN;
	}
	if (s->ring_count == 0) {
		s->noise_mean = 0.0;
		s->noise_m2 = 0.0;
	}
	if (s->ring_count < n) {
		/* Welford's update while the window fills */
		double d = ratio - s->noise_mean;
		s->noise_mean += d / (s->ring_count + 1);
		s->noise_m2 += d * (ratio - s->noise_mean);
	} else {
		/* the sliding form: the oldest value leaves as the new one comes */
		double old = s->ring[s->ring_pos];
		double mean0 = s->noise_mean;
		s->noise_mean += (ratio - old) / n;
		s->noise_m2 += (ratio - old) * (ratio - s->noise_mean + old - mean0);
	}
	s->ring[s->ring_pos] = ratio;
	s->ring_pos = (s->ring_pos + 1) % n;
	if (s->ring_count < n)
		s->ring_count++;
	if (s->ring_count < n)
		return NAN;
	if (s->ring_pos == 0) {
		/* Once a window, mean and squares afresh by two passes: what the
		 * running update gains and loses cannot build up rounding. */
		double sum = 0.0, sq = 0.0;
		for (unsigned i = 0; i < n; i++)
			sum += s->ring[i];
		s->noise_mean = sum / n;
		for (unsigned i = 0; i < n; i++)
			sq += (s->ring[i] - s->noise_mean) * (s->ring[i] - s->noise_mean);
		s->noise_m2 = sq;
	}
	if (!(s->noise_mean > 0.0))
		return NAN;
	return sqrt(fmax(0.0, s->noise_m2) / (n - 1)) / s->noise_mean;
}

/* ratio: DP over its learned relation (or the DP itself without a model). */
static double noise_step(struct softsense *s, double ratio, bool learn)
{
	double cv = softsense_window_cv(s, ratio);
	if (isnan(cv))
		return NAN;
	if (learn) {
		if (isnan(s->cv_base))
			s->cv_base = cv;
		else
			s->cv_base += s->w[W_NOISE_BASE] * (cv - s->cv_base);
	}
	return s->cv_base > 0.0 ? cv / s->cv_base : NAN;
}

static double inventory_step(struct softsense *s, const struct softsense_input *in, bool learn,
			     double dt_s)
{
	if (!isfinite(in->level_m) || !isfinite(in->liquid_in_kgs) ||
	    !isfinite(in->liquid_out_kgs) || !(in->rho_l_kgm3 > 0.0) || !(in->sump_area_m2 > 0.0))
		return NAN;
	double q = (in->liquid_in_kgs - in->liquid_out_kgs) / in->rho_l_kgm3;
	if (!s->inv_started) {
		s->inv_started = true;
		s->level0_m = in->level_m;
		s->inventory_m3 = 0.0;
	} else {
		if (learn)
			s->imbalance_m3s += s->w[W_INV] *
					    (q - s->imbalance_m3s);
		s->inventory_m3 += (q - s->imbalance_m3s) * dt_s;
	}
	/* What came in and did not leave, less what the sump gained, is in the section. */
	return s->inventory_m3 - in->sump_area_m2 * (in->level_m - s->level0_m);
}

/* The DP branch of flood_index, % (see softsense.h). The load ratio is
 * smoothed (first-order, SOFTSENSE_DP_LOAD_TAU_S) so that DP noise, which
 * grows near flood, does not make the index and its alarms chatter. */
static double dp_load_pct(struct softsense *s, const struct softsense_input *in)
{
	double expected = s->corr * in->dp_model_pa;
	if (!(in->dp_pa > 0.0) || !(expected > 0.0) || !(in->flood_pct >= 0.0)) {
		s->load_ratio_ln = NAN;
		return NAN;
	}
	double n = isfinite(in->dp_exponent) ? in->dp_exponent : 2.0;
	n = fmin(DP_EXPONENT_MAX, fmax(DP_EXPONENT_MIN, n));
	double x = log(in->dp_pa / expected) / n;
	if (isnan(s->load_ratio_ln))
		s->load_ratio_ln = x;
	else
		s->load_ratio_ln += s->w[W_DP_LOAD] * (x - s->load_ratio_ln);
	double pct = in->flood_pct * exp(s->load_ratio_ln);
	return fmin(SOFTSENSE_DP_LOAD_MAX_PCT, pct);
}

void softsense_step(struct softsense *s, const struct softsense_input *in, int64_t t_ms,
		    struct section_result *r)
{
	assert(s != NULL);
	assert(in != NULL);
	assert(r != NULL);
	double dt_s = s->started ? (double)(t_ms - s->last_t_ms) / 1000.0 : 0.0;
	if (dt_s < 0.0)
		dt_s = 0.0; /* time going backwards: use the sample, learn nothing */
	weights_at(s, dt_s);
	bool steady = gas_steady(s, in->gas_kgs);
	bool have_dp = in->dp_pa > 0.0 && in->dp_model_pa > 0.0 && !in->dp_saturated;
	double resid = have_dp ? log(in->dp_pa / (s->corr * in->dp_model_pa)) : NAN;
	bool warm = s->learned_s < SOFTSENSE_WARMUP_S;
	double band = warm ? log(SOFTSENSE_CORR_MAX / SOFTSENSE_CORR_MIN)
			   : s->cfg.normal_dp_sigmas * softsense_sigma(s);
	bool normal = in->normal && have_dp && fabs(resid) <= band;
	bool learn = normal && steady;
	if (learn) {
		double ratio = in->dp_pa / in->dp_model_pa;
		s->corr += s->w[warm ? W_WARMUP : W_CORR] * (ratio - s->corr);
		s->corr = fmin(SOFTSENSE_CORR_MAX, fmax(SOFTSENSE_CORR_MIN, s->corr));
		s->learned_s += dt_s;
	}
	s->steady = steady;
	s->normal = normal;
	s->learning = learn;
	s->resid = resid;
	s->dp_exponent = in->dp_exponent;
	r->v[RF_DP_CORRECTION] = isfinite(in->dp_model_pa) ? s->corr : NAN;
	double slope = slope_step(s, in->f_factor, in->dp_saturated ? NAN : in->dp_pa);
	if (normal && isfinite(slope)) {
		if (isnan(s->slope_normal))
			s->slope_normal = slope;
		else
			s->slope_normal += s->w[W_CORR] *
					   (slope - s->slope_normal);
	}
	r->v[RF_DP_SLOPE] = slope;
	double ratio = NAN;
	if (in->dp_pa > 0.0 && !in->dp_saturated)
		ratio = in->dp_model_pa > 0.0 ? in->dp_pa / (s->corr * in->dp_model_pa) : in->dp_pa;
	/* Without a model DP, "normal" is the inputs and a steady load. The
	 * baselines wait for half the warm-up (the noise: a correction still
	 * moving would read as noise) or all of it (the meters' imbalance). */
	bool plain = in->normal && steady && !in->dp_saturated;
	if (plain)
		s->plain_s += dt_s;
	bool model = in->dp_model_pa > 0.0;
	double settled_s = model ? s->learned_s : s->plain_s;
	bool base_learn = model ? learn : plain;
	r->v[RF_DP_NOISE_RATIO] = noise_step(s, ratio, base_learn &&
					     settled_s >= 0.5 * SOFTSENSE_WARMUP_S);
	r->v[RF_INVENTORY_M3] = inventory_step(s, in, base_learn &&
					       settled_s >= SOFTSENSE_WARMUP_S, dt_s);
	r->v[RF_DP_LOAD_PCT] = dp_load_pct(s, in);
	s->started = true;
	s->last_t_ms = t_ms;
}

/*
 * ewma.h - the weight of one step of a first-order lag (an exponentially
 * weighted moving average): the tag filter and the soft sensors share it.
 */
#ifndef EWMA_H
#define EWMA_H

#include <math.h>

/* 1 - exp(-dt/tau): how far a lag of time constant tau_s moves towards a
 * new value in dt_s seconds; 0 for a step of no length (or backwards). */
static inline double ewma_weight(double dt_s, double tau_s)
{
	return dt_s > 0.0 ? 1.0 - exp(-dt_s / tau_s) : 0.0;
}

#endif

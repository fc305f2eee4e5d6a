/*
 * report_window.c - the operating window of a section: gas load against the
 * liquid load (or the level, for a column without liquid through-flow), in
 * the tags' own units, with the model's flood limit, the weep limit (trays)
 * and the calibrated limit computed at the recorded properties, and the
 * recorded trajectory on it: one dot per time bucket (its last values),
 * coloured from dark blue (start) to yellow (end), ringed red while an alarm
 * of the section was active. It is the picture an engineer otherwise draws by
 * hand from the design sheet and the historian.
 */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "report.h"
#include "report_int.h"

#define WIN_W 1160.0
#define WIN_X0 72.0
#define WIN_X1 760.0
#define WIN_Y0 34.0
#define WIN_Y1 394.0
#define WIN_H 440.0

struct win_frame {
	double xlo, xhi, ylo, yhi;
	double xstep, ystep;
};

/* hi rounded up to a 1-2-5 step giving about five intervals from 0 (common
 * practice for chart axes); returns the step. */
static double nice_hi(double *hi)
{
	const double raw = *hi / 5.0;
	const double mag = pow(10.0, floor(log10(raw)));
	const double norm = raw / mag;
	const double s = (norm <= 1.0 ? 1.0 : norm <= 2.0 ? 2.0 : norm <= 5.0 ? 5.0 : 10.0) * mag;
	*hi = ceil(*hi / s - 1e-9) * s;
	return s;
}

static double wx(const struct win_frame *w, double x)
{
	double u = (x - w->xlo) / (w->xhi - w->xlo);
	return WIN_X0 + fmin(fmax(u, 0.0), 1.0) * (WIN_X1 - WIN_X0);
}

static double wy(const struct win_frame *w, double y)
{
	double u = (y - w->ylo) / (w->yhi - w->ylo);
	return WIN_Y1 - fmin(fmax(u, 0.0), 1.0) * (WIN_Y1 - WIN_Y0);
}

/* A colour ramp through five stops (dark blue, blue, teal, green, yellow),
 * for time: readable on white and in greyscale print (dark to light). */
static void ramp(double u, char *css, size_t size)
{
	static const double stop[5][3] = {
		{37, 52, 148}, {44, 127, 184}, {65, 182, 196}, {127, 205, 118}, {237, 207, 40},
	};
	u = fmin(fmax(u, 0.0), 1.0) * 4.0;
	int i = (int)floor(u);
	if (i > 3)
		i = 3;
	double f = u - (double)i, c[3];
	for (int j = 0; j < 3; j++)
		c[j] = stop[i][j] + f * (stop[i + 1][j] - stop[i][j]);
	snprintf(css, size, "#%02x%02x%02x", (unsigned)lround(c[0]), (unsigned)lround(c[1]),
		 (unsigned)lround(c[2]));
}

static bool bucket_in_alarm(const struct report *rp, unsigned k, int64_t t_ms)
{
	for (unsigned p = 0; p < SHADE_KINDS; p++) {
		const struct report_period *pr = periods_of(rp, k, p);
		for (unsigned i = 0; i < rp->period_count[k][p]; i++)
			if (t_ms >= pr[i].start_ms && t_ms <= pr[i].end_ms)
				return true;
	}
	return false;
}

/* The ranges: the trajectory and the limits inside it, from zero. */
static bool window_range(const struct report *rp, unsigned k, const struct report_window *w,
			 struct win_frame *fr)
{
	double xhi = 0.0, yhi = 0.0;
	bool any = false;
	for (size_t b = 0; b < rp->bucket_count; b++) {
		const struct report_cell *cx = &rp->cells[cell_at(k, REPORT_SERIES_LOAD_X, b)];
		const struct report_cell *cy = &rp->cells[cell_at(k, REPORT_SERIES_LOAD_Y, b)];
		if (cx->finite_count == 0 || cy->finite_count == 0)
			continue;
		any = true;
		xhi = fmax(xhi, cx->last);
		yhi = fmax(yhi, cy->last);
	}
	/* the flood limit is shown when within five times the recorded gas load */
	const double ydata = yhi;
	for (unsigned i = 0; i < REPORT_WINDOW_POINTS; i++) {
		xhi = fmax(xhi, w->x[i]);
		if (isfinite(w->y_flood[i]) && w->y_flood[i] < 5.0 * ydata)
			yhi = fmax(yhi, w->y_flood[i]);
	}
	fr->xlo = 0.0;
	fr->ylo = 0.0;
	fr->xhi = xhi > 0.0 ? xhi : 1.0;
	fr->yhi = yhi > 0.0 ? yhi * 1.1 : 1.0;
	fr->xstep = nice_hi(&fr->xhi);
	fr->ystep = nice_hi(&fr->yhi);
	return any;
}

static void put_num(FILE *f, double v)
{
	report_html_put_fixed(f, v, 1);
}

static void write_limit(FILE *f, const struct win_frame *fr, const struct report_window *w,
			const double *y, const char *cls)
{
	bool pen = false;
	fprintf(f, "<path class=\"%s\" d=\"", cls);
	for (unsigned i = 0; i < REPORT_WINDOW_POINTS; i++) {
		if (!isfinite(y[i]) || !isfinite(w->x[i]) || y[i] > fr->yhi * 1.5) {
			pen = false;
			continue;
		}
		fputs(pen ? "L" : "M", f);
		put_num(f, wx(fr, w->x[i]));
		fputc(',', f);
		put_num(f, wy(fr, y[i]));
		pen = true;
	}
	fputs("\"/>\n", f);
}

static void write_axes(FILE *f, const struct report *rp, unsigned k, const struct win_frame *fr)
{
	const struct report_section *sec = &rp->layout.sections[k];
	for (int i = 0; i <= 12 && fr->xstep * i <= fr->xhi + 1e-9 * fr->xstep; i++) {
		const double xv = fr->xstep * i, x = wx(fr, xv);
		fputs("<line class=\"grid\" x1=\"", f);
		put_num(f, x);
		fputs("\" x2=\"", f);
		put_num(f, x);
		fprintf(f, "\" y1=\"%g\" y2=\"%g\"/>\n<text text-anchor=\"middle\" x=\"", WIN_Y0,
			WIN_Y1);
		put_num(f, x);
		fprintf(f, "\" y=\"%g\">", WIN_Y1 + 15.0);
		report_html_put_fixed(f, xv, report_html_auto_decimals(fr->xstep));
		fputs("</text>\n", f);
	}
	for (int i = 0; i <= 12 && fr->ystep * i <= fr->yhi + 1e-9 * fr->ystep; i++) {
		const double yv = fr->ystep * i, y = wy(fr, yv);
		fprintf(f, "<line class=\"grid\" x1=\"%g\" x2=\"%g\" y1=\"", WIN_X0, WIN_X1);
		put_num(f, y);
		fputs("\" y2=\"", f);
		put_num(f, y);
		fputs("\"/>\n<text text-anchor=\"end\" x=\"", f);
		put_num(f, WIN_X0 - 6.0);
		fputs("\" y=\"", f);
		put_num(f, y + 3.5);
		fputs("\">", f);
		report_html_put_fixed(f, yv, report_html_auto_decimals(fr->ystep));
		fputs("</text>\n", f);
	}
	fprintf(f, "<text text-anchor=\"middle\" x=\"%g\" y=\"%g\">", (WIN_X0 + WIN_X1) / 2,
		WIN_Y1 + 32.0);
	report_html_put_escaped(f, sec->load_x_what);
	fputs(" ", f);
	report_html_put_escaped(f, sec->load_x_tag);
	fputs(", ", f);
	report_html_put_escaped(f, sec->load_x_unit);
	fprintf(f, "</text>\n<text text-anchor=\"middle\" transform=\"translate(16,%g) "
		   "rotate(-90)\">gas flow ", (WIN_Y0 + WIN_Y1) / 2);
	report_html_put_escaped(f, sec->load_y_tag);
	fputs(", ", f);
	report_html_put_escaped(f, sec->load_y_unit);
	fprintf(f, "</text>\n<rect class=\"axis\" x=\"%g\" y=\"%g\" width=\"%g\" height=\"%g\"/>\n",
		WIN_X0, WIN_Y0, WIN_X1 - WIN_X0, WIN_Y1 - WIN_Y0);
}

static void write_trajectory(FILE *f, const struct report *rp, unsigned k,
			     const struct win_frame *fr)
{
	const double t0 = (double)rp->t_min_ms, span = fmax((double)(rp->t_max_ms - rp->t_min_ms), 1.0);
	for (size_t b = 0; b < rp->bucket_count; b++) {
		const struct report_slot *sl = &rp->slots[b];
		const struct report_cell *cx = &rp->cells[cell_at(k, REPORT_SERIES_LOAD_X, b)];
		const struct report_cell *cy = &rp->cells[cell_at(k, REPORT_SERIES_LOAD_Y, b)];
		if (sl->row_count == 0 || cx->finite_count == 0 || cy->finite_count == 0)
			continue;
		char css[16];
		ramp(((double)sl->t_last_ms - t0) / span, css, sizeof css);
		const bool alarm = bucket_in_alarm(rp, k, sl->t_last_ms);
		fprintf(f, "<circle class=\"%s\" r=\"%s\" fill=\"%s\" cx=\"", alarm ? "tra" : "tr",
			alarm ? "3" : "2.2", css);
		put_num(f, wx(fr, cx->last));
		fputs("\" cy=\"", f);
		put_num(f, wy(fr, cy->last));
		fputs("\"/>\n", f);
	}
}

static void write_key(FILE *f, const struct report_window *w)
{
	double y = WIN_Y0 + 6.0;
	const double x = WIN_X1 + 30.0;
	struct {
		bool on;
		const char *cls, *text;
	} keys[] = {
		{true, "lim", "flood limit (model, flood_pct 100 %)"},
		{w->has_cal, "limc", "calibrated flood limit (capacity_factor)"},
		{w->has_weep, "limw", "weep limit (weep_pct 100 %)"},
	};
	for (size_t i = 0; i < sizeof keys / sizeof keys[0]; i++) {
		if (!keys[i].on)
			continue;
		fprintf(f, "<path class=\"%s\" d=\"M%g,%gh28\"/><text x=\"%g\" y=\"%g\">%s</text>\n",
			keys[i].cls, x, y, x + 34.0, y + 4.0, keys[i].text);
		y += 20.0;
	}
	for (int i = 0; i <= 10; i++) {
		char css[16];
		ramp(i / 10.0, css, sizeof css);
		fprintf(f, "<rect x=\"%g\" y=\"%g\" width=\"12\" height=\"10\" fill=\"%s\"/>\n",
			x + 12.0 * i, y, css);
	}
	fprintf(f, "<text x=\"%g\" y=\"%g\">recorded trajectory: start \xe2\x86\x92 end</text>\n",
		x + 140.0, y + 9.0);
	y += 22.0;
	fprintf(f, "<circle class=\"tra\" r=\"3\" fill=\"#7fcd76\" cx=\"%g\" cy=\"%g\"/>"
		   "<text x=\"%g\" y=\"%g\">red ring: an alarm of the section active</text>\n",
		x + 6.0, y, x + 20.0, y + 4.0);
}

void report_window_write(FILE *f, const struct report *rp, unsigned k)
{
	if (rp->windows == NULL || !rp->windows[k].set)
		return;
	const struct report_window *w = &rp->windows[k];
	struct win_frame fr;
	bool any = window_range(rp, k, w, &fr);
	fprintf(f, "<svg class=\"chart window\" xmlns=\"http://www.w3.org/2000/svg\" "
		   "viewBox=\"0 0 %g %g\" role=\"img\" aria-label=\"Operating window\">\n",
		WIN_W, WIN_H);
	fprintf(f, "<text class=\"ttl\" x=\"%g\" y=\"18\">Operating window: gas load against ",
		WIN_X0);
	report_html_put_escaped(f, rp->layout.sections[k].load_x_what);
	fputs(", limits at the recorded properties of ", f);
	report_html_put_time(f, w->ref_t_ms);
	fputs("</text>\n", f);
	write_axes(f, rp, k, &fr);
	if (w->has_weep)
		write_limit(f, &fr, w, w->y_weep, "limw");
	write_limit(f, &fr, w, w->y_flood, "lim");
	if (w->has_cal)
		write_limit(f, &fr, w, w->y_cal, "limc");
	if (any)
		write_trajectory(f, rp, k, &fr);
	write_key(f, w);
	fputs("</svg>\n", f);
	if (w->note[0]) {
		fputs("<div class=\"facts\">", f);
		report_html_put_escaped(f, w->note);
		fputs("</div>\n", f);
	}
}

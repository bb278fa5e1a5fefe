/*
 * cref: a plain C/OpenMP reference of skyframe's star path, for measuring
 * the Go renderer against native code (see README.md). It renders the job
 * render.TestExportCRef exports -- the scale sky into a 4096x4096 fisheye
 * at 0.5 c -- with the same maps and the same three phases:
 *
 *   1. transform, in chunks of 8192 stars: unit direction, exact
 *      aberration and Doppler factor D, photometry at T' = D*T from the
 *      exported table (linear interpolation), V' and the cull, the
 *      equidistant fisheye, XYZ -> linear sRGB with gamut mapping, a
 *      32-byte record per drawn star;
 *   2. a counting sort of the records into 128x128-pixel tiles (a record
 *      whose window crosses a tile edge goes into each), in catalogue
 *      order;
 *   3. each tile adds its records, in order, straight into the float32
 *      frame: the (2k+1)^2 window of pixel-integrated Gaussian weights
 *      (erf at the pixel edges, from a table over the sub-pixel phase as
 *      in render.PSF), tails folded into the edge pixels.
 *
 * Usage: cref DIR RUNS [fresh|reused]
 * reads DIR/params.bin, table.bin, stars.bin (and go_frame.f32, to
 * compare), renders RUNS times and prints per-run wall and CPU seconds
 * per phase and their medians. "fresh" allocates a new frame every run
 * (calloc: first touch of new pages), "reused" clears one frame.
 */
#include <math.h>
#include <omp.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

enum {
	P_N, P_W, P_H, P_BX, P_BY, P_BZ, P_OMB, P_BETA, P_GAMMA, P_IG,
	P_FX, P_FY, P_FZ, P_RX, P_RY, P_RZ, P_UX, P_UY, P_UZ,
	P_K, P_CX, P_CY, P_RFISH, P_MARGIN,
	P_LNSCALE, P_LIMIT, P_BEAMEXP, P_LNV0FLUX, P_MAGTOLN,
	P_M0, P_M1, P_M2, P_M3, P_M4, P_M5, P_M6, P_M7, P_M8,
	P_SIGMA, P_KHALF, P_T0, P_TH, P_TN, P_LUMR, P_LUMG, P_LUMB,
	P_COUNT
};

#define CHUNK 8192
#define TILE 128
#define MAXTAPS 112

typedef struct {
	double x, y;
	float rgb[3];
	float d;
} rec_t;

static double P[P_COUNT];
static double *tab; /* ln Y, ln V, x, y per node */
static int ntab;
static float *sx, *sy, *sz, *sv, *st;
static long nstars;
static int W, H, KH;

static void *readfile(const char *dir, const char *name, size_t *len) {
	char path[4096];
	snprintf(path, sizeof path, "%s/%s", dir, name);
	FILE *f = fopen(path, "rb");
	if (!f) return NULL;
	fseek(f, 0, SEEK_END);
	*len = (size_t)ftell(f);
	fseek(f, 0, SEEK_SET);
	void *b = malloc(*len);
	if (!b || fread(b, 1, *len, f) != *len) {
		fprintf(stderr, "cref: %s: short read\n", path);
		exit(2);
	}
	fclose(f);
	return b;
}

static double now(void) {
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return t.tv_sec + 1e-9 * t.tv_nsec;
}

static double cpu(void) {
	struct rusage u;
	getrusage(RUSAGE_SELF, &u);
	return u.ru_utime.tv_sec + 1e-6 * u.ru_utime.tv_usec + u.ru_stime.tv_sec + 1e-6 * u.ru_stime.tv_usec;
}

/* lookup interpolates the exported table at ln T. */
static inline void lookup(double lnT, double *lnY, double *lnV, double *x, double *y) {
	double s = (lnT - P[P_T0]) / P[P_TH];
	int i = (int)s;
	if (i < 0) i = 0;
	if (i > ntab - 2) i = ntab - 2;
	double t = s - i;
	const double *a = tab + 4 * i, *b = a + 4;
	*lnY = a[0] + t * (b[0] - a[0]);
	*lnV = a[1] + t * (b[1] - a[1]);
	*x = a[2] + t * (b[2] - a[2]);
	*y = a[3] + t * (b[3] - a[3]);
}

/* transform draws stars lo..hi-1 into out and returns how many. */
static int transform(long lo, long hi, rec_t *out) {
	const double bx = P[P_BX], by = P[P_BY], bz = P[P_BZ];
	const double omb = P[P_OMB], beta = P[P_BETA], gamma = P[P_GAMMA], ig = P[P_IG];
	const double w = W, h = H, margin = P[P_MARGIN], rf = P[P_RFISH];
	int k = 0;
	for (long i = lo; i < hi; i++) {
		double x = sx[i], y = sy[i], z = sz[i];
		double inv = 1 / sqrt(x * x + y * y + z * z);
		x *= inv, y *= inv, z *= inv;
		/* exact aberration, as camera.Boost */
		double qx = x + bx, qy = y + by, qz = z + bz;
		double sp = 0.5 * (qx * qx + qy * qy + qz * qz);
		double q = omb + beta * sp, iq = 1 / q;
		double par = (sp - omb) * iq, iD = iq * ig;
		double px = qx - sp * bx, py = qy - sp * by, pz = qz - sp * bz;
		double r = px * bx + py * by + pz * bz;
		px -= r * bx, py -= r * by, pz -= r * bz;
		double nx = par * bx + px * iD, ny = par * by + py * iD, nz = par * bz + pz * iD;
		double D = gamma * q;
		if (!(D > 0)) continue;
		/* photometry */
		double lnD = log(D), lnT0 = log((double)st[i]);
		double lnY0, lnV0, x0, y0, lnY, lnV, cx, cy;
		lookup(lnT0, &lnY0, &lnV0, &x0, &y0);
		lookup(lnT0 + lnD, &lnY, &lnV, &cx, &cy);
		double dlnW = P[P_BEAMEXP] * lnD, v = sv[i];
		double vObs = v - (dlnW + lnV - lnV0) / P[P_MAGTOLN];
		if (!(vObs <= P[P_LIMIT])) continue;
		double lnW = P[P_LNV0FLUX] - P[P_MAGTOLN] * v - lnV0 + dlnW;
		/* equidistant fisheye */
		double a = P[P_FX] * nx + P[P_FY] * ny + P[P_FZ] * nz;
		double b = P[P_RX] * nx + P[P_RY] * ny + P[P_RZ] * nz;
		double c = P[P_UX] * nx + P[P_UY] * ny + P[P_UZ] * nz;
		double s = sqrt(b * b + c * c), X, Y;
		if (s == 0) {
			if (!(a > 0)) continue;
			X = P[P_CX], Y = P[P_CY];
		} else {
			double rho = P[P_K] * atan2(s, a) / s;
			X = P[P_CX] + rho * b, Y = P[P_CY] - rho * c;
		}
		if (!(X > -margin && X < w + margin && Y > -margin && Y < h + margin)) continue;
		if ((X - w / 2) * (X - w / 2) + (Y - h / 2) * (Y - h / 2) > rf * rf) continue;
		/* colour */
		double Yl = exp(lnW + lnY + P[P_LNSCALE]), sc = Yl / cy;
		double Xl = cx * sc, Zl = (1 - cx - cy) * sc;
		double R = P[P_M0] * Xl + P[P_M1] * Yl + P[P_M2] * Zl;
		double G = P[P_M3] * Xl + P[P_M4] * Yl + P[P_M5] * Zl;
		double B = P[P_M6] * Xl + P[P_M7] * Yl + P[P_M8] * Zl;
		if (Yl > 0) { /* gamut map: desaturate toward grey of the same Y */
			double l = P[P_LUMR] * R + P[P_LUMG] * G + P[P_LUMB] * B;
			double dr = R - l, dg = G - l, db = B - l, f = 1;
			if (dr < 0 && Yl + dr < 0) f = fmin(f, Yl / -dr);
			if (dg < 0 && Yl + dg < 0) f = fmin(f, Yl / -dg);
			if (db < 0 && Yl + db < 0) f = fmin(f, Yl / -db);
			R = fmax(Yl + f * dr, 0), G = fmax(Yl + f * dg, 0), B = fmax(Yl + f * db, 0);
		} else {
			R = G = B = 0;
		}
		if (!isfinite(R) || !isfinite(G) || !isfinite(B)) continue;
		rec_t *o = &out[k++];
		o->x = X, o->y = Y;
		o->rgb[0] = (float)R, o->rgb[1] = (float)G, o->rgb[2] = (float)B;
		o->d = (float)D;
	}
	return k;
}

/*
 * The edge table, as render.PSF builds it: the Gaussian CDF at the
 * window's 2k interior pixel edges for phases+1 sub-pixel phases, and the
 * slope to the next phase, so a weight costs one multiply-add per edge.
 */
static int phases, nm;
static double *eval, *eslope;

static void edges(void) {
	double sigma = P[P_SIGMA];
	phases = (int)ceil(1 / (0.00365 * sigma));
	if (phases < 16) phases = 16;
	nm = 2 * KH;
	eval = malloc(sizeof(double) * (phases + 1) * nm);
	eslope = malloc(sizeof(double) * phases * nm);
	for (int j = 0; j <= phases; j++)
		for (int m = 0; m < nm; m++)
			eval[j * nm + m] = 0.5 * erf(((-KH + 1 + m) - (double)j / phases) / (sigma * sqrt(2.0)));
	for (int j = 0; j < phases; j++)
		for (int m = 0; m < nm; m++) eslope[j * nm + m] = eval[(j + 1) * nm + m] - eval[j * nm + m];
}

/* weights fills w with the window's 2k+1 weights at c; returns floor(c) - k. */
static inline int weights(double c, double *w) {
	double fl = floor(c);
	double s = (c - fl) * phases;
	int j = (int)s;
	if (j > phases - 1) j = phases - 1;
	double fr = s - j, prev = -0.5;
	const double *v = eval + j * nm, *sl = eslope + j * nm;
	for (int m = 0; m < nm; m++) {
		double e = v[m] + fr * sl[m];
		w[m] = e - prev;
		prev = e;
	}
	w[nm] = 0.5 - prev;
	return (int)fl - KH;
}

static inline int imax(int a, int b) { return a > b ? a : b; }
static inline int imin(int a, int b) { return a < b ? a : b; }

/* tiles of the window [floor(x)-k, floor(x)+k] clipped to [0, lim). */
static inline void trange(double x, int lim, int *t0, int *t1) {
	int p0 = imax((int)floor(x) - KH, 0), p1 = imin((int)floor(x) + KH, lim - 1);
	if (p0 > p1) { *t0 = 1, *t1 = 0; return; }
	*t0 = p0 / TILE, *t1 = p1 / TILE;
}

int main(int argc, char **argv) {
	if (argc < 3) {
		fprintf(stderr, "usage: cref DIR RUNS [fresh|reused]\n");
		return 2;
	}
	const char *dir = argv[1];
	int runs = atoi(argv[2]);
	int fresh = argc > 3 && strcmp(argv[3], "fresh") == 0;
	size_t len;
	double *pp = readfile(dir, "params.bin", &len);
	if (!pp || len != sizeof P) {
		fprintf(stderr, "cref: %s/params.bin: want %zu bytes\n", dir, sizeof P);
		return 2;
	}
	memcpy(P, pp, sizeof P);
	nstars = (long)P[P_N], W = (int)P[P_W], H = (int)P[P_H], KH = (int)P[P_KHALF];
	ntab = (int)P[P_TN];
	tab = readfile(dir, "table.bin", &len);
	if (!tab || len != (size_t)ntab * 4 * sizeof(double)) {
		fprintf(stderr, "cref: %s/table.bin: bad size\n", dir);
		return 2;
	}
	float *cols = readfile(dir, "stars.bin", &len);
	if (!cols || len != (size_t)nstars * 6 * sizeof(float)) {
		fprintf(stderr, "cref: %s/stars.bin: bad size\n", dir);
		return 2;
	}
	sx = cols, sy = cols + nstars, sz = cols + 2 * nstars;
	sv = cols + 4 * nstars, st = cols + 5 * nstars; /* column 3 (Dist) unused from the Sun */
	edges();

	long nch = (nstars + CHUNK - 1) / CHUNK;
	int tw = (W + TILE - 1) / TILE, th = (H + TILE - 1) / TILE, nt = tw * th;
	rec_t *recs = malloc(sizeof(rec_t) * nstars);
	int *cnt = malloc(sizeof(int) * nch);
	int32_t *off = malloc(sizeof(int32_t) * nt * nch);
	int32_t *start = malloc(sizeof(int32_t) * (nt + 1));
	rec_t *binned = NULL;
	size_t binnedCap = 0;
	float *frame = NULL;
	size_t npix = (size_t)W * H * 3;
	if (!fresh) frame = malloc(sizeof(float) * npix);
	double *tw_[5], *tc_[5];
	for (int p = 0; p < 5; p++) tw_[p] = malloc(sizeof(double) * runs), tc_[p] = malloc(sizeof(double) * runs);
	printf("cref: %ld stars, %dx%d, window %dx%d, %d threads, %s frame\n", nstars, W, H, 2 * KH + 1, 2 * KH + 1,
	       omp_get_max_threads(), fresh ? "fresh" : "reused");
	long drawn = 0;
	for (int run = 0; run < runs; run++) {
		double t0 = now(), c0 = cpu();
		if (fresh) {
			free(frame);
			frame = calloc(npix, sizeof(float));
		} else {
			memset(frame, 0, sizeof(float) * npix);
		}
		double t1 = now(), c1 = cpu();
		/* 1: transform */
#pragma omp parallel for schedule(dynamic)
		for (long c = 0; c < nch; c++) {
			long lo = c * CHUNK, hi = lo + CHUNK < nstars ? lo + CHUNK : nstars;
			cnt[c] = transform(lo, hi, recs + lo);
		}
		double t2 = now(), c2 = cpu();
		/* 2: bin */
		memset(off, 0, sizeof(int32_t) * nt * nch);
#pragma omp parallel for schedule(dynamic)
		for (long c = 0; c < nch; c++) {
			int32_t *o = off + c * nt;
			for (long i = c * CHUNK; i < c * CHUNK + cnt[c]; i++) {
				int x0, x1, y0, y1;
				trange(recs[i].x, W, &x0, &x1);
				trange(recs[i].y, H, &y0, &y1);
				for (int ty = y0; ty <= y1; ty++)
					for (int tx = x0; tx <= x1; tx++) o[ty * tw + tx]++;
			}
		}
		int32_t run_ = 0;
		for (int t = 0; t < nt; t++) {
			start[t] = run_;
			for (long c = 0; c < nch; c++) {
				int32_t n = off[c * nt + t];
				off[c * nt + t] = run_;
				run_ += n;
			}
		}
		start[nt] = run_;
		if ((size_t)run_ > binnedCap) {
			free(binned);
			binnedCap = run_;
			binned = malloc(sizeof(rec_t) * binnedCap);
		}
#pragma omp parallel for schedule(dynamic)
		for (long c = 0; c < nch; c++) {
			int32_t *o = off + c * nt;
			for (long i = c * CHUNK; i < c * CHUNK + cnt[c]; i++) {
				int x0, x1, y0, y1;
				trange(recs[i].x, W, &x0, &x1);
				trange(recs[i].y, H, &y0, &y1);
				for (int ty = y0; ty <= y1; ty++)
					for (int tx = x0; tx <= x1; tx++) binned[o[ty * tw + tx]++] = recs[i];
			}
		}
		double t3 = now(), c3 = cpu();
		/* 3: add tiles */
#pragma omp parallel for schedule(dynamic)
		for (int t = 0; t < nt; t++) {
			int ox = (t % tw) * TILE, oy = (t / tw) * TILE;
			int ex = imin(ox + TILE, W), ey = imin(oy + TILE, H);
			double wx[MAXTAPS], wy[MAXTAPS];
			for (int32_t q = start[t]; q < start[t + 1]; q++) {
				const rec_t *r = &binned[q];
				int y0 = weights(r->y, wy), x0 = weights(r->x, wx), n = 2 * KH + 1;
				int j0 = imax(y0, oy), j1 = imin(y0 + n, ey);
				int i0 = imax(x0, ox), i1 = imin(x0 + n, ex);
				double R = r->rgb[0], G = r->rgb[1], B = r->rgb[2];
				for (int j = j0; j < j1; j++) {
					double wyj = wy[j - y0];
					float *px = frame + 3 * ((size_t)j * W + i0);
					for (int i = i0; i < i1; i++, px += 3) {
						double w = wx[i - x0] * wyj;
						px[0] += (float)(w * R);
						px[1] += (float)(w * G);
						px[2] += (float)(w * B);
					}
				}
			}
		}
		double t4 = now(), c4 = cpu();
		drawn = 0;
		for (long c = 0; c < nch; c++) drawn += cnt[c];
		tw_[0][run] = t4 - t0, tc_[0][run] = c4 - c0;
		tw_[1][run] = t1 - t0, tc_[1][run] = c1 - c0;
		tw_[2][run] = t2 - t1, tc_[2][run] = c2 - c1;
		tw_[3][run] = t3 - t2, tc_[3][run] = c3 - c2;
		tw_[4][run] = t4 - t3, tc_[4][run] = c4 - c3;
		printf("run %d: %.3f s wall, %.3f CPU-s (frame %.3f/%.3f, transform %.3f/%.3f, bin %.3f/%.3f, tiles %.3f/%.3f)\n",
		       run, tw_[0][run], tc_[0][run], tw_[1][run], tc_[1][run], tw_[2][run], tc_[2][run], tw_[3][run],
		       tc_[3][run], tw_[4][run], tc_[4][run]);
	}
	/* medians */
	const char *names[5] = {"total", "frame", "transform", "bin", "tiles"};
	for (int p = 0; p < 5; p++) {
		for (int a = 1; a < runs; a++)
			for (int b = a; b > 0 && tw_[p][b] < tw_[p][b - 1]; b--) {
				double s = tw_[p][b]; tw_[p][b] = tw_[p][b - 1]; tw_[p][b - 1] = s;
			}
		for (int a = 1; a < runs; a++)
			for (int b = a; b > 0 && tc_[p][b] < tc_[p][b - 1]; b--) {
				double s = tc_[p][b]; tc_[p][b] = tc_[p][b - 1]; tc_[p][b - 1] = s;
			}
		printf("median %-9s %.3f s wall, %.3f CPU-s\n", names[p], tw_[p][runs / 2], tc_[p][runs / 2]);
	}
	printf("drawn %ld, binned %d (%.1f %% duplicates)\n", drawn, start[nt], 100.0 * (start[nt] - drawn) / drawn);
	/* compare with Go's frame */
	float *gf = readfile(dir, "go_frame.f32", &len);
	if (gf && len == npix * sizeof(float)) {
		double sc[3] = {0}, sg[3] = {0}, maxv = 0, maxd = 0;
		for (size_t p = 0; p < npix; p++) {
			sc[p % 3] += frame[p], sg[p % 3] += gf[p];
			if (gf[p] > maxv) maxv = gf[p];
			double d = fabs((double)frame[p] - gf[p]);
			if (d > maxd) maxd = d;
		}
		for (int c = 0; c < 3; c++)
			printf("channel %d: total C %.9g, Go %.9g, relative difference %.2e\n", c, sc[c], sg[c], (sc[c] - sg[c]) / sg[c]);
		printf("largest pixel difference %.3g (%.2e of the brightest pixel, %.3g)\n", maxd, maxd / maxv, maxv);
	}
	return 0;
}

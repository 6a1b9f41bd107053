/*
 * The plain fused loop the pair check is measured against: for every
 * belief of the simplex grid at resolution K, the expected effort of every
 * grid report (n multiply-adds) and a running minimum. Quadratic-rule
 * efforts L(p, k) = sum_i (p_i - [i = k])^2, as in verify's benchmark.
 *
 * Build and time (not part of CI):
 *   gcc -O3 -march=native -o /tmp/fused verify/testdata/fused.c
 *   /tmp/fused 3 200
 *   /tmp/fused 4 40
 * A third argument "u" (n = 3 only) runs the loop unrolled by four
 * reports with one test per step, the shape of verify's kernel; "v" runs
 * the vectorised loop: one array per outcome, the sums of a block of
 * reports into a buffer, then the block's minimum (any n; build it with
 * -O3 -march=native -ffast-math so that gcc vectorises the minimum too):
 *   gcc -O3 -march=native -ffast-math -o /tmp/fusedv verify/testdata/fused.c
 *   /tmp/fusedv 3 400 v
 * Variants measured beside it: plain -O3 (no -march=native), and
 * -O3 -march=native -ffast-math, which lets gcc vectorise the minimum.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static int n, K, G;
static double *pts;

static void rec(int pos, int left, int *comp) {
	if (pos == n - 1) {
		comp[pos] = left;
		for (int k = 0; k < n; k++) pts[G * n + k] = (double)comp[k] / K;
		G++;
		return;
	}
	for (int v = left; v >= 0; v--) {
		comp[pos] = v;
		rec(pos + 1, left - v, comp);
	}
}

/* BLOCK reports are summed into a buffer, then reduced: both loops are
 * straight-line and vectorise. */
#define BLOCK 512

static double vectorised(const double *rows) {
	double *soa = malloc(sizeof(double) * G * n);
	for (int j = 0; j < G; j++)
		for (int k = 0; k < n; k++) soa[k * G + j] = rows[j * n + k];
	double buf[BLOCK], total = 0;
	for (int i = 0; i < G; i++) {
		const double *q = pts + i * n;
		double best = INFINITY;
		if (n == 3) {
			/* one pass, no buffer: three arrays streamed together */
			const double *r0 = soa, *r1 = soa + G, *r2 = soa + 2 * G;
			double q0 = q[0], q1 = q[1], q2 = q[2];
			for (int j = 0; j < G; j++) {
				double v = q0 * r0[j] + q1 * r1[j] + q2 * r2[j];
				best = v < best ? v : best;
			}
			total += best;
			continue;
		}
		for (int j0 = 0; j0 < G; j0 += BLOCK) {
			int m = G - j0 < BLOCK ? G - j0 : BLOCK;
			const double *r0 = soa + j0;
			for (int j = 0; j < m; j++) buf[j] = q[0] * r0[j];
			for (int k = 1; k < n; k++) {
				const double *rk = soa + k * G + j0;
				double qk = q[k];
				for (int j = 0; j < m; j++) buf[j] += qk * rk[j];
			}
			for (int j = 0; j < m; j++) best = buf[j] < best ? buf[j] : best;
		}
		total += best;
	}
	free(soa);
	return total;
}

int main(int argc, char **argv) {
	n = argc > 1 ? atoi(argv[1]) : 3;
	K = argc > 2 ? atoi(argv[2]) : 200;
	double c = 1;
	for (int i = 1; i < n; i++) c = c * (K + i) / i;
	int cap = (int)(c + 0.5);
	pts = malloc(sizeof(double) * cap * n);
	double *rows = malloc(sizeof(double) * cap * n);
	int comp[16];
	rec(0, K, comp);
	for (int j = 0; j < G; j++) {
		double s2 = 0;
		for (int i = 0; i < n; i++) s2 += pts[j * n + i] * pts[j * n + i];
		for (int k = 0; k < n; k++) rows[j * n + k] = s2 - 2 * pts[j * n + k] + 1;
	}
	struct timespec t0, t1;
	clock_t c0 = clock();
	clock_gettime(CLOCK_MONOTONIC, &t0);
	double total = 0;
	int unrolled = argc > 3 && argv[3][0] == 'u';
	int vect = argc > 3 && argv[3][0] == 'v';
	if (vect) {
		total = vectorised(rows);
		goto done;
	}
	for (int i = 0; i < G; i++) {
		const double *q = pts + i * n;
		double best = INFINITY;
		int j = 0;
		if (unrolled && n == 3) {
			/* verify's kernel shape: four reports per step, one test. */
			double q0 = q[0], q1 = q[1], q2 = q[2];
			for (; j + 4 <= G; j += 4) {
				const double *r = rows + j * 3;
				double a = q0 * r[0] + q1 * r[1] + q2 * r[2];
				double b = q0 * r[3] + q1 * r[4] + q2 * r[5];
				double c = q0 * r[6] + q1 * r[7] + q2 * r[8];
				double d = q0 * r[9] + q1 * r[10] + q2 * r[11];
				if (a < best || b < best || c < best || d < best) {
					if (a < best) best = a;
					if (b < best) best = b;
					if (c < best) best = c;
					if (d < best) best = d;
				}
			}
		}
		for (; j < G; j++) {
			const double *r = rows + j * n;
			double s = 0;
			for (int k = 0; k < n; k++) s += q[k] * r[k];
			if (s < best) best = s;
		}
		total += best;
	}
done:
	clock_gettime(CLOCK_MONOTONIC, &t1);
	double cpu = (double)(clock() - c0) / CLOCKS_PER_SEC;
	double sec = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
	double pairs = (double)G * G;
	printf("%s n=%d K=%d points=%d pairs=%.0f wall=%.3fs cpu=%.3fs ns/pair=%.3f (wall) %.3f (cpu) checksum %g\n",
	       vect ? "vectorised" : unrolled ? "unrolled" : "plain", n, K, G, pairs, sec, cpu, 1e9 * sec / pairs, 1e9 * cpu / pairs, total);
	return 0;
}

/*
 * Hand-written C reference of one MPPI control step, for the throughput benchmark
 * (bench/src/suites/throughput.ts). It does the same work as the library's `mppi` preset of
 * @recede/mpc, in the same order and with the same floating-point expressions:
 *
 *   for each slice s of `slice` samples (noise from the slice's own stream):
 *     z ~ N(0, 1) (xoshiro128** + ziggurat, rng.h);  U = mu + sigma * z;  clip U to [lower, upper];
 *     roll out from x0, time-major: gather u_t into contiguous rows, C += c(x_t, u_t), x <- f(x, u);
 *     C += c_H(x_H); non-finite -> +inf
 *   rho = min C;  a_i = -(C_i - rho)/lambda;  w = exp(a - max a) / sum   (Williams et al., ICRA 2017)
 *   mu <- (1 - gamma) mu + gamma sum_i w_i U_i  (gamma = 1);  clip mu;  u = mu_0;
 *   shift mu by one step, fill the tail with the nominal (initial) plan.
 *
 * Models (parameters come from the input, written by bench/src/native.ts; the throughput suite
 * passes the values it gives bicycle() and cartPole() of @recede/problems):
 *   0 cart-pole: frictionless Florian (2007) equations, Barto-Sutton-Anderson (1983) parameters,
 *     one classical RK4 step; quadratic cost with wrapped angle + soft track-limit penalty;
 *   1 kinematic bicycle (4 states, Kong et al. 2015): one RK4 step with constant (a, delta);
 *     quadratic cost to a goal with wrapped heading + soft speed-limit penalty.
 *
 * Input (stdin, whitespace separated): model K H slice warmup steps phases; nparams params...;
 * x0[n]; mean0[H m]; std[H m]; lower[m]; upper[m]; lambda; nslices, then per slice 10 int32 words
 * (s0..s3 bits nbits a0..a3); ziggurat r, k[256], w[256], f[256].
 * Output (stdout, one JSON object): steps_per_s (wall clock), steps_per_cpu_s (process CPU time),
 * seconds, steps, the final plan and state; with phases = 1 also phase_seconds, the thread CPU
 * time of the timed steps spent in [normals, mu + sigma z, clip, rollout, weights + update + shift].
 *
 * Build: gcc -O2 -ffp-contract=off -o mppi mppi.c -lm
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "rng.h"

#define MAX_N 4
#define MAX_M 2
#define MAX_PARAMS 64

typedef struct {
  int model, n, m;
  double p[MAX_PARAMS];
} model_t;

static const double PI = 3.141592653589793;

/* Same as wrapAngle of @recede/problems: the representative of a in (-pi, pi]. */
static inline double wrap_angle(double a) {
  if (a > -PI && a <= PI) return a;
  const double two_pi = 2 * PI;
  double r = a - two_pi * floor((a + PI) / two_pi);
  if (r <= -PI) r += two_pi;
  if (r > PI) r -= two_pi;
  return r;
}

/* ---------------- cart-pole ----------------
 * params: mc mp l g dt q0 q1 q2 q3 r qf0 qf1 qf2 qf3 trackLimit trackWeight trackFlag */
static inline void cp_accel(const double *p, double th, double w, double F, double *xdd,
                            double *thdd) {
  /* constants folded as in cartPole() of @recede/problems (one division per call) */
  const double mc = p[0], mp = p[1], l = p[2], g = p[3];
  const double M = mc + mp;
  const double mpl = mp * l;
  const double invM = 1 / M;
  const double l43 = (4.0 / 3.0) * l;
  const double lmpM = (l * mp) / M;
  const double s = sin(th);
  const double c = cos(th);
  const double t = (g * s - c * (F + mpl * w * w * s) * invM) / (l43 - lmpM * c * c);
  *xdd = (F + mpl * (w * w * s - t * c)) * invM;
  *thdd = t;
}

static void cp_step(const double *p, double *x, const double *u, int count) {
  const double h = p[4];
  for (int k = 0; k < count; k++) {
    double *b = x + 4 * k;
    const double F = u[k];
    const double pos = b[0], v = b[1], th = b[2], w = b[3];
    double a0, a1;
    cp_accel(p, th, w, F, &a0, &a1);
    const double k1p = v, k1v = a0, k1t = w, k1w = a1;
    cp_accel(p, th + 0.5 * h * k1t, w + 0.5 * h * k1w, F, &a0, &a1);
    const double k2p = v + 0.5 * h * k1v, k2v = a0, k2t = w + 0.5 * h * k1w, k2w = a1;
    cp_accel(p, th + 0.5 * h * k2t, w + 0.5 * h * k2w, F, &a0, &a1);
    const double k3p = v + 0.5 * h * k2v, k3v = a0, k3t = w + 0.5 * h * k2w, k3w = a1;
    cp_accel(p, th + h * k3t, w + h * k3w, F, &a0, &a1);
    const double k4p = v + h * k3v, k4v = a0, k4t = w + h * k3w, k4w = a1;
    const double c = h / 6;
    b[0] = pos + c * (k1p + 2 * k2p + 2 * k3p + k4p);
    b[1] = v + c * (k1v + 2 * k2v + 2 * k3v + k4v);
    b[2] = th + c * (k1t + 2 * k2t + 2 * k3t + k4t);
    b[3] = w + c * (k1w + 2 * k2w + 2 * k3w + k4w);
  }
}

static inline double cp_penalty(const double *p, const double *x) {
  const double lim = p[14], weight = p[15], flag = p[16];
  double s = 0;
  const double v = x[0];
  if (v > lim) {
    const double e = v - lim;
    s += weight * e * e + flag;
  } else if (v < -lim) {
    const double e = -lim - v;
    s += weight * e * e + flag;
  }
  return s;
}

static inline double cp_quad(const double *w, const double *x) {
  double s = 0;
  for (int i = 0; i < 4; i++) {
    const double e = i == 2 ? wrap_angle(x[i] - 0.0) : x[i] - 0.0;
    s += w[i] * e * e;
  }
  return s;
}

static void cp_running(const double *p, const double *x, const double *u, int count, double *out) {
  for (int k = 0; k < count; k++) {
    const double e = u[k] - 0.0;
    double c = cp_quad(p + 5, x + 4 * k);
    c += p[9] * e * e;
    out[k] += c;
  }
  for (int k = 0; k < count; k++) out[k] += cp_penalty(p, x + 4 * k);
}

static void cp_terminal(const double *p, const double *x, int count, double *out) {
  for (int k = 0; k < count; k++) out[k] += cp_quad(p + 10, x + 4 * k);
  for (int k = 0; k < count; k++) out[k] += cp_penalty(p, x + 4 * k);
}

/* ---------------- kinematic bicycle ----------------
 * Kong et al. (IEEE IV 2015) kinematic bicycle, one RK4 step with constant (a, delta), as in
 * bicycle() of @recede/problems. state (x, y, psi, v), control (a, delta)
 * params: dt lf lr q0..q3 r0 r1 qf0..qf3 goal0..goal3 vmin vmax speedWeight speedFlag */
static void bk_step(const double *p, double *x, const double *u, int count) {
  const double h = p[0], lf = p[1], lr = p[2];
  const double L = lf + lr;
  const double kr = lr / L;
  for (int k = 0; k < count; k++) {
    double *b = x + 4 * k;
    const double acc = u[2 * k];
    const double td = tan(u[2 * k + 1]);
    /* same algebra as bicycle() of @recede/problems: beta = atan(kr tan delta) is never formed;
       cos beta = 1/sqrt(1 + tan^2 beta), sin beta = tan beta cos beta, and the stage angles
       psi + beta enter through the angle-addition formulas (sin and cos from libm) */
    const double ktd = kr * td;
    const double cbeta = 1 / sqrt(1 + ktd * ktd);
    const double sbeta = ktd * cbeta;
    const double yaw_per_speed = (td * cbeta) / L;
    const double px = b[0], py = b[1], psi = b[2], v = b[3];
    const double v2 = v + 0.5 * h * acc;
    const double v4 = v + h * acc;
    double sn = sin(psi), cs = cos(psi);
    const double k1x = v * (cs * cbeta - sn * sbeta);
    const double k1y = v * (sn * cbeta + cs * sbeta);
    const double k1p = v * yaw_per_speed;
    const double p2 = psi + 0.5 * h * k1p;
    sn = sin(p2);
    cs = cos(p2);
    const double k2x = v2 * (cs * cbeta - sn * sbeta);
    const double k2y = v2 * (sn * cbeta + cs * sbeta);
    const double k2p = v2 * yaw_per_speed;
    const double p3 = psi + 0.5 * h * k2p;
    sn = sin(p3);
    cs = cos(p3);
    const double k3x = v2 * (cs * cbeta - sn * sbeta);
    const double k3y = v2 * (sn * cbeta + cs * sbeta);
    const double k3p = k2p;
    const double p4 = psi + h * k3p;
    sn = sin(p4);
    cs = cos(p4);
    const double k4x = v4 * (cs * cbeta - sn * sbeta);
    const double k4y = v4 * (sn * cbeta + cs * sbeta);
    const double k4p = v4 * yaw_per_speed;
    const double c = h / 6;
    b[0] = px + c * (k1x + 2 * k2x + 2 * k3x + k4x);
    b[1] = py + c * (k1y + 2 * k2y + 2 * k3y + k4y);
    b[2] = psi + c * (k1p + 2 * k2p + 2 * k3p + k4p);
    b[3] = v4;
  }
}

static inline double bk_quad(const double *w, const double *goal, const double *x) {
  double s = 0;
  for (int i = 0; i < 4; i++) {
    const double e = i == 2 ? wrap_angle(x[i] - goal[i]) : x[i] - goal[i];
    s += w[i] * e * e;
  }
  return s;
}

static inline double bk_penalty(const double *p, const double *x) {
  const double lo = p[17], hi = p[18], weight = p[19], flag = p[20];
  double s = 0;
  const double v = x[3];
  if (v > hi) {
    const double e = v - hi;
    s += weight * e * e + flag;
  } else if (v < lo) {
    const double e = lo - v;
    s += weight * e * e + flag;
  }
  return s;
}

static void bk_running(const double *p, const double *x, const double *u, int count, double *out) {
  for (int k = 0; k < count; k++) {
    const double e0 = u[2 * k] - 0.0, e1 = u[2 * k + 1] - 0.0;
    /* one accumulation over state then control terms, as quadraticCost's diagonal fast path */
    double c = bk_quad(p + 3, p + 13, x + 4 * k);
    c += p[7] * e0 * e0;
    c += p[8] * e1 * e1;
    out[k] += c;
  }
  for (int k = 0; k < count; k++) out[k] += bk_penalty(p, x + 4 * k);
}

static void bk_terminal(const double *p, const double *x, int count, double *out) {
  for (int k = 0; k < count; k++) out[k] += bk_quad(p + 9, p + 13, x + 4 * k);
  for (int k = 0; k < count; k++) out[k] += bk_penalty(p, x + 4 * k);
}

/* ---------------- generic parts ---------------- */
static inline void model_step(const model_t *md, double *x, const double *u, int count) {
  if (md->model == 0) cp_step(md->p, x, u, count);
  else bk_step(md->p, x, u, count);
}
static inline void model_running(const model_t *md, const double *x, const double *u, int count,
                                 double *out) {
  if (md->model == 0) cp_running(md->p, x, u, count, out);
  else bk_running(md->p, x, u, count, out);
}
static inline void model_terminal(const model_t *md, const double *x, int count, double *out) {
  if (md->model == 0) cp_terminal(md->p, x, count, out);
  else bk_terminal(md->p, x, count, out);
}

typedef struct {
  model_t md;
  int K, H, slice, nslices;
  double lambda;
  double lower[MAX_M], upper[MAX_M];
  double *samples, *states, *controls, *costs, *scores, *weights, *mean, *std, *initial, *target;
  unsigned char *failed;
  stream_t *streams;
  ziggurat_t zig;
  int phases;          /* 1: accumulate the CPU time of each phase into phase_s */
  double phase_s[5];   /* normals, mu + sigma z, clip, rollout, weights + update + shift */
} mppi_t;

static double clock_s(clockid_t id) {
  struct timespec ts;
  clock_gettime(id, &ts);
  return ts.tv_sec + ts.tv_nsec * 1e-9;
}

static void rollout_slice(mppi_t *c, const double *x0, int first, int count) {
  const int n = c->md.n, m = c->md.m, H = c->H, hm = H * m;
  double *x = c->states + first * n;
  double *u = c->controls + first * m;
  double *costs = c->costs + first;
  for (int k = 0; k < count; k++) {
    costs[k] = 0;
    c->failed[first + k] = 0;
    for (int i = 0; i < n; i++) x[k * n + i] = x0[i];
  }
  for (int t = 0; t < H; t++) {
    for (int k = 0; k < count; k++) {
      const double *src = c->samples + (first + k) * hm + t * m;
      for (int j = 0; j < m; j++) u[k * m + j] = src[j];
    }
    model_running(&c->md, x, u, count, costs);
    model_step(&c->md, x, u, count);
    for (int k = 0; k < count; k++) {
      double z = 0;
      for (int i = 0; i < n; i++) z += x[k * n + i] * 0;
      if (z != 0 || z != z) c->failed[first + k] = 1;
    }
  }
  model_terminal(&c->md, x, count, costs);
  for (int k = 0; k < count; k++) {
    if (c->failed[first + k] || !(fabs(costs[k]) < INFINITY)) costs[k] = INFINITY;
  }
}

/* One control step from x0; writes the control to u_out. */
static void mppi_step(mppi_t *c, const double *x0, double *u_out) {
  const int m = c->md.m, H = c->H, K = c->K, len = H * m;
  double *buf = c->samples;
  for (int s = 0; s < c->nslices; s++) {
    const int from = s * c->slice;
    const int count = from + c->slice <= K ? c->slice : K - from;
    double *out = buf + (long)from * len;
    double t = c->phases ? clock_s(CLOCK_THREAD_CPUTIME_ID) : 0, t1 = 0;
    fill_normal(&c->streams[s], &c->zig, out, (long)count * len);
    if (c->phases) c->phase_s[0] += (t1 = clock_s(CLOCK_THREAD_CPUTIME_ID)) - t, t = t1;
    for (int k = 0; k < count; k++) {
      double *row = out + (long)k * len;
      for (int p = 0; p < len; p++) row[p] = c->mean[p] + c->std[p] * row[p];
    }
    if (c->phases) c->phase_s[1] += (t1 = clock_s(CLOCK_THREAD_CPUTIME_ID)) - t, t = t1;
    const long start = (long)from * len, end = (long)(from + count) * len;
    if (m == 1) {
      const double l = c->lower[0], h = c->upper[0];
      for (long p = start; p < end; p++) {
        const double v = buf[p];
        buf[p] = v < l ? l : v > h ? h : v;
      }
    } else {
      for (long p = start; p < end; p += m) {
        for (int j = 0; j < m; j++) {
          const double v = buf[p + j];
          buf[p + j] = v < c->lower[j] ? c->lower[j] : v > c->upper[j] ? c->upper[j] : v;
        }
      }
    }
    if (c->phases) c->phase_s[2] += (t1 = clock_s(CLOCK_THREAD_CPUTIME_ID)) - t, t = t1;
    rollout_slice(c, x0, from, count);
    if (c->phases) c->phase_s[3] += clock_s(CLOCK_THREAD_CPUTIME_ID) - t;
  }
  const double tw = c->phases ? clock_s(CLOCK_THREAD_CPUTIME_ID) : 0;
  /* exponential weights, min cost subtracted, normalized in the log domain */
  double rho = INFINITY;
  for (int i = 0; i < K; i++)
    if (c->costs[i] < rho) rho = c->costs[i];
  const double inv = 1 / c->lambda;
  for (int i = 0; i < K; i++) {
    const double v = c->costs[i];
    c->scores[i] = isfinite(v) ? -(v - rho) * inv : -INFINITY;
  }
  double amax = -INFINITY;
  for (int i = 0; i < K; i++)
    if (c->scores[i] > amax) amax = c->scores[i];
  double sum = 0;
  for (int i = 0; i < K; i++) {
    const double v = c->scores[i];
    const double e = v > -INFINITY ? exp(v - amax) : 0;
    c->weights[i] = e;
    sum += e;
  }
  const double winv = 1 / sum;
  for (int i = 0; i < K; i++) c->weights[i] *= winv;
  /* mean update (gamma = 1), clip, control, shift with nominal fill */
  double *tm = c->target;
  for (int p = 0; p < len; p++) tm[p] = 0;
  for (int k = 0; k < K; k++) {
    const double w = c->weights[k];
    if (w == 0) continue;
    const double *row = buf + (long)k * len;
    for (int p = 0; p < len; p++) tm[p] += w * row[p];
  }
  const double gamma = 1, g1 = 1 - gamma;
  for (int p = 0; p < len; p++) c->mean[p] = g1 * c->mean[p] + gamma * tm[p];
  for (int p = 0; p < len; p++) {
    const int j = p % m;
    if (c->mean[p] < c->lower[j]) c->mean[p] = c->lower[j];
    else if (c->mean[p] > c->upper[j]) c->mean[p] = c->upper[j];
  }
  for (int j = 0; j < m; j++) u_out[j] = c->mean[j];
  memmove(c->mean, c->mean + m, sizeof(double) * (size_t)((H - 1) * m));
  for (int j = 0; j < m; j++) c->mean[(H - 1) * m + j] = c->initial[(H - 1) * m + j];
  if (c->phases) c->phase_s[4] += clock_s(CLOCK_THREAD_CPUTIME_ID) - tw;
}

static double read_d(void) {
  double v;
  if (scanf("%lf", &v) != 1) {
    fprintf(stderr, "mppi: malformed input\n");
    exit(2);
  }
  return v;
}
static long read_l(void) {
  long v;
  if (scanf("%ld", &v) != 1) {
    fprintf(stderr, "mppi: malformed input\n");
    exit(2);
  }
  return v;
}
static void *alloc(size_t bytes) {
  void *p = calloc(1, bytes);
  if (!p) {
    fprintf(stderr, "mppi: out of memory\n");
    exit(3);
  }
  return p;
}

int main(void) {
  mppi_t c;
  memset(&c, 0, sizeof c);
  c.md.model = (int)read_l();
  c.K = (int)read_l();
  c.H = (int)read_l();
  c.slice = (int)read_l();
  const long warmup = read_l();
  const long steps = read_l();
  c.phases = (int)read_l();
  if (c.md.model == 0) {
    c.md.n = 4;
    c.md.m = 1;
  } else if (c.md.model == 1) {
    c.md.n = 4;
    c.md.m = 2;
  } else {
    fprintf(stderr, "mppi: unknown model %d\n", c.md.model);
    return 2;
  }
  const int n = c.md.n, m = c.md.m, len = c.H * m;
  const long np = read_l();
  if (np > MAX_PARAMS) return 2;
  for (long i = 0; i < np; i++) c.md.p[i] = read_d();
  double x[MAX_N], u[MAX_M];
  for (int i = 0; i < n; i++) x[i] = read_d();
  c.mean = alloc(sizeof(double) * len);
  c.std = alloc(sizeof(double) * len);
  c.initial = alloc(sizeof(double) * len);
  c.target = alloc(sizeof(double) * len);
  for (int p = 0; p < len; p++) c.mean[p] = c.initial[p] = read_d();
  for (int p = 0; p < len; p++) c.std[p] = read_d();
  for (int j = 0; j < m; j++) c.lower[j] = read_d();
  for (int j = 0; j < m; j++) c.upper[j] = read_d();
  c.lambda = read_d();
  c.nslices = (int)read_l();
  if (c.nslices != (c.K + c.slice - 1) / c.slice) {
    fprintf(stderr, "mppi: expected %d slice streams\n", (c.K + c.slice - 1) / c.slice);
    return 2;
  }
  c.streams = alloc(sizeof(stream_t) * c.nslices);
  for (int s = 0; s < c.nslices; s++) {
    stream_t *st = &c.streams[s];
    for (int q = 0; q < 4; q++) st->s[q] = (uint32_t)(int32_t)read_l();
    st->bits = (uint32_t)(int32_t)read_l();
    st->nbits = (int)read_l();
    for (int q = 0; q < 4; q++) st->a[q] = (uint32_t)(int32_t)read_l();
  }
  c.zig.r = read_d();
  for (int i = 0; i < ZIG_LAYERS; i++) c.zig.k[i] = (int32_t)read_l();
  for (int i = 0; i < ZIG_LAYERS; i++) c.zig.w[i] = read_d();
  for (int i = 0; i < ZIG_LAYERS; i++) c.zig.f[i] = read_d();
  c.samples = alloc(sizeof(double) * (size_t)c.K * len);
  c.states = alloc(sizeof(double) * (size_t)c.K * n);
  c.controls = alloc(sizeof(double) * (size_t)c.K * m);
  c.costs = alloc(sizeof(double) * c.K);
  c.scores = alloc(sizeof(double) * c.K);
  c.weights = alloc(sizeof(double) * c.K);
  c.failed = alloc((size_t)c.K);

  /* Closed loop on the model itself: act, then advance the state with the applied control. */
  for (long s = 0; s < warmup; s++) {
    mppi_step(&c, x, u);
    model_step(&c.md, x, u, 1);
  }
  memset(c.phase_s, 0, sizeof c.phase_s); /* phases of the timed steps only */
  const double t0 = clock_s(CLOCK_MONOTONIC);
  const double c0 = clock_s(CLOCK_PROCESS_CPUTIME_ID);
  for (long s = 0; s < steps; s++) {
    mppi_step(&c, x, u);
    model_step(&c.md, x, u, 1);
  }
  const double seconds = clock_s(CLOCK_MONOTONIC) - t0;
  const double cpu_seconds = clock_s(CLOCK_PROCESS_CPUTIME_ID) - c0;
  printf("{\"model\":%d,\"samples\":%d,\"horizon\":%d,\"warmup\":%ld,\"steps\":%ld,", c.md.model,
         c.K, c.H, warmup, steps);
  printf("\"seconds\":%.9g,\"steps_per_s\":%.9g,", seconds, seconds > 0 ? steps / seconds : 0.0);
  printf("\"cpu_seconds\":%.9g,\"steps_per_cpu_s\":%.9g,\"state\":[", cpu_seconds,
         cpu_seconds > 0 ? steps / cpu_seconds : 0.0);
  for (int i = 0; i < n; i++) printf(i ? ",%.17g" : "%.17g", x[i]);
  printf("],\"plan\":[");
  for (int p = 0; p < len; p++) printf(p ? ",%.17g" : "%.17g", c.mean[p]);
  printf("]");
  if (c.phases) {
    printf(",\"phase_seconds\":[");
    for (int q = 0; q < 5; q++) printf(q ? ",%.9g" : "%.9g", c.phase_s[q]);
    printf("]");
  }
  printf("}\n");
  return 0;
}

/*
 * Seeded normals for the native MPPI reference: the same generator and normal method as
 * packages/core/src/rng.ts, so the C and TypeScript steps draw the same numbers.
 *
 * xoshiro128** (Blackman & Vigna, "Scrambled Linear Pseudorandom Number Generators", ACM TOMS
 * 47(4), 2021); 256-layer ziggurat (Marsaglia & Tsang, J. Statistical Software 5(8), 2000) with the
 * layer index taken from a separate output (Doornik 2005), four indices per 32-bit word; the slow
 * path (wedge test, Marsaglia's 1964 tail method) draws from an auxiliary xoshiro128** generator.
 * The tables are read from the driver's input (written by bench/src/native.ts from the same
 * formulas as rng.ts), so they are bit-identical to the library's.
 */
#ifndef RECEDE_BENCH_RNG_H
#define RECEDE_BENCH_RNG_H

#include <math.h>
#include <stdint.h>

#define ZIG_LAYERS 256

typedef struct {
  uint32_t s[4];   /* main generator */
  uint32_t bits;   /* layer-index reservoir (low byte next) */
  int nbits;       /* index bytes left in bits (0-4) */
  uint32_t a[4];   /* auxiliary generator (slow path only) */
} stream_t;

typedef struct {
  int32_t k[ZIG_LAYERS];
  double w[ZIG_LAYERS];
  double f[ZIG_LAYERS];
  double r;
} ziggurat_t;

static inline uint32_t rotl32(uint32_t x, int k) { return (x << k) | (x >> (32 - k)); }

static inline uint32_t xoshiro_next(uint32_t *s) {
  const uint32_t r = rotl32(s[1] * 5u, 7) * 9u;
  const uint32_t t = s[1] << 9;
  s[2] ^= s[0];
  s[3] ^= s[1];
  s[1] ^= s[2];
  s[0] ^= s[3];
  s[2] ^= t;
  s[3] = rotl32(s[3], 11);
  return r;
}

/* (u + 1/2) 2^-32 in (0, 1) from one auxiliary output. */
static inline double aux_open01(stream_t *st) {
  return ((double)xoshiro_next(st->a) + 0.5) * 2.3283064365386963e-10;
}

static double normal_slow(stream_t *st, const ziggurat_t *z, int32_t h, int i) {
  const double inv_r = 1.0 / z->r;
  for (;;) {
    if (i == 0) {
      double xi, y;
      do {
        xi = -log(aux_open01(st)) * inv_r;
        y = -log(aux_open01(st));
      } while (y + y < xi * xi);
      return h > 0 ? z->r + xi : -z->r - xi;
    }
    const double x = h * z->w[i];
    const double fi = z->f[i];
    if (fi + aux_open01(st) * (z->f[i - 1] - fi) < exp(-0.5 * x * x)) return x;
    h = (int32_t)xoshiro_next(st->a);
    i = (int)(xoshiro_next(st->a) & 255u);
    const int32_t k = z->k[i];
    if (h < k && h > -k) return h * z->w[i];
  }
}

static void fill_normal(stream_t *st, const ziggurat_t *z, double *out, long count) {
  uint32_t s[4] = {st->s[0], st->s[1], st->s[2], st->s[3]};
  uint32_t bits = st->bits;
  int nbits = st->nbits;
  for (long j = 0; j < count; j++) {
    const int32_t h = (int32_t)xoshiro_next(s);
    if (nbits == 0) {
      bits = xoshiro_next(s);
      nbits = 4;
    }
    const int i = (int)(bits & 255u);
    bits >>= 8;
    nbits--;
    const int32_t k = z->k[i];
    out[j] = (h < k && h > -k) ? h * z->w[i] : normal_slow(st, z, h, i);
  }
  for (int q = 0; q < 4; q++) st->s[q] = s[q];
  st->bits = bits;
  st->nbits = nbits;
}

#endif

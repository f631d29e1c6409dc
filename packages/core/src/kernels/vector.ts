/**
 * Offset-based level-1 kernels on Float64Array. The caller owns every buffer; nothing allocates;
 * nothing validates (validate once at the API boundary). Each writes into its output and returns it.
 *
 * @module
 */

/** ⟨x, y⟩ = Σ_{i<n} x[ox+i]·y[oy+i]. */
export function dot(n: number, x: Float64Array, ox: number, y: Float64Array, oy: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += x[ox + i] * y[oy + i];
  return s;
}

/** y ← a·x + y over n entries. Returns `y`. */
export function axpy(
  n: number,
  a: number,
  x: Float64Array,
  ox: number,
  y: Float64Array,
  oy: number,
): Float64Array {
  for (let i = 0; i < n; i++) y[oy + i] += a * x[ox + i];
  return y;
}

/** x ← a·x over n entries. Returns `x`. */
export function scale(n: number, a: number, x: Float64Array, ox: number): Float64Array {
  for (let i = 0; i < n; i++) x[ox + i] *= a;
  return x;
}

/** y ← x over n entries. Returns `y`. */
export function copy(
  n: number,
  x: Float64Array,
  ox: number,
  y: Float64Array,
  oy: number,
): Float64Array {
  for (let i = 0; i < n; i++) y[oy + i] = x[ox + i];
  return y;
}

/** x ← c over n entries. Returns `x`. */
export function fill(n: number, c: number, x: Float64Array, ox: number): Float64Array {
  for (let i = 0; i < n; i++) x[ox + i] = c;
  return x;
}

/** ‖x‖₂ over n entries, computed with scaling so it neither overflows nor underflows. */
export function nrm2(n: number, x: Float64Array, ox: number): number {
  let amax = 0;
  for (let i = 0; i < n; i++) {
    const a = Math.abs(x[ox + i]);
    if (a > amax) amax = a;
  }
  if (amax === 0 || !Number.isFinite(amax)) return amax;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const r = x[ox + i] / amax;
    s += r * r;
  }
  return amax * Math.sqrt(s);
}

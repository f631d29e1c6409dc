/**
 * Internal: buffers that may live on shared memory (never re-exported).
 *
 * @module
 */

/** A Float64Array of `length` zeros, on a SharedArrayBuffer when `shared`. */
export function float64Buffer(length: number, shared: boolean): Float64Array {
  return shared ? new Float64Array(new SharedArrayBuffer(8 * length)) : new Float64Array(length);
}

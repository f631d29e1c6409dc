/**
 * The "JavaScript ceiling": a hand-written, specialized MPPI control step in TypeScript — the
 * line-by-line twin of the C reference bench/native/mppi.c (same models, cost, sampling, order of
 * operations and floating-point expressions), with the models inlined instead of called through
 * the generic Dynamics/CostModel interfaces. It measures how fast plain JavaScript can do this step
 * on current V8; the library's generic controller is compared against it and against the C.
 *
 * Normals come from @recede/core's streams (the library's own sampler), one stream per slice of
 * `sliceSize` samples, keyed `createStream(seed).fork(s)` exactly as in @recede/mpc.
 *
 * @module
 */
import { createStream, type Stream } from "@recede/core";
import type { NativeModel, NativeRunConfig } from "./native.js";

const PI = Math.PI;

/** Process CPU time in ms (µs resolution; not disturbed by other processes taking the CPU). */
function cpuMs(): number {
  const c = process.cpuUsage();
  return (c.user + c.system) / 1000;
}

/** acc[i] += now − since (CPU ms); returns now. */
function lap(acc: Float64Array, i: number, since: number): number {
  const now = cpuMs();
  acc[i] += now - since;
  return now;
}

function wrapAngle(a: number): number {
  if (a > -PI && a <= PI) return a;
  const twoPi = 2 * PI;
  let r = a - twoPi * Math.floor((a + PI) / twoPi);
  if (r <= -PI) r += twoPi;
  if (r > PI) r -= twoPi;
  return r;
}

/** A specialized MPPI step for one of the two benchmark models. */
export interface ReferenceStep {
  readonly stateSize: number;
  readonly controlSize: number;
  /** The plan μ (H·m), updated in place. */
  readonly mean: Float64Array;
  /** One control step from `x`; writes u into `u`. */
  step(x: Float64Array, u: Float64Array): void;
  /** Advance one state in place under control u (the plant = the model). */
  advance(x: Float64Array, u: Float64Array): void;
  /**
   * Start accumulating the CPU time (ms) of each phase of `step` into the returned array:
   * [normals, μ + σz, clip, rollout, weights + mean update + shift] (as mppi.c's phase_seconds).
   */
  timePhases(): Float64Array;
}

/** Build the hand-written step for `cfg` (the same configuration the C reads). */
export function referenceStep(cfg: NativeRunConfig): ReferenceStep {
  return new MppiReference(cfg);
}

class MppiReference implements ReferenceStep {
  readonly stateSize = 4;
  readonly controlSize: number;
  readonly mean: Float64Array;
  private readonly model: NativeModel;
  private readonly p: Float64Array;
  private readonly k: number;
  private readonly h: number;
  private readonly slice: number;
  private readonly streams: Stream[];
  private readonly std: Float64Array;
  private readonly initial: Float64Array;
  private readonly target: Float64Array;
  private readonly lower: Float64Array;
  private readonly upper: Float64Array;
  private readonly lambda: number;
  private readonly samples: Float64Array;
  private readonly states: Float64Array;
  private readonly controls: Float64Array;
  private readonly costs: Float64Array;
  private readonly scores: Float64Array;
  private readonly weights: Float64Array;
  private readonly failed: Uint8Array;
  private phases: Float64Array | null = null;

  constructor(cfg: NativeRunConfig) {
    this.model = cfg.model;
    const m = cfg.model === "cart-pole" ? 1 : 2;
    this.controlSize = m;
    this.p = Float64Array.from(cfg.params);
    this.k = cfg.samples;
    this.h = cfg.horizon;
    this.slice = cfg.sliceSize;
    const len = cfg.horizon * m;
    const root = createStream(cfg.seed);
    this.streams = [];
    for (let s = 0; s < Math.ceil(cfg.samples / cfg.sliceSize); s++)
      this.streams.push(root.fork(s));
    this.mean = Float64Array.from(cfg.mean);
    this.initial = Float64Array.from(cfg.mean);
    this.std = Float64Array.from(cfg.std);
    this.target = new Float64Array(len);
    this.lower = Float64Array.from(cfg.lower);
    this.upper = Float64Array.from(cfg.upper);
    this.lambda = cfg.temperature;
    this.samples = new Float64Array(cfg.samples * len);
    this.states = new Float64Array(cfg.samples * 4);
    this.controls = new Float64Array(cfg.samples * m);
    this.costs = new Float64Array(cfg.samples);
    this.scores = new Float64Array(cfg.samples);
    this.weights = new Float64Array(cfg.samples);
    this.failed = new Uint8Array(cfg.samples);
  }

  timePhases(): Float64Array {
    this.phases = new Float64Array(5);
    return this.phases;
  }

  advance(x: Float64Array, u: Float64Array): void {
    if (this.model === "cart-pole") cartPoleStep(this.p, x, 0, u, 0, 1);
    else bicycleStep(this.p, x, 0, u, 0, 1);
  }

  step(x0: Float64Array, uOut: Float64Array): void {
    const m = this.controlSize;
    const H = this.h;
    const K = this.k;
    const len = H * m;
    const buf = this.samples;
    const mean = this.mean;
    const std = this.std;
    const lower = this.lower;
    const upper = this.upper;
    const ph = this.phases;
    let t = 0;
    for (let s = 0; s < this.streams.length; s++) {
      const from = s * this.slice;
      const count = from + this.slice <= K ? this.slice : K - from;
      if (ph !== null) t = cpuMs();
      this.streams[s].fillNormal(buf, from * len, count * len);
      if (ph !== null) t = lap(ph, 0, t);
      for (let k = from; k < from + count; k++) {
        const base = k * len;
        for (let p = 0; p < len; p++) buf[base + p] = mean[p] + std[p] * buf[base + p];
      }
      if (ph !== null) t = lap(ph, 1, t);
      const start = from * len;
      const end = (from + count) * len;
      if (m === 1) {
        const l = lower[0];
        const h = upper[0];
        for (let p = start; p < end; p++) buf[p] = Math.min(Math.max(buf[p], l), h);
      } else {
        for (let p = start; p < end; p += m) {
          for (let j = 0; j < m; j++)
            buf[p + j] = Math.min(Math.max(buf[p + j], lower[j]), upper[j]);
        }
      }
      if (ph !== null) t = lap(ph, 2, t);
      this.rollout(x0, from, count);
      if (ph !== null) t = lap(ph, 3, t);
    }
    if (ph !== null) t = cpuMs();
    const costs = this.costs;
    const scores = this.scores;
    const w = this.weights;
    let rho = Number.POSITIVE_INFINITY;
    for (let i = 0; i < K; i++) if (costs[i] < rho) rho = costs[i];
    const inv = 1 / this.lambda;
    for (let i = 0; i < K; i++) {
      const v = costs[i];
      scores[i] = Number.isFinite(v) ? -(v - rho) * inv : Number.NEGATIVE_INFINITY;
    }
    let amax = Number.NEGATIVE_INFINITY;
    for (let i = 0; i < K; i++) if (scores[i] > amax) amax = scores[i];
    let sum = 0;
    for (let i = 0; i < K; i++) {
      const v = scores[i];
      const e = v > Number.NEGATIVE_INFINITY ? Math.exp(v - amax) : 0;
      w[i] = e;
      sum += e;
    }
    const winv = 1 / sum;
    for (let i = 0; i < K; i++) w[i] *= winv;
    const tm = this.target;
    tm.fill(0);
    for (let k = 0; k < K; k++) {
      const wk = w[k];
      if (wk === 0) continue;
      const base = k * len;
      for (let p = 0; p < len; p++) tm[p] += wk * buf[base + p];
    }
    const gamma = 1;
    const g1 = 1 - gamma;
    for (let p = 0; p < len; p++) mean[p] = g1 * mean[p] + gamma * tm[p];
    for (let p = 0; p < len; p++) {
      const j = p % m;
      if (mean[p] < lower[j]) mean[p] = lower[j];
      else if (mean[p] > upper[j]) mean[p] = upper[j];
    }
    for (let j = 0; j < m; j++) uOut[j] = mean[j];
    mean.copyWithin(0, m, H * m);
    for (let j = 0; j < m; j++) mean[(H - 1) * m + j] = this.initial[(H - 1) * m + j];
    if (ph !== null) lap(ph, 4, t);
  }

  private rollout(x0: Float64Array, first: number, count: number): void {
    const m = this.controlSize;
    const H = this.h;
    const hm = H * m;
    const x = this.states;
    const u = this.controls;
    const costs = this.costs;
    const failed = this.failed;
    const buf = this.samples;
    const p = this.p;
    const cart = this.model === "cart-pole";
    for (let k = first; k < first + count; k++) {
      costs[k] = 0;
      failed[k] = 0;
      for (let i = 0; i < 4; i++) x[k * 4 + i] = x0[i];
    }
    const xo = first * 4;
    const uo = first * m;
    for (let t = 0; t < H; t++) {
      for (let k = first; k < first + count; k++) {
        const src = k * hm + t * m;
        for (let j = 0; j < m; j++) u[k * m + j] = buf[src + j];
      }
      if (cart) {
        cartPoleRunning(p, x, xo, u, uo, count, costs, first);
        cartPoleStep(p, x, xo, u, uo, count);
      } else {
        bicycleRunning(p, x, xo, u, uo, count, costs, first);
        bicycleStep(p, x, xo, u, uo, count);
      }
      for (let k = first; k < first + count; k++) {
        let z = 0;
        for (let i = 0; i < 4; i++) z += x[k * 4 + i] * 0;
        if (z !== 0) failed[k] = 1;
      }
    }
    if (cart) cartPoleTerminal(p, x, xo, count, costs, first);
    else bicycleTerminal(p, x, xo, count, costs, first);
    for (let k = first; k < first + count; k++) {
      if (failed[k] === 1 || !(Math.abs(costs[k]) < Number.POSITIVE_INFINITY)) {
        costs[k] = Number.POSITIVE_INFINITY;
      }
    }
  }
}

// ---------------- cart-pole (params: mc mp l g dt q0..q3 r qf0..qf3 trackLimit trackWeight trackFlag)

function cartPoleStep(
  p: Float64Array,
  x: Float64Array,
  xo: number,
  u: Float64Array,
  uo: number,
  count: number,
): void {
  const mc = p[0];
  const mp = p[1];
  const l = p[2];
  const g = p[3];
  const h = p[4];
  const M = mc + mp;
  const mpl = mp * l;
  // constants folded as in cartPole() of @recede/problems (one division per evaluation)
  const invM = 1 / M;
  const l43 = (4 / 3) * l;
  const lmpM = (l * mp) / M;
  for (let k = 0; k < count; k++) {
    const b = xo + 4 * k;
    const F = u[uo + k];
    const pos = x[b];
    const v = x[b + 1];
    const th = x[b + 2];
    const w = x[b + 3];
    // Four evaluations of the Florian (2007) frictionless accelerations, written out.
    let s = Math.sin(th);
    let c = Math.cos(th);
    let t = (g * s - c * (F + mpl * w * w * s) * invM) / (l43 - lmpM * c * c);
    const k1p = v;
    const k1v = (F + mpl * (w * w * s - t * c)) * invM;
    const k1t = w;
    const k1w = t;
    let th2 = th + 0.5 * h * k1t;
    let w2 = w + 0.5 * h * k1w;
    s = Math.sin(th2);
    c = Math.cos(th2);
    t = (g * s - c * (F + mpl * w2 * w2 * s) * invM) / (l43 - lmpM * c * c);
    const k2p = v + 0.5 * h * k1v;
    const k2v = (F + mpl * (w2 * w2 * s - t * c)) * invM;
    const k2t = w + 0.5 * h * k1w;
    const k2w = t;
    th2 = th + 0.5 * h * k2t;
    w2 = w + 0.5 * h * k2w;
    s = Math.sin(th2);
    c = Math.cos(th2);
    t = (g * s - c * (F + mpl * w2 * w2 * s) * invM) / (l43 - lmpM * c * c);
    const k3p = v + 0.5 * h * k2v;
    const k3v = (F + mpl * (w2 * w2 * s - t * c)) * invM;
    const k3t = w + 0.5 * h * k2w;
    const k3w = t;
    th2 = th + h * k3t;
    w2 = w + h * k3w;
    s = Math.sin(th2);
    c = Math.cos(th2);
    t = (g * s - c * (F + mpl * w2 * w2 * s) * invM) / (l43 - lmpM * c * c);
    const k4p = v + h * k3v;
    const k4v = (F + mpl * (w2 * w2 * s - t * c)) * invM;
    const k4t = w + h * k3w;
    const k4w = t;
    const cc = h / 6;
    x[b] = pos + cc * (k1p + 2 * k2p + 2 * k3p + k4p);
    x[b + 1] = v + cc * (k1v + 2 * k2v + 2 * k3v + k4v);
    x[b + 2] = th + cc * (k1t + 2 * k2t + 2 * k3t + k4t);
    x[b + 3] = w + cc * (k1w + 2 * k2w + 2 * k3w + k4w);
  }
}

function cartPolePenalty(p: Float64Array, v: number): number {
  const lim = p[14];
  let s = 0;
  if (v > lim) {
    const e = v - lim;
    s += p[15] * e * e + p[16];
  } else if (v < -lim) {
    const e = -lim - v;
    s += p[15] * e * e + p[16];
  }
  return s;
}

function cartPoleRunning(
  p: Float64Array,
  x: Float64Array,
  xo: number,
  u: Float64Array,
  uo: number,
  count: number,
  out: Float64Array,
  oo: number,
): void {
  for (let k = 0; k < count; k++) {
    const b = xo + 4 * k;
    const e0 = x[b] - 0;
    const e1 = x[b + 1] - 0;
    const e2 = wrapAngle(x[b + 2] - 0);
    const e3 = x[b + 3] - 0;
    const q = 0 + p[5] * e0 * e0 + p[6] * e1 * e1 + p[7] * e2 * e2 + p[8] * e3 * e3;
    const eu = u[uo + k] - 0;
    out[oo + k] += q + p[9] * eu * eu;
  }
  for (let k = 0; k < count; k++) out[oo + k] += cartPolePenalty(p, x[xo + 4 * k]);
}

function cartPoleTerminal(
  p: Float64Array,
  x: Float64Array,
  xo: number,
  count: number,
  out: Float64Array,
  oo: number,
): void {
  for (let k = 0; k < count; k++) {
    const b = xo + 4 * k;
    const e0 = x[b] - 0;
    const e1 = x[b + 1] - 0;
    const e2 = wrapAngle(x[b + 2] - 0);
    const e3 = x[b + 3] - 0;
    out[oo + k] += 0 + p[10] * e0 * e0 + p[11] * e1 * e1 + p[12] * e2 * e2 + p[13] * e3 * e3;
  }
  for (let k = 0; k < count; k++) out[oo + k] += cartPolePenalty(p, x[xo + 4 * k]);
}

// ---------------- kinematic bicycle (Kong et al. 2015, RK4 with constant a, δ; as in @recede/problems)
// params: dt lf lr q0..q3 r0 r1 qf0..qf3 goal0..goal3 vmin vmax speedWeight speedFlag

function bicycleStep(
  p: Float64Array,
  x: Float64Array,
  xo: number,
  u: Float64Array,
  uo: number,
  count: number,
): void {
  const h = p[0];
  const L = p[1] + p[2];
  const kr = p[2] / L;
  for (let k = 0; k < count; k++) {
    const b = xo + 4 * k;
    const acc = u[uo + 2 * k];
    const td = Math.tan(u[uo + 2 * k + 1]);
    // the algebra of bicycle() in @recede/problems (no atan; angle addition), with Math.sin/cos
    const ktd = kr * td;
    const cbeta = 1 / Math.sqrt(1 + ktd * ktd);
    const sbeta = ktd * cbeta;
    const yawPerSpeed = (td * cbeta) / L;
    const px = x[b];
    const py = x[b + 1];
    const psi = x[b + 2];
    const v = x[b + 3];
    const v2 = v + 0.5 * h * acc;
    const v4 = v + h * acc;
    let sn = Math.sin(psi);
    let cs = Math.cos(psi);
    const k1x = v * (cs * cbeta - sn * sbeta);
    const k1y = v * (sn * cbeta + cs * sbeta);
    const k1p = v * yawPerSpeed;
    const p2 = psi + 0.5 * h * k1p;
    sn = Math.sin(p2);
    cs = Math.cos(p2);
    const k2x = v2 * (cs * cbeta - sn * sbeta);
    const k2y = v2 * (sn * cbeta + cs * sbeta);
    const k2p = v2 * yawPerSpeed;
    const p3 = psi + 0.5 * h * k2p;
    sn = Math.sin(p3);
    cs = Math.cos(p3);
    const k3x = v2 * (cs * cbeta - sn * sbeta);
    const k3y = v2 * (sn * cbeta + cs * sbeta);
    const k3p = k2p;
    const p4 = psi + h * k3p;
    sn = Math.sin(p4);
    cs = Math.cos(p4);
    const k4x = v4 * (cs * cbeta - sn * sbeta);
    const k4y = v4 * (sn * cbeta + cs * sbeta);
    const k4p = v4 * yawPerSpeed;
    const c = h / 6;
    x[b] = px + c * (k1x + 2 * k2x + 2 * k3x + k4x);
    x[b + 1] = py + c * (k1y + 2 * k2y + 2 * k3y + k4y);
    x[b + 2] = psi + c * (k1p + 2 * k2p + 2 * k3p + k4p);
    x[b + 3] = v4;
  }
}

function bicycleQuad(p: Float64Array, wo: number, x: Float64Array, b: number): number {
  const e0 = x[b] - p[13];
  const e1 = x[b + 1] - p[14];
  const e2 = wrapAngle(x[b + 2] - p[15]);
  const e3 = x[b + 3] - p[16];
  return 0 + p[wo] * e0 * e0 + p[wo + 1] * e1 * e1 + p[wo + 2] * e2 * e2 + p[wo + 3] * e3 * e3;
}

function bicyclePenalty(p: Float64Array, v: number): number {
  let s = 0;
  if (v > p[18]) {
    const e = v - p[18];
    s += p[19] * e * e + p[20];
  } else if (v < p[17]) {
    const e = p[17] - v;
    s += p[19] * e * e + p[20];
  }
  return s;
}

function bicycleRunning(
  p: Float64Array,
  x: Float64Array,
  xo: number,
  u: Float64Array,
  uo: number,
  count: number,
  out: Float64Array,
  oo: number,
): void {
  for (let k = 0; k < count; k++) {
    const e0 = u[uo + 2 * k] - 0;
    const e1 = u[uo + 2 * k + 1] - 0;
    // One accumulation over the state then the control terms (quadraticCost's diagonal path).
    out[oo + k] += bicycleQuad(p, 3, x, xo + 4 * k) + p[7] * e0 * e0 + p[8] * e1 * e1;
  }
  for (let k = 0; k < count; k++) out[oo + k] += bicyclePenalty(p, x[xo + 4 * k + 3]);
}

function bicycleTerminal(
  p: Float64Array,
  x: Float64Array,
  xo: number,
  count: number,
  out: Float64Array,
  oo: number,
): void {
  for (let k = 0; k < count; k++) out[oo + k] += bicycleQuad(p, 9, x, xo + 4 * k);
  for (let k = 0; k < count; k++) out[oo + k] += bicyclePenalty(p, x[xo + 4 * k + 3]);
}

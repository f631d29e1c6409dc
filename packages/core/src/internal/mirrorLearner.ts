/**
 * Internal: the engine shared by {@link mirrorDescent} and {@link dynamicMirrorDescent}. Factories
 * validate options; this class trusts them and validates only per-round feedback.
 *
 * One round: resolve g_t (from the gradient or the loss object) → η_t from the schedule →
 * x̃ = geometry.step(x_t, g_t, η_t) into scratch → (optional) x_{t+1} = Φ_t(x̃) into scratch →
 * check finite and in the domain → commit → emit the RoundRecord. Every check happens before the
 * commit, so a thrown error leaves the state exactly as it was. No allocation per round.
 *
 * @module
 */
import type { Geometry } from "../divergence/geometry.js";
import { RecedeError } from "../errors.js";
import type { StepSize } from "../learners/stepSize.js";
import type { Feedback, LossObject, RoundRecord } from "../protocol.js";
import { ObserverList } from "../protocol.js";

/** The dynamic step Φ_t: out ← Φ_t(x) for the round t just completed. */
export type DynamicStepFn = (x: Float64Array, round: number, out: Float64Array) => unknown;

/** State captured by `snapshot()`. */
export interface MirrorLearnerSnapshot {
  readonly round: number;
  readonly decision: Float64Array;
  readonly sumSquaredGradients: number;
  readonly lastStepSize: number;
}

interface MutableRecord {
  round: number;
  decision: Float64Array;
  loss: number;
  gradient: Float64Array | undefined;
  lossObject: LossObject | undefined;
}

function wrap(fn: string, arg: string, e: unknown): RecedeError {
  if (e instanceof RecedeError) return e;
  const msg = e instanceof Error ? e.message : String(e);
  const err = new RecedeError(
    "callback",
    fn,
    arg,
    "a function that returns normally",
    `it threw: ${msg}`,
  );
  err.cause = e;
  return err;
}

export class MirrorLearner {
  readonly dimension: number;
  private t = 0;
  private sumSq = 0;
  private eta = Number.NaN;
  private readonly x: Float64Array;
  private readonly initial: Float64Array;
  private readonly probe: Float64Array;
  private readonly g: Float64Array;
  private readonly next: Float64Array;
  private readonly dyn: Float64Array | null;
  private readonly played: Float64Array;
  private readonly observers = new ObserverList();
  private readonly record: MutableRecord;
  private readonly fnUpdate: string;

  constructor(
    private readonly fnName: string,
    readonly geometry: Geometry,
    initial: Float64Array,
    private readonly schedule: StepSize,
    private readonly dynamic: DynamicStepFn | null,
  ) {
    const d = geometry.dimension;
    this.dimension = d;
    this.initial = initial;
    this.x = initial.slice();
    this.probe = new Float64Array(d);
    this.g = new Float64Array(d);
    this.next = new Float64Array(d);
    this.dyn = dynamic === null ? null : new Float64Array(d);
    this.played = new Float64Array(d);
    this.fnUpdate = `${fnName}.update`;
    this.record = {
      round: 0,
      decision: this.played,
      loss: Number.NaN,
      gradient: this.g,
      lossObject: undefined,
    };
  }

  get round(): number {
    return this.t;
  }

  get lastStepSize(): number {
    return this.eta;
  }

  get sumSquaredGradients(): number {
    return this.sumSq;
  }

  decision(): Float64Array {
    return this.x;
  }

  observe(listener: (record: RoundRecord) => void): () => void {
    if (typeof listener !== "function") {
      throw new RecedeError("type", `${this.fnName}.observe`, "listener", "a function", listener);
    }
    return this.observers.add(listener);
  }

  update(feedback: Feedback): void {
    const fn = this.fnUpdate;
    if (typeof feedback !== "object" || feedback === null) {
      throw new RecedeError(
        "type",
        fn,
        "feedback",
        "an object { gradient?, loss?, lossObject? }",
        feedback,
      );
    }
    const d = this.dimension;
    const x = this.x;
    const g = this.g;
    const probe = this.probe;
    const fg = feedback.gradient;
    const lo = feedback.lossObject;
    if (lo !== undefined) {
      if (
        typeof lo !== "object" ||
        lo === null ||
        typeof lo.value !== "function" ||
        typeof lo.gradient !== "function"
      ) {
        throw new RecedeError(
          "type",
          fn,
          "feedback.lossObject",
          "an object with value(x) and gradient(x, out)",
          lo,
        );
      }
    }
    if (fg !== undefined) {
      if (!(fg instanceof Float64Array)) {
        throw new RecedeError("type", fn, "feedback.gradient", `a Float64Array of length ${d}`, fg);
      }
      if (fg.length !== d)
        throw new RecedeError("dimension", fn, "feedback.gradient", `of length ${d}`, fg);
      for (let i = 0; i < d; i++) {
        const v = fg[i];
        if (!Number.isFinite(v)) {
          throw new RecedeError("non-finite", fn, `feedback.gradient[${i}]`, "finite", v);
        }
        g[i] = v;
      }
    } else if (lo !== undefined) {
      for (let i = 0; i < d; i++) probe[i] = x[i];
      try {
        lo.gradient(probe, g);
      } catch (e) {
        throw wrap(fn, "feedback.lossObject.gradient", e);
      }
      for (let i = 0; i < d; i++) {
        if (!Number.isFinite(g[i])) {
          throw new RecedeError(
            "non-finite",
            fn,
            `feedback.lossObject.gradient(x)[${i}]`,
            "finite",
            g[i],
          );
        }
      }
    } else {
      throw new RecedeError(
        "type",
        fn,
        "feedback",
        "an object with a gradient or a lossObject",
        feedback,
      );
    }

    let loss = Number.NaN;
    if (feedback.loss !== undefined) {
      loss = feedback.loss;
      if (typeof loss !== "number" || !Number.isFinite(loss)) {
        throw new RecedeError("non-finite", fn, "feedback.loss", "a finite number", loss);
      }
    } else if (lo !== undefined) {
      for (let i = 0; i < d; i++) probe[i] = x[i];
      try {
        loss = lo.value(probe);
      } catch (e) {
        throw wrap(fn, "feedback.lossObject.value", e);
      }
      if (typeof loss !== "number" || !Number.isFinite(loss)) {
        throw new RecedeError(
          "non-finite",
          fn,
          "feedback.lossObject.value(x)",
          "a finite number",
          loss,
        );
      }
    }

    let s2 = 0;
    for (let i = 0; i < d; i++) s2 += g[i] * g[i];
    const t = this.t + 1;
    const sumSq = this.sumSq + s2;
    let eta: number;
    try {
      eta = this.schedule.at(t, sumSq);
    } catch (e) {
      throw wrap(fn, "stepSize", e);
    }
    if (typeof eta !== "number" || !Number.isFinite(eta) || eta <= 0) {
      throw new RecedeError("range", fn, "stepSize", `a finite number > 0 at round ${t}`, eta);
    }

    const next = this.next;
    const geo = this.geometry;
    try {
      geo.step(x, g, eta, next);
    } catch (e) {
      throw wrap(fn, `geometry.step (${geo.name})`, e);
    }
    for (let i = 0; i < d; i++) {
      if (!Number.isFinite(next[i])) {
        throw new RecedeError(
          "non-finite",
          fn,
          `mirror step (${geo.name}) result[${i}]`,
          `finite (η_${t} = ${eta})`,
          next[i],
        );
      }
    }
    if (!geo.contains(next)) {
      throw new RecedeError(
        "domain",
        fn,
        `mirror step (${geo.name}) result`,
        "in the geometry's domain",
        next,
      );
    }
    let result = next;
    if (this.dynamic !== null) {
      const out = this.dyn as Float64Array;
      out.fill(Number.NaN);
      try {
        this.dynamic(next, t, out);
      } catch (e) {
        throw wrap(fn, "dynamic", e);
      }
      for (let i = 0; i < d; i++) {
        if (!Number.isFinite(out[i])) {
          throw new RecedeError(
            "non-finite",
            fn,
            `dynamic(x, ${t}, out) out[${i}]`,
            "written and finite",
            out[i],
          );
        }
      }
      if (!geo.contains(out)) {
        throw new RecedeError(
          "domain",
          fn,
          `dynamic(x, ${t}, out) out`,
          `in the ${geo.name} geometry's domain`,
          out,
        );
      }
      result = out;
    }

    // Commit: nothing below can fail.
    const played = this.played;
    for (let i = 0; i < d; i++) {
      played[i] = x[i];
      x[i] = result[i];
    }
    this.t = t;
    this.sumSq = sumSq;
    this.eta = eta;
    if (this.observers.active) {
      const r = this.record;
      r.round = t;
      r.loss = loss;
      r.gradient = g;
      r.lossObject = lo;
      this.observers.emit(r);
    }
  }

  reset(): void {
    this.x.set(this.initial);
    this.t = 0;
    this.sumSq = 0;
    this.eta = Number.NaN;
  }

  snapshot(): MirrorLearnerSnapshot {
    return {
      round: this.t,
      decision: this.x.slice(),
      sumSquaredGradients: this.sumSq,
      lastStepSize: this.eta,
    };
  }

  restore(snapshot: MirrorLearnerSnapshot): void {
    const fn = `${this.fnName}.restore`;
    if (typeof snapshot !== "object" || snapshot === null) {
      throw new RecedeError("type", fn, "snapshot", "a snapshot from snapshot()", snapshot);
    }
    const { round, decision, sumSquaredGradients, lastStepSize } = snapshot;
    if (typeof round !== "number" || !Number.isInteger(round) || round < 0) {
      throw new RecedeError("range", fn, "snapshot.round", "an integer >= 0", round);
    }
    if (!(decision instanceof Float64Array) || decision.length !== this.dimension) {
      throw new RecedeError(
        "dimension",
        fn,
        "snapshot.decision",
        `a Float64Array of length ${this.dimension}`,
        decision,
      );
    }
    if (typeof sumSquaredGradients !== "number" || !(sumSquaredGradients >= 0)) {
      throw new RecedeError(
        "range",
        fn,
        "snapshot.sumSquaredGradients",
        "a number >= 0",
        sumSquaredGradients,
      );
    }
    for (let i = 0; i < this.dimension; i++) {
      if (!Number.isFinite(decision[i])) {
        throw new RecedeError("non-finite", fn, `snapshot.decision[${i}]`, "finite", decision[i]);
      }
    }
    if (!this.geometry.contains(decision)) {
      throw new RecedeError(
        "domain",
        fn,
        "snapshot.decision",
        "in the geometry's domain",
        decision,
      );
    }
    this.x.set(decision);
    this.t = round;
    this.sumSq = sumSquaredGradients;
    this.eta = typeof lastStepSize === "number" ? lastStepSize : Number.NaN;
  }
}

/**
 * The law suite every online learner passes (one row per learner): finite outputs, inputs not
 * mutated, same inputs → bit-identical trace, one RoundRecord per update, snapshot/restore and
 * reset, a failed update leaves the state untouched, and convergence on a strongly convex
 * quadratic.
 *
 * @module
 */
import { type Feedback, type OnlineLearner, RecedeError, type RoundRecord } from "@recede/core";
import fc from "fast-check";
import { assertFinite, assertThat, bitEqual, type Law, type LawRunOptions } from "./law.js";

/** A strongly convex quadratic ℓ(x) = ½ Σᵢ wᵢ (xᵢ − x*ᵢ)² whose minimizer lies in the domain. */
export interface QuadraticTarget {
  /** The minimizer x*. */
  readonly target: Float64Array;
  /** Per-coordinate curvatures wᵢ > 0. @defaultValue all 1 */
  readonly weights?: Float64Array;
  /** Rounds to run. */
  readonly rounds: number;
  /** Required final accuracy ‖x_T − x*‖∞ ≤ tolerance. */
  readonly tolerance: number;
}

/** One learner under test. */
export interface LearnerLawRow {
  /** Label used in the law names. */
  readonly name: string;
  /**
   * Make a fresh learner in its initial state from a seed (called several times per case with the
   * same seed; deterministic learners may ignore it).
   */
  readonly create: (seed: number) => OnlineLearner<Feedback, unknown>;
  /** Gradients of the learner's dimension for random traces (keep them bounded). */
  readonly gradient: fc.Arbitrary<Float64Array>;
  /** Length of the random traces. @defaultValue 12 */
  readonly rounds?: number;
  /** A quadratic the learner must converge on; omit for learners that cannot. */
  readonly quadratic?: QuadraticTarget;
}

function quadraticLoss(q: QuadraticTarget): Feedback["lossObject"] {
  const n = q.target.length;
  const w = q.weights;
  return {
    value(x: Float64Array): number {
      let s = 0;
      for (let i = 0; i < n; i++) {
        const e = x[i] - q.target[i];
        s += (w === undefined ? 1 : w[i]) * e * e;
      }
      return 0.5 * s;
    },
    gradient(x: Float64Array, out: Float64Array): Float64Array {
      for (let i = 0; i < n; i++) out[i] = (w === undefined ? 1 : w[i]) * (x[i] - q.target[i]);
      return out;
    },
  };
}

function trace(
  learner: OnlineLearner<Feedback, unknown>,
  gs: readonly Float64Array[],
): Float64Array[] {
  const out: Float64Array[] = [learner.decision().slice()];
  for (const g of gs) {
    learner.update({ gradient: g, loss: 0 });
    out.push(learner.decision().slice());
  }
  return out;
}

function expectRecedeError(f: () => void, what: string): void {
  let threw = false;
  try {
    f();
  } catch (e) {
    threw = true;
    assertThat(e instanceof RecedeError, `${what}: threw ${String(e)} instead of a RecedeError`);
  }
  assertThat(threw, `${what}: did not throw`);
}

/**
 * The learner laws, one {@link Law} per (row, law).
 */
export function learnerLaws(rows: readonly LearnerLawRow[], run: LawRunOptions = {}): Law[] {
  const params = { numRuns: run.numRuns ?? 100, seed: run.seed };
  const laws: Law[] = [];
  for (const row of rows) {
    const T = row.rounds ?? 12;
    const gs = fc.array(row.gradient, { minLength: 1, maxLength: T });
    const seeds = fc.integer({ min: 0, max: 0x7fffffff });
    const mk = <P extends unknown[]>(name: string, prop: fc.IRawProperty<P>): Law => ({
      name: `${row.name}: ${name}`,
      check: () => fc.assert(prop, params),
    });

    laws.push(
      mk(
        "finite decisions, inputs not mutated, one record per update",
        fc.property(gs, seeds, (seq, sd) => {
          const l = row.create(sd);
          const copies = seq.map((g) => g.slice());
          const records: number[] = [];
          l.observe((r: RoundRecord) => {
            records.push(r.round);
            assertThat(r.decision.length === l.dimension, "record.decision has the wrong length");
          });
          for (let t = 0; t < seq.length; t++) {
            const before = l.decision().slice();
            let played: Float64Array | undefined;
            const off = l.observe((r) => {
              played = r.decision.slice();
            });
            l.update({ gradient: seq[t], loss: 0 });
            off();
            assertThat(
              played !== undefined && bitEqual(played, before),
              "record.decision is not x_t",
            );
            assertFinite(l.decision(), `decision after round ${t + 1}`);
            assertThat(l.round === t + 1, `round = ${l.round} after ${t + 1} updates`);
          }
          for (let t = 0; t < seq.length; t++) {
            assertThat(bitEqual(seq[t], copies[t]), `gradient ${t} was mutated`);
          }
          assertThat(
            records.length === seq.length && records.every((r, i) => r === i + 1),
            `records ${records} for ${seq.length} updates`,
          );
        }),
      ),
    );

    laws.push(
      mk(
        "same seed and inputs give a bit-identical trace",
        fc.property(gs, seeds, (seq, sd) => {
          const a = trace(row.create(sd), seq);
          const b = trace(row.create(sd), seq);
          for (let t = 0; t < a.length; t++)
            assertThat(bitEqual(a[t], b[t]), `traces differ at ${t}`);
        }),
      ),
    );

    laws.push(
      mk(
        "snapshot/restore and reset",
        fc.property(gs, gs, seeds, (first, second, sd) => {
          const l = row.create(sd);
          const x0 = l.decision().slice();
          trace(l, first);
          const snap = l.snapshot();
          const mid = l.decision().slice();
          const cont = trace(l, second);
          l.restore(snap);
          assertThat(l.round === first.length, "restore did not bring back the round");
          assertThat(bitEqual(l.decision(), mid), "restore did not bring back the decision");
          const again = trace(l, second);
          for (let t = 0; t < cont.length; t++) {
            assertThat(bitEqual(cont[t], again[t]), `continuation after restore differs at ${t}`);
          }
          l.reset();
          assertThat(
            l.round === 0 && bitEqual(l.decision(), x0),
            "reset did not return to x₁, round 0",
          );
          const fresh = trace(row.create(sd), first);
          const afterReset = trace(l, first);
          for (let t = 0; t < fresh.length; t++) {
            assertThat(bitEqual(fresh[t], afterReset[t]), `trace after reset differs at ${t}`);
          }
        }),
      ),
    );

    laws.push(
      mk(
        "a failed update leaves the state untouched",
        fc.property(
          gs,
          fc.nat(),
          fc.constantFrom(Number.NaN, Infinity, -Infinity),
          seeds,
          (seq, k, bad, sd) => {
            const l = row.create(sd);
            const ref = row.create(sd);
            const n = l.dimension;
            trace(l, seq.slice(0, -1));
            trace(ref, seq.slice(0, -1));
            const x = l.decision().slice();
            const round = l.round;
            const badG = seq[seq.length - 1].slice();
            badG[k % n] = bad;
            let emitted = 0;
            const off = l.observe(() => {
              emitted++;
            });
            expectRecedeError(() => l.update({ gradient: badG, loss: 0 }), "non-finite gradient");
            expectRecedeError(
              () => l.update({ gradient: new Float64Array(n + 1), loss: 0 }),
              "wrong length",
            );
            expectRecedeError(() => l.update({ loss: 0 }), "no gradient and no loss object");
            expectRecedeError(
              () =>
                l.update({
                  lossObject: {
                    value: () => 0,
                    gradient: () => {
                      throw new Error("loss object failure");
                    },
                  },
                }),
              "loss object that throws",
            );
            off();
            assertThat(emitted === 0, "a failed update emitted a record");
            assertThat(
              l.round === round && bitEqual(l.decision(), x),
              "a failed update changed the state",
            );
            const last = seq[seq.length - 1];
            l.update({ gradient: last, loss: 0 });
            ref.update({ gradient: last, loss: 0 });
            assertThat(
              bitEqual(l.decision(), ref.decision()),
              "the next update differs after a failure",
            );
          },
        ),
      ),
    );

    const q = row.quadratic;
    if (q !== undefined) {
      laws.push({
        name: `${row.name}: converges on a strongly convex quadratic`,
        check: () => {
          const l = row.create(0);
          const lossObject = quadraticLoss(q);
          for (let t = 0; t < q.rounds; t++) l.update({ lossObject });
          const x = l.decision();
          let err = 0;
          for (let i = 0; i < x.length; i++) err = Math.max(err, Math.abs(x[i] - q.target[i]));
          assertThat(
            err <= q.tolerance,
            `‖x_T − x*‖∞ = ${err} > ${q.tolerance} after ${q.rounds} rounds`,
          );
        },
      });
    }
  }
  return laws;
}

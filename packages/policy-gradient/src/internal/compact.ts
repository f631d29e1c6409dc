/**
 * Turn per-sample weights of an {@link EpisodeBatch} into {@link ScoredSamples}, dropping the
 * padding steps of episodes that terminated early (copied into buffers owned by `scratch`).
 *
 * @module
 */
import type { EpisodeBatch } from "../environment/episodeBatch.js";
import type { ScoredSamples } from "../estimators/scoredSamples.js";
import type { ValueModel } from "../estimators/valueFunction.js";

/** Reusable buffers for compaction. */
export class CompactionScratch {
  states: Float64Array = new Float64Array(0);
  actions: Float64Array = new Float64Array(0);
  logProbs: Float64Array = new Float64Array(0);
  weights: Float64Array = new Float64Array(0);
}

/** Scored samples of the batch's active steps, normalizer E. */
export function scoredFromBatch(
  batch: EpisodeBatch,
  weights: Float64Array,
  scratch: CompactionScratch,
): ScoredSamples {
  const E = batch.episodes;
  if (batch.complete) {
    return {
      count: E * batch.horizon,
      states: batch.states,
      actions: batch.actions,
      logProbs: batch.logProbs,
      weights,
      normalizer: E,
    };
  }
  const T = batch.horizon;
  const n = batch.stateSize;
  const a = batch.actionSize;
  let N = 0;
  for (let e = 0; e < E; e++) N += batch.lengths[e];
  if (scratch.weights.length < N) {
    scratch.states = new Float64Array(N * n);
    scratch.actions = new Float64Array(N * a);
    scratch.logProbs = new Float64Array(N);
    scratch.weights = new Float64Array(N);
  }
  let k = 0;
  for (let e = 0; e < E; e++) {
    for (let t = 0; t < batch.lengths[e]; t++) {
      const i = e * T + t;
      for (let q = 0; q < n; q++) scratch.states[k * n + q] = batch.states[i * n + q];
      for (let q = 0; q < a; q++) scratch.actions[k * a + q] = batch.actions[i * a + q];
      scratch.logProbs[k] = batch.logProbs[i];
      scratch.weights[k] = weights[i];
      k++;
    }
  }
  return {
    count: N,
    states: scratch.states,
    actions: scratch.actions,
    logProbs: scratch.logProbs,
    weights: scratch.weights,
    normalizer: E,
  };
}

/** Reusable buffers for {@link fitOnActiveSteps}: compaction buffers plus the time indices. */
export class FitScratch extends CompactionScratch {
  times: Int32Array = new Int32Array(0);
}

/**
 * Fit `model` on `targets` (sample-major, length E·T) at the batch's active steps: all E·T samples
 * with times t = i mod T when no episode terminated early, otherwise the compacted active steps
 * with their own times.
 */
export function fitOnActiveSteps(
  model: ValueModel,
  batch: EpisodeBatch,
  targets: Float64Array,
  scratch: FitScratch,
): void {
  const E = batch.episodes;
  const T = batch.horizon;
  const c = scoredFromBatch(batch, targets, scratch);
  if (scratch.times.length < c.count) scratch.times = new Int32Array(c.count);
  const times = scratch.times;
  let k = 0;
  for (let e = 0; e < E; e++) {
    const len = batch.complete ? T : batch.lengths[e];
    for (let t = 0; t < len; t++) times[k++] = t;
  }
  model.fit(c.states, times, c.weights, c.count);
}

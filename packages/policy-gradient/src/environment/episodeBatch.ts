/**
 * A fixed-shape record of E episodes of T steps, laid out sample-major so that sample
 * i = e·T + t is one (state, action, cost) triple.
 *
 * @module
 */

/**
 * Episodes collected by {@link RolloutEnvironment.collect}: all buffers are allocated once and
 * reused from round to round.
 *
 * Layout (sample i = e·T + t): state s_t of episode e at `states[i·n ..]`, the policy's action
 * record at `actions[i·a ..]`, the control actually applied (mapped, clipped) at `controls[i·m ..]`,
 * the running cost c_t at `costs[i]`, ln π_behaviour(a_t | s_t) at `logProbs[i]`; the state after
 * the last step at `finalStates[e·n ..]` and its terminal cost at `terminalCosts[e]`.
 * An episode that the environment's `terminate` test ended early has `lengths[e] < T` and
 * `terminated[e] = 1`; its steps t ≥ lengths[e] are padding (zero cost, zero action, the final
 * state repeated) that estimators skip.
 */
export class EpisodeBatch {
  /** Number of episodes E. */
  readonly episodes: number;
  /** Steps per episode T. */
  readonly horizon: number;
  /** State size n. */
  readonly stateSize: number;
  /** Length a of one action record (m, or 1 for a categorical index). */
  readonly actionSize: number;
  /** Control size m. */
  readonly controlSize: number;
  /** E·T·n visited states. */
  readonly states: Float64Array;
  /** E·T·a action records. */
  readonly actions: Float64Array;
  /** E·T·m applied controls. */
  readonly controls: Float64Array;
  /** E·T running costs. */
  readonly costs: Float64Array;
  /** E·T log-probabilities of the actions under the behaviour policy (NaN for non-stochastic actors). */
  readonly logProbs: Float64Array;
  /** E·n states after the last step. */
  readonly finalStates: Float64Array;
  /** E terminal costs c_H(x_T) (at the terminating state for an episode that ended early). */
  readonly terminalCosts: Float64Array;
  /** E episode lengths (T unless the episode terminated early). */
  readonly lengths: Int32Array;
  /** E flags: 1 when the episode ended by the environment's `terminate` test. */
  readonly terminated: Uint8Array;

  constructor(episodes: number, horizon: number, n: number, a: number, m: number) {
    this.episodes = episodes;
    this.horizon = horizon;
    this.stateSize = n;
    this.actionSize = a;
    this.controlSize = m;
    const s = episodes * horizon;
    this.states = new Float64Array(s * n);
    this.actions = new Float64Array(s * a);
    this.controls = new Float64Array(s * m);
    this.costs = new Float64Array(s);
    this.logProbs = new Float64Array(s);
    this.finalStates = new Float64Array(episodes * n);
    this.terminalCosts = new Float64Array(episodes);
    this.lengths = new Int32Array(episodes).fill(horizon);
    this.terminated = new Uint8Array(episodes);
  }

  /** True when every episode ran the full horizon. */
  get complete(): boolean {
    for (let e = 0; e < this.episodes; e++) if (this.lengths[e] !== this.horizon) return false;
    return true;
  }

  /** Number of samples E·T. */
  get sampleCount(): number {
    return this.episodes * this.horizon;
  }

  /** Undiscounted total cost of episode e: Σ_t c_t + c_H. */
  episodeCost(e: number): number {
    const T = this.horizon;
    let s = this.terminalCosts[e];
    for (let t = 0; t < T; t++) s += this.costs[e * T + t];
    return s;
  }

  /** Mean undiscounted total cost over the episodes. */
  meanCost(): number {
    let s = 0;
    for (let e = 0; e < this.episodes; e++) s += this.episodeCost(e);
    return s / this.episodes;
  }
}

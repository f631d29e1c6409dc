/**
 * @recede/regret — regret tracking for any online learner that follows core's protocol: static
 * regret against the best fixed decision in hindsight (linear over simplex/box/ball, summed
 * quadratics, finite expert sets, user comparators), dynamic regret with path lengths, adaptive
 * regret over sliding windows, published bounds as pure functions, and CSV/JSON/SVG export.
 *
 * @packageDocumentation
 */

export {
  type DmdBoundForm,
  type DmdBoundParameters,
  dynamicMirrorDescentRegretBound,
  type StepSchedule,
} from "./bounds/dynamicMirrorDescent.js";
export {
  type HedgeBoundParameters,
  type HedgeHorizonParameters,
  hedgeAnytimeRegretBound,
  hedgeRegretBound,
  hedgeTunedStepSize,
} from "./bounds/hedge.js";
export {
  type MirrorDescentBoundParameters,
  type MirrorDescentTuningParameters,
  mirrorDescentRegretBound,
  mirrorDescentTunedStepSize,
} from "./bounds/mirrorDescent.js";
export {
  type OgdBoundParameters,
  type OgdDynamicParameters,
  type OgdFixedStepParameters,
  ogdDynamicRegretBound,
  ogdRegretBoundFixedStep,
  ogdRegretBoundHazan,
  ogdRegretBoundZinkevich,
  ogdTunedStepSize,
} from "./bounds/ogd.js";
export {
  type ChartLine,
  type LineChartOptions,
  lineChartSpec,
  type RegretChartOptions,
  renderLineChartSvg,
  renderRegretChartSvg,
} from "./chart.js";
export {
  type BallDomain,
  type BoxDomain,
  ballDomain,
  boxDomain,
  type Domain,
  domainContains,
  domainDiameter,
  linearMinimum,
  type SimplexDomain,
  simplexDomain,
} from "./domain.js";
export { seriesToCsv, seriesToJson, summaryToJson } from "./exportSeries.js";
export {
  isLinearLoss,
  isQuadraticLoss,
  type LinearLoss,
  linearLoss,
  type QuadraticLoss,
  type QuadraticLossOptions,
  quadraticLoss,
} from "./losses.js";
export {
  minimizeQuadratic,
  type QuadraticMinimum,
  type QuadraticMinimumOptions,
  type QuadraticMinimumStatus,
} from "./quadraticMinimum.js";
export { compensatedSum, pairwiseSum } from "./summation.js";
export {
  type AdaptiveRegretEntry,
  type AdaptiveRegretSummary,
  type ComparatorSequence,
  createRegretTracker,
  type DynamicModel,
  type DynamicRegretSummary,
  type Expert,
  type ExpertRegretSummary,
  type GradientStatistics,
  type HistoryMode,
  type LinearRegretSummary,
  type PathNorm,
  type QuadraticRegretSummary,
  type RegretSeries,
  type RegretSummary,
  RegretTracker,
  type RegretTrackerOptions,
  type RoundInput,
  trackRegret,
} from "./tracker.js";

/**
 * @recede/bench — the benchmark harness: sweep files (problems × optimizers × seeds × episodes),
 * worker-thread execution with resume and shards, summaries with Student-t intervals, vega-lite
 * charts and self-contained reports; plus the rooftop parcel drone demo and the suite contract.
 *
 * @packageDocumentation
 */

export { builtinRegistry } from "./builtins.js";
export {
  type Chart,
  computeChart,
  costCurveChart,
  regretChart,
  renderSvg,
  samplesCostChart,
  trackedRegretChart,
} from "./charts.js";
export { mergeResults } from "./cli.js";
export { touchdownChart } from "./demo/charts.js";
export { type DemoFiles, type DemoOptions, demoSweep, runDemo } from "./demo/demo.js";
export {
  DRONE_PARAMETERS,
  DRONE_THRESHOLDS,
  DRONE_WEIGHTS,
  droneCost,
  droneGlidePath,
  droneLinearQuadratic,
  droneModel,
  type GlidePathSettings,
  HOVER_THRUST,
  parcelDrone,
} from "./demo/drone.js";
export { distilledDefinition } from "./optimizers/distilled.js";
export {
  cemDefinition,
  lqrDefinition,
  mppiDefinition,
  type TrackingReference,
  type TrackingReferenceSource,
  variantDefinition,
  wrapController,
} from "./optimizers/mpc.js";
export { nominalDefinition, optimizerDefinitions } from "./optimizers.js";
export { type SweepFiles, sweepCharts, writeSweepOutputs } from "./outputs.js";
export {
  type ParamSchema,
  type ParamSchemaMap,
  type ParamValues,
  SpecError,
  validateParams,
} from "./params.js";
export { fromReferenceProblem, referenceProblemDefinitions } from "./problems.js";
export { Progress, type ProgressSink } from "./progress.js";
export {
  type BenchController,
  type BenchProblem,
  type EpisodeOutcome,
  type FactoryContext,
  type OptimizerDefinition,
  type PluginModule,
  type ProblemDefinition,
  Registry,
  type StepResult,
} from "./registry.js";
export { currentMeta, type RunMeta } from "./report.js";
export { appendResult, readResults, repairResults } from "./results.js";
export { type ExecuteOptions, executeRun, type RunRecord, simulate } from "./run.js";
export {
  enumerateRuns,
  type OptimizerEntry,
  type ProblemEntry,
  parseShard,
  parseSweepSpec,
  type RunCell,
  type Shard,
  type SweepSpec,
  shardRuns,
} from "./spec.js";
export { type Interval, meanInterval, quantile, studentTCdf, studentTQuantile } from "./stats.js";
export type { Suite, SuiteContext, SuiteOutput } from "./suite.js";
export { type GroupOutcome, type GroupTiming, type SweepSummary, summarize } from "./summary.js";
export {
  preflight,
  readSweepFile,
  registryFor,
  runSweep,
  type SweepOptions,
  type SweepOutcome,
  type SweepSource,
} from "./sweep.js";

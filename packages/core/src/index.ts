/**
 * @recede/core — the engine: seeded streams, flat-array kernels, Bregman geometries, and the
 * mirror-descent learners behind one online-learner protocol.
 *
 * @packageDocumentation
 */

export { gaussianDiagonalStep, gaussianFullStep } from "./divergence/gaussian.js";
export type { Geometry } from "./divergence/geometry.js";
export {
  describe,
  RecedeError,
  type RecedeErrorCode,
  requireFinite,
  requireInRange,
  requireInteger,
  requirePositive,
  requireVector,
} from "./errors.js";
export * as kernels from "./kernels/index.js";
export {
  type MatrixInput,
  type NdArrayLike,
  type RowMajorMatrix,
  toRowMajor,
} from "./matrixInput.js";
export {
  batchDynamics,
  type ControlBounds,
  type CostModel,
  type Dynamics,
  type PointDynamics,
} from "./model.js";
export {
  type Feedback,
  type LossObject,
  type Observable,
  ObserverList,
  type OnlineLearner,
  type RoundRecord,
} from "./protocol.js";
export { createStream, type Stream, type StreamState } from "./rng.js";

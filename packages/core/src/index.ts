/**
 * @recede/core — the engine: seeded streams, flat-array kernels, Bregman geometries, and the
 * mirror-descent learners behind one online-learner protocol.
 *
 * @packageDocumentation
 */

export {
  type DiagonalGaussianGeometry,
  type DiagonalGaussianOptions,
  diagonalGaussian,
} from "./divergence/diagonalGaussian.js";
export {
  type EntropyGeometry,
  type EntropyOptions,
  entropy,
} from "./divergence/entropy.js";
export {
  type BallSet,
  type BoxSet,
  type EuclideanFeasibleSet,
  type EuclideanGeometry,
  type EuclideanOptions,
  euclidean,
  type SimplexSet,
} from "./divergence/euclidean.js";
export {
  gaussianDiagonalStep,
  gaussianFullStep,
  klDiagonalGaussian,
  klGaussian,
} from "./divergence/gaussian.js";
export type { Geometry } from "./divergence/geometry.js";
export {
  type MahalanobisGeometry,
  type MahalanobisOptions,
  mahalanobis,
} from "./divergence/mahalanobis.js";
export {
  type PositiveEntropyGeometry,
  type PositiveEntropyOptions,
  positiveEntropy,
} from "./divergence/positiveEntropy.js";
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
export type { VectorInput } from "./internal/vectorInput.js";
export * as kernels from "./kernels/index.js";
export { type AffineDynamicOptions, affineDynamic } from "./learners/affineDynamic.js";
export {
  type DynamicMirrorDescentOptions,
  type DynamicStep,
  dynamicMirrorDescent,
} from "./learners/dynamicMirrorDescent.js";
export { fixedShare } from "./learners/fixedShare.js";
export { type HedgeOptions, hedge } from "./learners/hedge.js";
export {
  type MirrorDescentLearner,
  type MirrorDescentOptions,
  type MirrorDescentSnapshot,
  mirrorDescent,
} from "./learners/mirrorDescent.js";
export {
  type OnlineGradientDescentOptions,
  onlineGradientDescent,
} from "./learners/onlineGradientDescent.js";
export {
  adaGradStep,
  constantStep,
  inverseSqrtStep,
  type StepSize,
  type StepSizeInput,
  scheduledStep,
} from "./learners/stepSize.js";
export { discreteLyapunov, type LyapunovOptions, spectralRadius } from "./linalg/lyapunov.js";
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
  requireControlBounds,
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

/**
 * @recede/policy-gradient — policy gradient as mirror descent (vanilla, natural, KL trust region)
 * and imitation learning as online learning.
 *
 * @packageDocumentation
 */

export {
  type Evaluation,
  environmentFromProblem,
  type InitialStateSampler,
  type ProblemEnvironmentOptions,
  RolloutEnvironment,
  type RolloutEnvironmentOptions,
  rolloutEnvironment,
  type StepDecider,
  type TerminationTest,
} from "./environment/environment.js";
export { EpisodeBatch } from "./environment/episodeBatch.js";
export { GaeEstimator, type GaeOptions, gae } from "./estimators/gae.js";
export {
  type GradientEstimator,
  ReinforceEstimator,
  type ReinforceOptions,
  reinforce,
  returnsToGo,
} from "./estimators/reinforce.js";
export { type ScoredSamples, surrogateLoss } from "./estimators/scoredSamples.js";
export {
  LinearValueFunction,
  type LinearValueFunctionOptions,
  linearValueFunction,
  type ValueModel,
} from "./estimators/valueFunction.js";
export {
  type AggrevatedOptions,
  type AggrevatedResult,
  type AggrevatedRound,
  aggrevated,
} from "./imitation/aggrevated.js";
export {
  type BehaviourCloningOptions,
  behaviourCloning,
  type DaggerOptions,
  type DaggerRound,
  dagger,
  type Expert,
  type ImitationOptions,
  type ImitationResult,
  type MixingSchedule,
} from "./imitation/dagger.js";
export { ImitationDataset } from "./imitation/dataset.js";
export {
  type FitPolicyOptions,
  type FitPolicyReport,
  fitPolicy,
  imitationLoss,
} from "./imitation/fitPolicy.js";
export {
  type ImitationFeedback,
  ImitationLearner,
  type ImitationLearnerOptions,
  type ImitationLearnerSnapshot,
  imitationLearner,
} from "./imitation/imitationLearner.js";
export {
  type LqrFromLinearQuadraticOptions,
  type LqrPolicyEvaluation,
  LqrPolicyProblem,
  type LqrPolicyProblemOptions,
  type LqrUpdateMethod,
  lqrPolicyProblem,
  lqrPolicyProblemFrom,
} from "./lqr/exactLqrGradient.js";
export { type PolicyActor, type PolicyActorOptions, policyActor } from "./policies/actor.js";
export {
  LinearGaussianPolicy,
  type LinearGaussianPolicyOptions,
  linearGaussianPolicy,
} from "./policies/linearGaussian.js";
export {
  MlpGaussianPolicy,
  type MlpGaussianPolicyOptions,
  mlpGaussianPolicy,
} from "./policies/mlpGaussian.js";
export {
  type Actor,
  type ActorOutput,
  controlOf,
  type ParameterBlock,
  type PolicyKind,
  type StochasticPolicy,
} from "./policies/policy.js";
export { SoftmaxPolicy, type SoftmaxPolicyOptions, softmaxPolicy } from "./policies/softmax.js";
export {
  type ConjugateGradientReport,
  type ConjugateGradientScratch,
  conjugateGradient,
} from "./updates/conjugateGradient.js";
export {
  FisherGeometry,
  type FisherGeometryOptions,
  fisherGeometry,
  type PreparableGeometry,
} from "./updates/fisherGeometry.js";
export {
  type PolicyFeedback,
  PolicyOptimizer,
  type PolicyOptimizerOptions,
  type PolicyOptimizerSnapshot,
  type PolicyStepReport,
  policyOptimizer,
  type TrustRegionOptions,
} from "./updates/policyOptimizer.js";
export {
  type TrainingResult,
  type TrainingRound,
  type TrainPolicyOptions,
  trainPolicy,
} from "./updates/trainPolicy.js";

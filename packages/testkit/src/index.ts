/**
 * @recede/testkit (private) — fast-check arbitraries and the law suites every package's tests
 * reuse. Laws are framework-agnostic: each is `{ name, check() }` and throws on failure.
 *
 * @packageDocumentation
 */

export {
  ballPoint,
  boundedGradient,
  type FiniteVectorOptions,
  finiteVector,
  lossSequence,
  positiveVector,
  seed,
  simplexPoint,
  spdMatrix,
  stepSize,
} from "./arbitraries.js";
export { type GeometryLawRow, geometryLaws } from "./geometryLaws.js";
export {
  assertClose,
  assertFinite,
  assertThat,
  bitEqual,
  type Law,
  type LawRunOptions,
} from "./law.js";
export { type LearnerLawRow, learnerLaws, type QuadraticTarget } from "./learnerLaws.js";
export {
  type PreparedSnippet,
  prepareSnippet,
  type ReadmeSnippet,
  readmeSnippets,
  runSnippet,
} from "./readme.js";
export { catchRecedeError, type ExpectedError } from "./typedError.js";

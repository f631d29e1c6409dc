export { expWeights, logSumExp } from "./logsumexp.js";
export {
  backSubstituteTransposed,
  cholesky,
  choleskyLogDet,
  choleskySolve,
  forwardSubstitute,
  gemm,
  gemv,
  symv,
} from "./matrix.js";
export { sinCos, sinCosInPlace, trigReductionLimit } from "./trig.js";
export { axpy, copy, dot, fill, nrm2, scale } from "./vector.js";

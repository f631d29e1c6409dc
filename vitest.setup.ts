// Property tests explore fresh random inputs on every local run. CI pins fast-check's seed so that
// a green main stays green; set FC_SEED to replay a failure (fast-check prints the seed it used).
import fc from "fast-check";

const pinned = process.env.FC_SEED ?? (process.env.CI ? "20261202" : undefined);
if (pinned !== undefined) {
  fc.configureGlobal({ ...fc.readConfigureGlobal(), seed: Number(pinned) });
}

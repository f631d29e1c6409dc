import type { OptimizerDefinition } from "../registry.js";

/** Placeholder until @recede/policy-gradient lands. */
export const distilledDefinition: OptimizerDefinition = {
  kind: "distilled",
  description: "",
  params: {},
  create() {
    throw new Error("not yet");
  },
};

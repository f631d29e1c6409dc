/**
 * @recede/examples — runnable scenarios of our own invention (the rooftop parcel drone demo lives
 * in bench/, `pnpm demo`).
 *
 * @packageDocumentation
 */

export {
  craneCost,
  craneDynamics,
  type GantryCraneOptions,
  type GantryCraneResult,
  runGantryCrane,
} from "./gantryCrane.js";
export {
  PICKER,
  RACKS,
  runToteRobot,
  type ToteRobotOptions,
  type ToteRobotResult,
} from "./toteRobot.js";

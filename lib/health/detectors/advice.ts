/**
 * What each finding tells the mechanic to check, in one table: the detectors put the measured
 * part of the sentence before it. lib/demo/validation/classify.ts maps findings to damage classes
 * by the same advice, so a change here may belong there too.
 */

const SPIN_EACH = "With the battery disconnected, spin each motor by hand and feel for roughness.";

export const ADVICE = {
  /** mode-lost */
  modeLost:
    "A crack or loose screws can lower and damp a mode until it no longer shows: check the arms for cracks and the frame screws for tightness.",
  /** mode-shift, downwards */
  modeDropped: "Check the arms for cracks and the frame screws for tightness.",
  /** mode-shift, upwards */
  modeRose: "If arms or the stack were changed, set a new baseline.",
  /** motor-order, whole orders only */
  prop: "look for a bent or chipped prop on it, then a bent motor shaft.",
  /** motor-order with half orders: after the list of tones between its orders */
  motorRattle: "check that motor's screws and mount, then its prop.",
  /** new-peak */
  newPeak: "Check the flight-controller stack, camera mount, antenna and battery strap.",
  /** floor-rise with one motor's tones between its orders */
  bearingOfMotor:
    "typical of a worn bearing in that motor. With the battery disconnected, spin it by hand and feel for roughness.",
  /** floor-rise without a motor to name */
  bearingsOrProps: `typical of worn motor bearings or damaged props. ${SPIN_EACH}`,
  /** floor-rise that comes with several modes dropped at once */
  softFrame:
    "typical of loose frame screws, whose damped modes spread their vibration wide: check every frame screw and the arms, then spin each motor by hand.",
  /** band-rise above the floor corner */
  highBand: `typical of a worn motor bearing or a damaged prop. ${SPIN_EACH}`,
  /** band-rise below it */
  lowBand: "look for loose screws, a cracked mount or a part rubbing.",
} as const;

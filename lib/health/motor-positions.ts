/**
 * heatcheck's motor numbering on a quad's X frame: clockwise from front-left, seen from above.
 * The findings name motors with it, the position list of the parts screens uses it, and the demo
 * frame is built to it. (Flight-controller firmwares number motors in their own ways; map the rpm
 * columns to these numbers when importing.)
 */
export const MOTOR_POSITIONS: Readonly<Record<number, string>> = {
  1: "front-left",
  2: "front-right",
  3: "rear-right",
  4: "rear-left",
};

/** "motor 3 (rear-right)": the position name a motor has on an airframe. */
export function motorPositionName(motor: number): string {
  return motorNamed(motor, MOTOR_POSITIONS);
}

/** "motor 3 (rear-right)" with the given position names, "motor 3" when it has none. */
export function motorNamed(motor: number, positions: Readonly<Record<number, string>>): string {
  const where = positions[motor];
  return where ? `motor ${motor} (${where})` : `motor ${motor}`;
}

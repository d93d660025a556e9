import type { Axis } from "../logs/columns";

/** { roll, pitch, yaw }: one number per gyro axis, for the rows of the demo's design tables. */
export function axisValues(roll: number, pitch: number, yaw: number): Record<Axis, number> {
  return { roll, pitch, yaw };
}

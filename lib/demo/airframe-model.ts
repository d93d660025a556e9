import { MOTOR_POSITIONS } from "../health/motor-positions";
import type { Axis } from "../logs/columns";
import { axisValues } from "./axis-values";

/**
 * The invented "house frame" of the demo: a 5-inch-class X frame whose numbers were made up for
 * heatcheck's demo and tests. They only need to behave like a quad: frame modes in the 100–500 Hz
 * range, motor orders that sweep with throttle, stick motion below 20 Hz.
 */

export interface FrameMode {
  name: string;
  /** Axis the mode mostly shows on, and how much it leaks into the others. */
  coupling: Record<Axis, number>;
  freqHz: number;
  q: number;
  /** Amplification of the excitation at resonance. */
  gain: number;
}

export interface MotorMount {
  motor: number;
  position: string;
  /** How the motor's vibration reaches each gyro axis. */
  coupling: Record<Axis, number>;
  /** 1× (imbalance) amplitude at full rpm, deg/s. */
  imbalance: number;
}

export interface AirframeModel {
  modes: FrameMode[];
  motors: MotorMount[];
  /** rev/min at full throttle. */
  maxRpm: number;
  blades: number;
  /** 2× and blade-pass amplitude at full rpm, deg/s. */
  order2: number;
  bladePass: number;
  /** Broadband airflow/prop excitation, deg/s rms at full throttle. */
  excitation: number;
  sensorNoise: number;
}

/** The house frame's modes: name, coupling (roll, pitch, yaw), frequency Hz, Q, gain. */
const HOUSE_MODES: [string, Record<Axis, number>, number, number, number][] = [
  ["roll bending", axisValues(1, 0.12, 0.05), 174, 14, 5],
  ["pitch bending", axisValues(0.1, 1, 0.05), 236, 16, 6],
  ["arm torsion", axisValues(0.08, 0.08, 1), 312, 12, 4],
  ["second bending", axisValues(0.7, 0.7, 0.1), 455, 10, 2.5],
];

/** The house frame's motors: number, coupling (roll, pitch, yaw), 1× imbalance deg/s. */
const HOUSE_MOTORS: [number, Record<Axis, number>, number][] = [
  [1, axisValues(0.72, 0.68, 0.3), 2.4],
  [2, axisValues(0.66, 0.74, 0.28), 2.8],
  [3, axisValues(0.7, 0.7, 0.32), 2.2],
  [4, axisValues(0.75, 0.65, 0.3), 2.6],
];

export const HOUSE_FRAME: AirframeModel = {
  modes: HOUSE_MODES.map(([name, coupling, freqHz, q, gain]) => ({
    name,
    coupling,
    freqHz,
    q,
    gain,
  })),
  motors: HOUSE_MOTORS.map(([motor, coupling, imbalance]) => ({
    motor,
    position: MOTOR_POSITIONS[motor] ?? "",
    coupling,
    imbalance,
  })),
  maxRpm: 36000,
  blades: 3,
  order2: 1.0,
  bladePass: 1.6,
  excitation: 7,
  sensorNoise: 0.5,
};

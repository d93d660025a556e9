import { MOTOR_POSITIONS } from "../health/motor-positions";
import type { Axis } from "../logs/columns";

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

export const HOUSE_FRAME: AirframeModel = {
  modes: [
    {
      name: "roll bending",
      coupling: { roll: 1, pitch: 0.12, yaw: 0.05 },
      freqHz: 174,
      q: 14,
      gain: 5,
    },
    {
      name: "pitch bending",
      coupling: { roll: 0.1, pitch: 1, yaw: 0.05 },
      freqHz: 236,
      q: 16,
      gain: 6,
    },
    {
      name: "arm torsion",
      coupling: { roll: 0.08, pitch: 0.08, yaw: 1 },
      freqHz: 312,
      q: 12,
      gain: 4,
    },
    {
      name: "second bending",
      coupling: { roll: 0.7, pitch: 0.7, yaw: 0.1 },
      freqHz: 455,
      q: 10,
      gain: 2.5,
    },
  ],
  motors: [
    {
      motor: 1,
      position: MOTOR_POSITIONS[1] ?? "",
      coupling: { roll: 0.72, pitch: 0.68, yaw: 0.3 },
      imbalance: 2.4,
    },
    {
      motor: 2,
      position: MOTOR_POSITIONS[2] ?? "",
      coupling: { roll: 0.66, pitch: 0.74, yaw: 0.28 },
      imbalance: 2.8,
    },
    {
      motor: 3,
      position: MOTOR_POSITIONS[3] ?? "",
      coupling: { roll: 0.7, pitch: 0.7, yaw: 0.32 },
      imbalance: 2.2,
    },
    {
      motor: 4,
      position: MOTOR_POSITIONS[4] ?? "",
      coupling: { roll: 0.75, pitch: 0.65, yaw: 0.3 },
      imbalance: 2.6,
    },
  ],
  maxRpm: 36000,
  blades: 3,
  order2: 1.0,
  bladePass: 1.6,
  excitation: 7,
  sensorNoise: 0.5,
};

import { AXES, type Axis } from "../logs/columns";
import { Biquad } from "../signal/biquad";
import { HOUSE_FRAME, type AirframeModel, type FrameMode } from "./airframe-model";
import { gaussian, mulberry32, type Random } from "./random";

/**
 * Seeded synthetic flight logs for the demo and the tests. The story: a pilot flies laps with a
 * throttle that steps between cruise and punches; each motor's rpm follows its own throttle
 * (thrust ∝ rpm², so rpm ∝ √throttle) and shakes the frame at 1×, 2× and blade-pass of its
 * rotation; airflow adds broadband excitation that grows with throttle; the frame's modes ring
 * with what reaches them; the gyro adds its own noise. Damage changes one part of the story.
 */

export const SCENARIOS = [
  "healthy",
  "cracked-arm",
  "bent-prop",
  "worn-bearing",
  "loose-stack",
] as const;
export type Scenario = (typeof SCENARIOS)[number];
export type FlyingStyle = "normal" | "hard";

export interface DemoLogOptions {
  seed: number;
  scenario?: Scenario;
  /** 1 (mild) to 3 (severe); ignored for healthy. */
  severity?: 1 | 2 | 3;
  style?: FlyingStyle;
  sampleRateHz?: number;
  durationS?: number;
  model?: AirframeModel;
  /** Which motor or arm the damage is on (1–4). Defaults: arm 2, prop 3, bearing 1. */
  position?: number;
  /**
   * Seed of the individual airframe: quads of one design differ a little (modes ±2 %, motor
   * balance ±15 %). The same airframe keeps its numbers from flight to flight. Default 0.
   */
  airframeSeed?: number;
}

/** What the scenario did, for the tests and the demo's notes. */
export interface ScenarioTruth {
  scenario: Scenario;
  severity: number;
  description: string;
  axis?: Axis;
  freqHz?: number;
  motor?: number;
  band?: { loHz: number; hiHz: number };
}

export const CRACK_DROP = [0.04, 0.08, 0.14] as const;
export const PROP_FACTOR = [2.2, 4, 8] as const;
export const BEARING_LEVEL = [4, 8, 16] as const;
export const STACK_GAIN = [1.5, 3, 6] as const;
export const STACK_FREQ_HZ = 128;
const BEARING_BAND = { loHz: 800, hiHz: 1600 };
/** How quickly one motor's share of the work wanders (s); its spread is 0.05 of throttle. */
const MOTOR_OFFSET_TAU_S = 3;
const MOTOR_OFFSET_SPREAD = 0.03;

interface Resonator {
  filters: Biquad[];
  mode: FrameMode;
}

/** Produces a log block by block, so a log of any length is made in constant memory. */
export class DemoLogGenerator {
  readonly sampleRateHz: number;
  readonly totalSamples: number;
  readonly truth: ScenarioTruth;
  readonly motors: number[];
  private readonly rand: Random;
  private readonly model: AirframeModel;
  private readonly dt: number;
  private readonly style: FlyingStyle;
  private produced = 0;

  private throttle = 0.35;
  private target = 0.35;
  private holdLeft = 0;
  private readonly motorOffset: number[];
  private readonly phase: number[];
  private readonly imbalance: number[];
  private readonly resonators: Resonator[];
  private readonly pilot: Biquad[][];
  private readonly pilotGain: number;
  private readonly bearing: Biquad | null;
  private readonly bearingLevel: number;
  private readonly bearingMotor: number;

  constructor(options: DemoLogOptions) {
    this.model = options.model ?? HOUSE_FRAME;
    this.rand = mulberry32(options.seed);
    this.sampleRateHz = options.sampleRateHz ?? 4000;
    this.dt = 1 / this.sampleRateHz;
    this.totalSamples = Math.round((options.durationS ?? 60) * this.sampleRateHz);
    this.style = options.style ?? "normal";
    const scenario = options.scenario ?? "healthy";
    const sev = (options.severity ?? 2) - 1;
    const fs = this.sampleRateHz;
    this.motors = this.model.motors.map((m) => m.motor);
    this.motorOffset = this.motors.map(() => 0);
    this.phase = this.motors.map(() => this.rand() * 2 * Math.PI);
    const individual = mulberry32(0x5eed + (options.airframeSeed ?? 0));
    this.imbalance = this.model.motors.map((m) => m.imbalance * (0.85 + 0.3 * individual()));
    const modes = this.model.modes.map((m) => ({
      ...m,
      freqHz: m.freqHz * (1 + 0.04 * (individual() - 0.5)),
      coupling: { ...m.coupling },
    }));
    let truth: ScenarioTruth = { scenario: "healthy", severity: 0, description: "no damage" };
    if (scenario === "cracked-arm") {
      const drop = CRACK_DROP[sev] ?? 0.08;
      const mode = modes.find((m) => m.name === "pitch bending");
      if (mode) {
        mode.freqHz *= 1 - drop;
        mode.gain *= 1 + 2 * drop;
        mode.q *= 1 - drop;
        truth = {
          scenario,
          severity: sev + 1,
          description: `arm ${options.position ?? 2} cracked: pitch bending mode ${Math.round(drop * 100)} % lower`,
          axis: "pitch",
          freqHz: mode.freqHz,
        };
      }
    } else if (scenario === "bent-prop") {
      const motor = options.position ?? 3;
      const factor = PROP_FACTOR[sev] ?? 4;
      const i = this.motors.indexOf(motor);
      if (i >= 0) this.imbalance[i] = (this.imbalance[i] ?? 0) * factor;
      truth = {
        scenario,
        severity: sev + 1,
        description: `prop on motor ${motor} bent: 1× vibration ×${factor}`,
        motor,
      };
    } else if (scenario === "loose-stack") {
      modes.push({
        name: "stack rocking",
        coupling: { roll: 0.6, pitch: 1, yaw: 0.1 },
        freqHz: STACK_FREQ_HZ,
        q: 9,
        gain: STACK_GAIN[sev] ?? 3,
      });
      truth = {
        scenario,
        severity: sev + 1,
        description: `flight-controller stack loose: rocks fore and aft at ${STACK_FREQ_HZ} Hz`,
        axis: "pitch",
        freqHz: STACK_FREQ_HZ,
      };
    } else if (scenario === "worn-bearing") {
      truth = {
        scenario,
        severity: sev + 1,
        description: `bearing of motor ${options.position ?? 1} worn: broadband noise ${BEARING_BAND.loHz}–${BEARING_BAND.hiHz} Hz`,
        motor: options.position ?? 1,
        band: BEARING_BAND,
      };
    }
    this.truth = truth;
    this.bearingMotor = this.motors.indexOf(options.position ?? 1);
    this.bearingLevel = scenario === "worn-bearing" ? (BEARING_LEVEL[sev] ?? 5) : 0;
    const centre = Math.sqrt(BEARING_BAND.loHz * BEARING_BAND.hiHz);
    this.bearing =
      this.bearingLevel > 0 && centre < 0.45 * fs
        ? Biquad.bandPass(centre, centre / (BEARING_BAND.hiHz - BEARING_BAND.loHz), fs)
        : null;

    this.resonators = modes
      .filter((m) => m.freqHz < 0.45 * fs)
      .map((mode) => ({ mode, filters: AXES.map(() => Biquad.bandPass(mode.freqHz, mode.q, fs)) }));
    // Stick motion: white noise through two Butterworth sections at 3 Hz; its variance is about
    // 2σ²·B/fs with B ≈ 3 Hz, so the gain below sets the rms rate the pilot commands.
    const rms = this.style === "hard" ? 260 : 120;
    this.pilotGain = rms / Math.sqrt((2 * 3) / fs);
    this.pilot = AXES.map(() => [
      Biquad.lowPass(3, Math.SQRT1_2, fs),
      Biquad.lowPass(3, Math.SQRT1_2, fs),
    ]);
  }

  get done(): boolean {
    return this.produced >= this.totalSamples;
  }

  /**
   * Fills the arrays with the next samples (at most their length) and returns how many were made.
   * gyro and setpoint in deg/s, throttle 0..1, rpm in rev/min.
   */
  next(out: {
    timeS: Float64Array;
    gyro: readonly Float64Array[];
    setpoint: readonly Float64Array[];
    throttle: Float64Array;
    rpm: readonly Float64Array[];
  }): number {
    const n = Math.min(out.timeS.length, this.totalSamples - this.produced);
    const model = this.model;
    const rand = this.rand;
    const fs = this.sampleRateHz;
    const nyquistGuard = 0.45 * fs;
    // White noise per sample has density 2σ²/fs: scale σ with √fs so that airflow and sensor noise
    // have the same density whatever rate the log is recorded at, as physical noise does.
    const densityScale = Math.sqrt(fs / 4000);
    const hard = this.style === "hard";
    const motorCount = this.motors.length;
    const vib = new Float64Array(3);
    for (let i = 0; i < n; i++) {
      const t = (this.produced + i) * this.dt;
      // Throttle: hold a target for a while, then pick a new one; the quad follows with a lag.
      if (this.holdLeft <= 0) {
        const punch = rand() < (hard ? 0.35 : 0.15);
        this.target = punch
          ? 0.75 + 0.2 * rand()
          : hard
            ? 0.4 + 0.35 * rand()
            : 0.22 + 0.38 * rand();
        this.holdLeft = 0.4 + 2.0 * rand();
      }
      this.holdLeft -= this.dt;
      this.throttle += (this.target - this.throttle) * (this.dt / 0.12);
      const thr = this.throttle;
      vib[0] = 0;
      vib[1] = 0;
      vib[2] = 0;
      for (let m = 0; m < motorCount; m++) {
        // Each motor works a little harder or softer than the mean as the controller balances the quad.
        const offset =
          (this.motorOffset[m] ?? 0) * (1 - this.dt / MOTOR_OFFSET_TAU_S) +
          MOTOR_OFFSET_SPREAD * Math.sqrt((2 * this.dt) / MOTOR_OFFSET_TAU_S) * gaussian(rand);
        this.motorOffset[m] = offset;
        const motorThrottle = Math.min(1, Math.max(0.05, thr + offset));
        const rpm = model.maxRpm * Math.sqrt(motorThrottle);
        (out.rpm[m] as Float64Array)[i] = rpm;
        const f1 = rpm / 60;
        const phase = ((this.phase[m] ?? 0) + 2 * Math.PI * f1 * this.dt) % (2 * Math.PI);
        this.phase[m] = phase;
        const load = (rpm / model.maxRpm) ** 2;
        let v = (this.imbalance[m] ?? 0) * load * Math.sin(phase);
        if (2 * f1 < nyquistGuard) v += model.order2 * load * Math.sin(2 * phase + 0.7);
        if (model.blades * f1 < nyquistGuard)
          v += model.bladePass * load * Math.sin(model.blades * phase + 1.9);
        const mount = model.motors[m];
        if (mount) {
          vib[0] = (vib[0] ?? 0) + mount.coupling.roll * v;
          vib[1] = (vib[1] ?? 0) + mount.coupling.pitch * v;
          vib[2] = (vib[2] ?? 0) + mount.coupling.yaw * v;
        }
      }
      let bearingNoise = 0;
      if (this.bearing) {
        const rpm = out.rpm[this.bearingMotor]?.[i] ?? 0;
        bearingNoise =
          this.bearing.step(gaussian(rand)) *
          this.bearingLevel *
          (rpm / model.maxRpm) *
          2.2 *
          densityScale;
      }
      const airflow = model.excitation * (0.15 + thr) * densityScale;
      out.timeS[i] = t;
      out.throttle[i] = thr;
      for (let a = 0; a < 3; a++) {
        const axis = AXES[a] as Axis;
        const input = (vib[a] ?? 0) + airflow * gaussian(rand) + bearingNoise * (a === 2 ? 0.6 : 1);
        let structure = 0.3 * input;
        for (const r of this.resonators) {
          const c = r.mode.coupling[axis];
          if (c > 0) structure += c * r.mode.gain * (r.filters[a] as Biquad).step(input);
        }
        const filters = this.pilot[a] as Biquad[];
        const stick = (filters[1] as Biquad).step(
          (filters[0] as Biquad).step(this.pilotGain * gaussian(rand)),
        );
        (out.setpoint[a] as Float64Array)[i] = stick;
        (out.gyro[a] as Float64Array)[i] =
          stick + structure + model.sensorNoise * densityScale * gaussian(rand);
      }
    }
    this.produced += n;
    return n;
  }
}

/** A whole log in memory (for tests and the demo seed). */
export interface GeneratedLog {
  sampleRateHz: number;
  timeS: Float64Array;
  gyro: [Float64Array, Float64Array, Float64Array];
  setpoint: [Float64Array, Float64Array, Float64Array];
  throttle: Float64Array;
  rpm: Float64Array[];
  motors: number[];
  truth: ScenarioTruth;
}

export function generateLog(options: DemoLogOptions): GeneratedLog {
  const g = new DemoLogGenerator(options);
  const n = g.totalSamples;
  const make = () => new Float64Array(n);
  const log: GeneratedLog = {
    sampleRateHz: g.sampleRateHz,
    timeS: make(),
    gyro: [make(), make(), make()],
    setpoint: [make(), make(), make()],
    throttle: make(),
    rpm: g.motors.map(make),
    motors: g.motors,
    truth: g.truth,
  };
  g.next(log);
  return log;
}

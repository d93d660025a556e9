import { AXES } from "../../logs/columns";
import { Biquad } from "../../signal/biquad";
import { mulberry32, type Random } from "../random";
import type { SimAirframe } from "./airframe";
import { applyDamage, type CaseTruth, type DamageSpec } from "./damage";
import {
  BiquadBank,
  ModalResonator,
  OnePoleLowPass,
  lowPassCoefficients,
  notchCoefficients,
  type BiquadCoefficients,
} from "./filters";
import { flightSchedule, type FlightMix, type Phase } from "./flight";
import { EscTelemetry, type TelemetrySpec } from "./telemetry";

/**
 * A flight simulated at the flight controller's loop rate (8 kHz) and logged as a logger does:
 *
 *   motors (1×, 2×, blade pass, 4×, bearing noise and defect orders, damage extras)
 *   + airflow and prop wash ──► frame modes (damped resonators) ──► body rate at the gyro
 *   + pilot's manoeuvres ──► gyro sensor (noise, ±full-scale clipping, 16-bit steps)
 *   ──► controller filters (a notch on each motor's chosen harmonics from its own rotation
 *       estimate, a one-pole low-pass, optionally a Butterworth biquad) ──► logged gyro,
 *   written every k-th loop sample for a 8/k kHz log (plain sample dropping: what the filters left
 *   above the log's Nyquist aliases), with the ESC's rpm telemetry (steps, hold, delay, noise,
 *   dropouts) in the rpm columns and the throttle command in the throttle column.
 */

export interface DropoutSpec {
  /** Motor whose telemetry drops to 0. */
  motor: number;
  bursts: number;
  /** Burst length range, s. */
  minS: number;
  maxS: number;
}

export interface FlightSpec {
  /** Seed of the flight (pilot, turbulence, noise). */
  seed: number;
  durationS: number;
  mix: FlightMix;
  /** Battery sag over the flight: rpm at a given throttle falls by this fraction by the end. Default 0.06–0.12 from the seed. */
  batterySag?: number;
  dropouts?: DropoutSpec;
}

/** One log as the logger wrote it: deg/s, throttle 0..1, rpm as reported by the ESCs. */
export interface LoggedLog {
  rateHz: number;
  timeS: Float64Array;
  gyro: [Float64Array, Float64Array, Float64Array];
  throttle: Float64Array;
  rpm: Float64Array[];
  /** Each motor's true speed at the logged instants, rev/min: the truth behind the telemetry (not written to files). */
  trueRpm: Float64Array[];
  motors: number[];
}

export interface SimulatedFlight {
  logs: LoggedLog[];
  truth: CaseTruth;
  /** The airframe as flown (damage applied). */
  airframe: SimAirframe;
  phases: Phase[];
  /** Telemetry dropout intervals per motor, s. */
  dropouts: Record<number, [number, number][]>;
}

const PILOT_NOISE_HZ = 2;
const PILOT_RMS_DEGS = 40;
const WASH_CENTRE_HZ = 50;
const WASH_RMS_DEGS = 30;
const MIX_GAIN = 1.5e-5;
const BEARING_CENTRE_HZ = 800;
/** Time constant of the wander of the controller's rpm-estimate error, s. */
const ESTIMATE_TAU_S = 0.5;
/** Slow parts of the model (pilot, motor share wander, notch centres) are updated every this many loop samples. */
const SLOW_EVERY = 4;

/** Standard normal deviates from Box–Muller, both of each pair used (the simulator's hot loop needs many). */
function gaussianPairs(rand: Random): () => number {
  let spare = 0;
  let has = false;
  return () => {
    if (has) {
      has = false;
      return spare;
    }
    let u = rand();
    while (u <= 1e-300) u = rand();
    const r = Math.sqrt(-2 * Math.log(u));
    const th = 2 * Math.PI * rand();
    spare = r * Math.sin(th);
    has = true;
    return r * Math.cos(th);
  };
}

const COS_07 = Math.cos(0.7);
const SIN_07 = Math.sin(0.7);
const COS_19 = Math.cos(1.9);
const SIN_19 = Math.sin(1.9);
const COS_23 = Math.cos(2.3);
const SIN_23 = Math.sin(2.3);

/** Moves a notch in place (its bank holds the same object). */
function setNotch(
  c: BiquadCoefficients | undefined,
  centreHz: number,
  q: number,
  fs: number,
): void {
  if (!c) return;
  const n = notchCoefficients(centreHz, q, fs);
  c.b0 = n.b0;
  c.b1 = n.b1;
  c.b2 = n.b2;
  c.a1 = n.a1;
  c.a2 = n.a2;
}

function dropoutIntervals(
  spec: DropoutSpec | undefined,
  durationS: number,
  rand: Random,
): [number, number][] {
  if (!spec) return [];
  const out: [number, number][] = [];
  for (let i = 0; i < spec.bursts; i++) {
    const len = spec.minS + (spec.maxS - spec.minS) * rand();
    const start = 1 + (durationS - 2 - len) * rand();
    out.push([start, start + len]);
  }
  out.sort((a, b) => a[0] - b[0]);
  return out;
}

/**
 * Simulates one flight of `airframe` with `damage` (null: healthy) and returns its logs at each of
 * `logRatesHz` (each must divide the loop rate). The same arguments give the same logs.
 */
export function simulateFlight(
  base: SimAirframe,
  flight: FlightSpec,
  damage: DamageSpec | null,
  logRatesHz: readonly number[],
): SimulatedFlight {
  const { airframe, truth } = applyDamage(base, damage);
  const fs = airframe.fc.loopRateHz;
  for (const r of logRatesHz) {
    if (!(r > 0) || fs % r !== 0)
      throw new RangeError(`log rate ${r} Hz does not divide the loop rate ${fs} Hz`);
  }
  const dt = 1 / fs;
  const total = Math.round(flight.durationS * fs);
  const rand = mulberry32(0x5111 + 2654435761 * flight.seed + 31 * airframe.id);
  const gauss = gaussianPairs(rand);
  const sag = flight.batterySag ?? 0.06 + 0.06 * rand();
  const phases = flightSchedule(flight.mix, flight.durationS, flight.seed, airframe.hoverThrottle);
  const motors = airframe.motors;
  const motorCount = motors.length;
  const dropouts: Record<number, [number, number][]> = {};
  const telemetry = motors.map((m) => {
    const intervals =
      flight.dropouts?.motor === m.motor
        ? dropoutIntervals(flight.dropouts, flight.durationS, rand)
        : [];
    dropouts[m.motor] = intervals;
    const spec: TelemetrySpec = { ...airframe.telemetry, dropouts: intervals };
    return new EscTelemetry(spec, fs, mulberry32(0x7e1e + 97 * m.motor + 7 * flight.seed));
  });

  const logs: LoggedLog[] = logRatesHz.map((rateHz) => {
    const n = Math.floor(total / (fs / rateHz));
    const make = () => new Float64Array(n);
    return {
      rateHz,
      timeS: make(),
      gyro: [make(), make(), make()],
      throttle: make(),
      rpm: motors.map(make),
      trueRpm: motors.map(make),
      motors: motors.map((m) => m.motor),
    };
  });
  const steps = logRatesHz.map((r) => fs / r);

  const modes = airframe.modes.filter((m) => m.naturalHz < 0.45 * fs);
  const resonators = modes.map((m) => new ModalResonator(m.naturalHz, m.dampingRatio, fs));
  const modeShape = modes.map((m) => AXES.map((a) => m.shape[a]));
  const modeGain = modes.map((m) => m.gain);

  // Noise levels are set as densities: a white sequence of σ has one-sided density 2σ²/fs.
  const densityScale = Math.sqrt(fs / 4000);
  const sensorSigma = airframe.sensor.noiseDensity * Math.sqrt(fs / 2);
  const lsb = (2 * airframe.sensor.rangeDegS) / 2 ** airframe.sensor.bits;
  const fullScale = airframe.sensor.rangeDegS;
  const slowRate = fs / SLOW_EVERY;
  const pilotFilters = AXES.map(() => [
    new OnePoleLowPass(PILOT_NOISE_HZ, slowRate),
    new OnePoleLowPass(PILOT_NOISE_HZ, slowRate),
  ]);
  // Two cascaded one-poles of corner fc pass white noise of σ² as about σ²·(πfc/fs)/2.
  const pilotScale = PILOT_RMS_DEGS / Math.sqrt((Math.PI * PILOT_NOISE_HZ) / slowRate / 2);
  const stick = [0, 0, 0];
  const wash = AXES.map(() => Biquad.bandPass(WASH_CENTRE_HZ, 0.5, fs));
  const washScale = WASH_RMS_DEGS / Math.sqrt((2 * (WASH_CENTRE_HZ / 0.5)) / fs);
  // Worn-bearing noise is broadband, from a few hundred Hz to beyond a kHz.
  const bearingFilters = motors.map(() => Biquad.bandPass(BEARING_CENTRE_HZ, 0.5, fs));

  const fc = airframe.fc;
  const harmonics = fc.notchHarmonics;
  const notchCoeffs = motors.flatMap(() =>
    harmonics.map(() => notchCoefficients(200, fc.notchQ, fs)),
  );
  const notches = notchCoeffs.map((c) => new BiquadBank(c, 3));
  const lpf1 = AXES.map(() => new OnePoleLowPass(fc.lowPass1Hz, fs));
  const lpf2 =
    fc.lowPass2Hz === null
      ? null
      : new BiquadBank(lowPassCoefficients(fc.lowPass2Hz, Math.SQRT1_2, fs), 3);

  const rpm = motors.map(() => airframe.idleRpm);
  const estimateDelay = Math.max(0, Math.round(fc.rpmEstimate.delayS * fs));
  const rpmHistory = motors.map(() => new Float64Array(estimateDelay + 1).fill(airframe.idleRpm));
  // Each motor's estimate is off by a steady bias (its own, kept from flight to flight) plus a
  // slow wander of half that size.
  const estimateBias = motors.map(
    (m) =>
      fc.rpmEstimate.errorFraction * (2 * mulberry32(0xb1a5 + 131 * airframe.id + m.motor)() - 1),
  );
  const estimateError = motors.map(() => 0);
  const phase = motors.map(() => rand() * 2 * Math.PI);
  const wander = motors.map(() => 0);
  const bodyRate = [0, 0, 0];
  const prevRate = [0, 0, 0];
  const exc = [0, 0, 0];
  const vib = [0, 0, 0];
  const [bpfo, bpfi] = airframe.bearingOrders;
  const logged = [0, 0, 0];
  const rateTargets = [0, 0, 0];
  const reported = motors.map(() => 0);
  let thr = airframe.hoverThrottle;
  let washLevel = 0;
  let p = 0;

  for (let n = 0; n < total; n++) {
    const t = n * dt;
    while (p + 1 < phases.length && t >= (phases[p + 1]?.startS ?? Infinity)) p++;
    const ph = phases[p] ?? phases[0];
    if (!ph) break;
    const progress = t / flight.durationS;
    // Hover needs more throttle as the pack sags (thrust ∝ rpm², rpm ∝ voltage).
    const target =
      ph.kind === "hover" ? Math.min(1, ph.throttle * (1 + 2 * sag * progress)) : ph.throttle;
    const thrTau = ph.kind === "flip" || ph.kind === "roll" || ph.kind === "punch" ? 0.04 : 0.1;
    thr += (target - thr) * (dt / thrTau);
    washLevel += ((ph.kind === "wash" ? 1 : 0) - washLevel) * (dt / 0.15);
    const supply = 1 - sag * progress - 0.04 * thr;

    const slow = n % SLOW_EVERY === 0;
    rateTargets[0] = ph.rollRate;
    rateTargets[1] = ph.pitchRate;
    rateTargets[2] = ph.yawRate;
    for (let a = 0; a < 3; a++) {
      const f = pilotFilters[a];
      if (slow && f)
        stick[a] = (f[1] as OnePoleLowPass).step(
          (f[0] as OnePoleLowPass).step(pilotScale * gauss()),
        );
      prevRate[a] = bodyRate[a] ?? 0;
      bodyRate[a] =
        (bodyRate[a] ?? 0) +
        ((rateTargets[a] ?? 0) + (stick[a] ?? 0) - (bodyRate[a] ?? 0)) * (dt / 0.05);
    }

    exc[0] = 0;
    exc[1] = 0;
    exc[2] = 0;
    for (let m = 0; m < motorCount; m++) {
      const spec = motors[m];
      if (!spec) continue;
      let demand = 0;
      for (let a = 0; a < 3; a++)
        demand +=
          spec.mix[AXES[a] ?? "roll"] * (((bodyRate[a] ?? 0) - (prevRate[a] ?? 0)) / dt) * MIX_GAIN;
      demand = Math.max(-0.25, Math.min(0.25, demand));
      let w = wander[m] ?? 0;
      if (slow) {
        const sdt = SLOW_EVERY * dt;
        w = w * (1 - sdt / 3) + 0.03 * Math.sqrt((2 * sdt) / 3) * gauss();
        wander[m] = w;
      }
      const motorThr = Math.max(0, Math.min(1, thr + demand + w));
      const rpmTarget =
        supply *
        spec.kvFactor *
        (airframe.idleRpm + (airframe.maxRpm - airframe.idleRpm) * Math.sqrt(motorThr));
      const r = (rpm[m] ?? 0) + (rpmTarget - (rpm[m] ?? 0)) * (dt / airframe.motorTauS);
      rpm[m] = r;
      const phi = (phase[m] ?? 0) + (2 * Math.PI * r * dt) / 60;
      phase[m] = phi;
      const rel = r / airframe.maxRpm;
      const load = rel * rel;
      const am = spec.amDepth > 0 ? 1 + spec.amDepth * Math.sin(2 * Math.PI * spec.amHz * t) : 1;
      // Orders from the half-angle phasor by the angle-sum identities: two trig calls per motor.
      const sh = Math.sin(0.5 * phi);
      const ch = Math.cos(0.5 * phi);
      const s1 = 2 * sh * ch;
      const c1 = ch * ch - sh * sh;
      const s2 = 2 * s1 * c1;
      const c2 = c1 * c1 - s1 * s1;
      const s3 = s2 * c1 + c2 * s1;
      const c3 = c2 * c1 - s2 * s1;
      const s4 = 2 * s2 * c2;
      const c4 = c2 * c2 - s2 * s2;
      let force =
        am * (spec.order1 * s1 + spec.order2 * (s2 * COS_07 + c2 * SIN_07)) +
        spec.bladePass * (s3 * COS_19 + c3 * SIN_19) +
        spec.order4 * (s4 * COS_23 + c4 * SIN_23);
      if (spec.halfOrders > 0) {
        const s15 = s1 * ch + c1 * sh;
        const s25 = s2 * ch + c2 * sh;
        force += spec.halfOrders * (sh + s15 + s25);
      }
      force += spec.bearingTone * (Math.sin(bpfo * phi + 0.4) + Math.sin(bpfi * phi + 1.3));
      force *= load;
      force +=
        spec.bearingNoise * rel * densityScale * (bearingFilters[m] as Biquad).step(gauss()) * 2.2;
      exc[0] = (exc[0] ?? 0) + spec.coupling.roll * force;
      exc[1] = (exc[1] ?? 0) + spec.coupling.pitch * force;
      exc[2] = (exc[2] ?? 0) + spec.coupling.yaw * force;
    }
    const air = airframe.airflow * (0.15 + thr) * densityScale;
    for (let a = 0; a < 3; a++) {
      let e = (exc[a] ?? 0) + air * gauss();
      if (washLevel > 1e-3) e += washLevel * washScale * (wash[a] as Biquad).step(gauss());
      exc[a] = e;
      vib[a] = 0.3 * e;
    }
    for (let k = 0; k < resonators.length; k++) {
      const shape = modeShape[k] as number[];
      const input =
        (shape[0] ?? 0) * (exc[0] ?? 0) +
        (shape[1] ?? 0) * (exc[1] ?? 0) +
        (shape[2] ?? 0) * (exc[2] ?? 0);
      const y = (modeGain[k] ?? 0) * (resonators[k] as ModalResonator).step(input);
      vib[0] = (vib[0] ?? 0) + (shape[0] ?? 0) * y;
      vib[1] = (vib[1] ?? 0) + (shape[1] ?? 0) * y;
      vib[2] = (vib[2] ?? 0) + (shape[2] ?? 0) * y;
    }

    // The controller's notches follow its own rotation estimate of each motor (from the ESC at the
    // loop rate, not the logged telemetry): a little late and a little off.
    for (let m = 0; m < motorCount; m++)
      (rpmHistory[m] as Float64Array)[n % (estimateDelay + 1)] = rpm[m] ?? 0;
    if (slow) {
      const sdt = SLOW_EVERY * dt;
      for (let m = 0; m < motorCount; m++) {
        const e =
          (estimateError[m] ?? 0) * (1 - sdt / ESTIMATE_TAU_S) +
          0.5 * fc.rpmEstimate.errorFraction * Math.sqrt((2 * sdt) / ESTIMATE_TAU_S) * gauss();
        estimateError[m] = e;
        const late = (rpmHistory[m] as Float64Array)[(n + 1) % (estimateDelay + 1)] ?? 0;
        const f1 = (late * (1 + (estimateBias[m] ?? 0) + e)) / 60;
        for (let h = 0; h < harmonics.length; h++) {
          const centre = Math.min(0.45 * fs, Math.max(fc.notchMinHz, f1 * (harmonics[h] ?? 1)));
          setNotch(notchCoeffs[m * harmonics.length + h], centre, fc.notchQ, fs);
        }
      }
    }
    for (let a = 0; a < 3; a++) {
      let g = (bodyRate[a] ?? 0) + (vib[a] ?? 0) + sensorSigma * gauss();
      g = Math.max(-fullScale, Math.min(fullScale - lsb, g));
      g = Math.round(g / lsb) * lsb;
      for (const bank of notches) g = bank.step(a, g);
      g = (lpf1[a] as OnePoleLowPass).step(g);
      if (lpf2) g = lpf2.step(a, g);
      logged[a] = Math.round(g / lsb) * lsb;
    }
    for (let m = 0; m < motorCount; m++)
      reported[m] = (telemetry[m] as EscTelemetry).step(rpm[m] ?? 0);

    for (let l = 0; l < logs.length; l++) {
      const step = steps[l] ?? 1;
      if (n % step !== 0) continue;
      const log = logs[l] as LoggedLog;
      const i = n / step;
      if (i >= log.timeS.length) continue;
      log.timeS[i] = t;
      log.gyro[0][i] = logged[0] ?? 0;
      log.gyro[1][i] = logged[1] ?? 0;
      log.gyro[2][i] = logged[2] ?? 0;
      log.throttle[i] = thr;
      for (let m = 0; m < motorCount; m++) {
        (log.rpm[m] as Float64Array)[i] = reported[m] ?? 0;
        (log.trueRpm[m] as Float64Array)[i] = rpm[m] ?? 0;
      }
    }
  }
  return { logs, truth, airframe, phases, dropouts };
}

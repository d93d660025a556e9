import { gaussian, type Random } from "../random";

/**
 * The rpm an ESC reports back, as a logger records it: a reading every 1/updateHz s of the rpm the
 * motor had delayS earlier, with relative noise, rounded to stepRpm, and held until the next
 * reading; during a dropout the column reads 0. The flight controller's own notch filters do not
 * use this (they follow the controller's own rotation estimate); only the log's rpm columns do.
 */
export interface TelemetrySpec {
  /** Readings per second (a few hundred Hz is common practice for ESC telemetry). */
  updateHz: number;
  /** Age of a reading when it arrives, s. */
  delayS: number;
  /** Reading resolution, mechanical rev/min. */
  stepRpm: number;
  /** Standard deviation of the reading's error, as a fraction of the rpm. */
  noiseFraction: number;
  /** Time intervals [startS, endS) in which the reading is 0. */
  dropouts: readonly (readonly [number, number])[];
}

export class EscTelemetry {
  private readonly spec: TelemetrySpec;
  private readonly rand: Random;
  private readonly history: Float64Array;
  private readonly delaySamples: number;
  private readonly loopDt: number;
  private written = 0;
  private nextUpdateS = 0;
  private held = 0;
  private dropout = 0;

  constructor(spec: TelemetrySpec, loopRateHz: number, rand: Random) {
    this.spec = spec;
    this.rand = rand;
    this.loopDt = 1 / loopRateHz;
    this.delaySamples = Math.max(0, Math.round(spec.delayS * loopRateHz));
    this.history = new Float64Array(this.delaySamples + 1);
  }

  /** Feeds the motor's true rpm for loop sample n (time n/loopRate) and returns the logged reading. */
  step(trueRpm: number): number {
    const n = this.written++;
    const len = this.history.length;
    this.history[n % len] = trueRpm;
    const t = n * this.loopDt;
    if (t + 1e-12 >= this.nextUpdateS) {
      // Before the first reading has travelled the delay, the ESC reports the motor at rest.
      const old =
        n >= this.delaySamples
          ? (this.history[(n - this.delaySamples) % len] ?? 0)
          : (this.history[0] ?? 0);
      const noisy = old * (1 + this.spec.noiseFraction * gaussian(this.rand));
      this.held = Math.max(0, Math.round(noisy / this.spec.stepRpm) * this.spec.stepRpm);
      this.nextUpdateS += 1 / this.spec.updateHz;
    }
    const drops = this.spec.dropouts;
    while (this.dropout < drops.length && (drops[this.dropout]?.[1] ?? 0) <= t) this.dropout++;
    const d = drops[this.dropout];
    return d && t >= d[0] ? 0 : this.held;
  }
}

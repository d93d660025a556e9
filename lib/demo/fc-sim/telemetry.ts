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

/** The last delay + 1 samples: what went in `delaySamples` pushes ago. */
class DelayLine {
  private readonly history: Float64Array;
  /** Samples pushed so far. */
  pushed = 0;

  constructor(private readonly delaySamples: number) {
    this.history = new Float64Array(delaySamples + 1);
  }

  /** Stores x and returns the sample `delaySamples` before it (the first sample until then). */
  push(x: number): number {
    const n = this.pushed++;
    const len = this.history.length;
    this.history[n % len] = x;
    return n >= this.delaySamples
      ? (this.history[(n - this.delaySamples) % len] ?? 0)
      : (this.history[0] ?? 0);
  }
}

export class EscTelemetry {
  private readonly delay: DelayLine;
  private readonly loopDt: number;
  /** The reading held since the last update, when the next one is due, and the next dropout. */
  private readonly state = { held: 0, nextUpdateS: 0, dropout: 0 };

  constructor(
    private readonly spec: TelemetrySpec,
    loopRateHz: number,
    private readonly rand: Random,
  ) {
    this.loopDt = 1 / loopRateHz;
    this.delay = new DelayLine(Math.max(0, Math.round(spec.delayS * loopRateHz)));
  }

  /** Feeds the motor's true rpm for loop sample n (time n/loopRate) and returns the logged reading. */
  step(trueRpm: number): number {
    const state = this.state;
    const t = this.delay.pushed * this.loopDt;
    // Before the first reading has travelled the delay, the ESC reports the motor at rest.
    const old = this.delay.push(trueRpm);
    // 1e-12 s: the running sum of 1/updateHz steps may round just past the sample it falls on.
    if (t + 1e-12 >= state.nextUpdateS) {
      const noisy = old * (1 + this.spec.noiseFraction * gaussian(this.rand));
      state.held = Math.max(0, Math.round(noisy / this.spec.stepRpm) * this.spec.stepRpm);
      state.nextUpdateS += 1 / this.spec.updateHz;
    }
    const drops = this.spec.dropouts;
    while (state.dropout < drops.length && (drops[state.dropout]?.[1] ?? 0) <= t) state.dropout++;
    const d = drops[state.dropout];
    return d && t >= d[0] ? 0 : state.held;
  }
}

import { bandPower } from "../signal/bands";
import { round } from "../signal/stats";
import { SIGNAL_CHECKS } from "./settings";
import type { SignalCheck } from "./types";

/** Running extremes of one gyro axis and how many samples sat exactly at them. */
export interface SignalStats {
  min: number;
  max: number;
  atMin: number;
  atMax: number;
}

export function newSignalStats(): SignalStats {
  return { min: Infinity, max: -Infinity, atMin: 0, atMax: 0 };
}

/** Folds samples [0, n) of `x` into the running extremes. */
export function trackExtremes(st: SignalStats, x: Float64Array, n: number): void {
  let { min, max, atMin, atMax } = st;
  for (let i = 0; i < n; i++) {
    const v = x[i] ?? 0;
    if (v > max) {
      max = v;
      atMax = 1;
    } else if (v === max) atMax++;
    if (v < min) {
      min = v;
      atMin = 1;
    } else if (v === min) atMin++;
  }
  st.min = min;
  st.max = max;
  st.atMin = atMin;
  st.atMax = atMax;
}

/**
 * Whether a gyro axis carries a signal worth comparing ({@link SIGNAL_CHECKS}), from its extremes
 * and its averaged PSD in (deg/s)²/Hz; the rms is taken over [loHz, hiHz).
 */
export function checkSignal(
  st: SignalStats,
  samples: number,
  psd: Float64Array,
  binHz: number,
  loHz: number,
  hiHz: number,
): SignalCheck {
  const n = Math.max(1, samples);
  const clippedShare = st.max === st.min ? 1 : Math.max(st.atMax, st.atMin) / n;
  const base = { clippedShare: round(clippedShare, 4), minDegS: st.min, maxDegS: st.max };
  const peak = Math.max(Math.abs(st.min), Math.abs(st.max));
  let finite = true;
  for (let k = 0; k < psd.length; k++) if (!Number.isFinite(psd[k])) finite = false;
  if (!finite || !(peak <= SIGNAL_CHECKS.maxPlausibleDegS)) {
    return {
      ...base,
      usable: false,
      problem: "out-of-range",
      text: `values reach ${peak.toPrecision(3)} deg/s, beyond any rate gyro's range (a broken cell or a wrong unit)`,
    };
  }
  if (st.max === st.min) {
    return {
      ...base,
      usable: false,
      problem: "constant",
      text: `every sample is ${st.max} deg/s: the gyro was not recording or is stuck`,
    };
  }
  const rms = Math.sqrt(bandPower(psd, binHz, { loHz, hiHz }));
  if (!(rms >= SIGNAL_CHECKS.flatRmsDegS)) {
    return {
      ...base,
      usable: false,
      problem: "flat",
      text: `vibration above ${loHz} Hz is only ${rms.toPrecision(2)} deg/s rms, less than one step of a gyro: no signal to judge`,
    };
  }
  if (clippedShare >= SIGNAL_CHECKS.clippedShare) {
    const at = st.atMax >= st.atMin ? st.max : st.min;
    return {
      ...base,
      usable: false,
      problem: "clipped",
      text: `${(clippedShare * 100).toFixed(1)} % of the samples sit at ${at} deg/s: the gyro is saturated (clipped), which spreads false vibration over the spectrum`,
    };
  }
  return { ...base, usable: true };
}

import type { FrequencyBand } from "../signal/bands";
import type { Averaging, WelchOptions } from "../signal/welch";
import type { WindowName } from "../signal/windows";

/** Everything that shapes an analysis. Defaults in {@link DEFAULT_ANALYSIS}. */
export interface AnalysisSettings {
  /** Samples per Welch segment (power of two); undefined: bins ≤ 2 Hz for the log's rate. */
  nperseg?: number;
  /** Overlap as a fraction of a segment, 0 ≤ overlap < 1. Default 0.5. */
  overlap: number;
  window: WindowName;
  average: Averaging;
  /** Number of equal throttle bands over 0..1. Default 8. */
  throttleBands: number;
  /**
   * Edges of the analysis bands in Hz. Bands reaching above 90 % of Nyquist are dropped for a
   * log (the flight controller's anti-alias filtering bends the top of the spectrum).
   */
  bandEdgesHz: number[];
  /** Peaks and bands start here; below it the spectrum is the pilot's stick motion. */
  minFreqHz: number;
  /** Noise floor: median density above this corner (lowered for slow logs). */
  floorCornerHz: number;
  /** Prop blades, for the blade-pass order. Default 3. */
  bladeCount: number;
  /** Minimum prominence of a reported peak, dB. */
  minProminenceDb: number;
  /** A throttle band needs this many segments to be compared or searched for peaks. */
  minBandSegments: number;
}

export const DEFAULT_ANALYSIS: AnalysisSettings = {
  overlap: 0.5,
  window: "hann",
  average: "mean",
  throttleBands: 8,
  bandEdgesHz: [40, 80, 120, 170, 230, 300, 400, 550, 750, 1000, 1400, 2000, 2800, 4000],
  minFreqHz: 40,
  floorCornerHz: 600,
  bladeCount: 3,
  minProminenceDb: 6,
  minBandSegments: 8,
};

/**
 * When a gyro axis carries no usable signal (issue: a log of zeros or of a stuck sensor must not
 * read as a quiet, healthy airframe). An axis failing any check is not compared, and says why.
 */
export const SIGNAL_CHECKS = {
  /**
   * Below this rms over the analysed range the axis is flat: less than a sixth of one step of a
   * 16-bit gyro at ±2000 deg/s full scale (0.061 deg/s per LSB; common MEMS gyro setting, from
   * memory). A flying quad's vibration is several deg/s.
   */
  flatRmsDegS: 0.01,
  /**
   * No rate gyro measures this far (MEMS parts top out at a few thousand deg/s, from memory); a
   * value beyond it is a broken cell, and its square would swamp (or overflow) the spectrum.
   */
  maxPlausibleDegS: 1e5,
  /**
   * A signal that sits exactly at its own extreme for this share of its samples is clipped
   * (saturated): a continuous signal reaches its maximum about once, a quantised one a handful
   * of times; 1 % of a log is seconds of flat tops, which spread harmonics over the spectrum.
   */
  clippedShare: 0.01,
} as const;

/**
 * rpm telemetry a motor cannot produce (ESC telemetry drops to 0 in bursts, sticks, glitches):
 * a motor's order-tracking block with such a value is masked, never measured.
 */
/**
 * Bins of a motor's own rotation rate for its orders (RpmBinLevels): 3 % wide from 10 Hz up. An
 * order's level depends on where its frequency falls on the frame's response, which can change by
 * 10 dB over a few percent near a mode, and on the load (force ∝ rpm²); within 3 % of rpm neither
 * moves much. Comparing like rpm with like rpm is order analysis as rotating-machinery monitoring
 * does it (levels against speed; common practice).
 */
export const RPM_MAP = { baseHz: 10, step: 0.03, steadySpread: 0.1 } as const;

/** The RPM_MAP bin of a rotation rate, Hz. */
export function rpmBinOf(rotationHz: number): number {
  return Math.floor(Math.log(rotationHz / RPM_MAP.baseHz) / Math.log1p(RPM_MAP.step));
}

export const TELEMETRY_LIMITS = {
  /**
   * Below this a propeller motor in flight is not turning (idle with props is a few thousand
   * rpm; common practice). Below it the 1× would sit in the pilot's stick motion anyway.
   */
  minRpm: 600,
  /** Above this no multirotor motor spins (the smallest high-kV motors reach about 60–80k; from memory). */
  maxRpm: 100_000,
  /**
   * The fastest a motor can change its speed: about its top speed (≈ 40 000 rpm) over its
   * mechanical time constant (≈ 20 ms for a racing motor with its prop; from memory), 2e6 rpm/s.
   * Held telemetry is judged over the time since its value last changed.
   */
  maxSlewRpmPerS: 2e6,
} as const;

/**
 * The orders each motor is tracked at: whole and half orders from 0.5× to 4× (the order spectrum
 * between the whole orders shows rattle and bearing tones), and the blade pass when above 4×.
 */
export function trackedOrders(bladeCount: number): number[] {
  const orders = [0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4];
  if (bladeCount > 4) orders.push(bladeCount);
  return orders;
}

/** The share of Nyquist up to which a log's spectrum is trusted. */
export const USABLE_NYQUIST_FRACTION = 0.9;

/** Bands of the settings that fit below `maxHz`. */
export function bandsBelow(edges: readonly number[], maxHz: number): FrequencyBand[] {
  const bands: FrequencyBand[] = [];
  for (let i = 0; i + 1 < edges.length; i++) {
    const loHz = edges[i] ?? 0;
    const hiHz = edges[i + 1] ?? 0;
    if (hiHz <= maxHz) bands.push({ loHz, hiHz });
  }
  return bands;
}

/** The corner above which the floor is measured for a log whose usable range ends at maxHz. */
export function floorCorner(
  settings: Pick<AnalysisSettings, "floorCornerHz">,
  maxHz: number,
): number {
  return Math.min(settings.floorCornerHz, 0.6 * maxHz);
}

export function welchOptionsOf(settings: AnalysisSettings, nperseg: number): WelchOptions {
  return {
    nperseg,
    noverlap: Math.round(settings.overlap * nperseg),
    window: settings.window,
    average: settings.average,
  };
}

/** A throttle band as people read it: "25–38 %" (throttle 0..1 shown in percent). */
export function throttleBandLabel(lo: number, hi: number): string {
  return `${Math.round(lo * 100)}–${Math.round(hi * 100)} %`;
}

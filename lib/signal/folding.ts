/**
 * Where a tone shows in a sampled signal. Sampling at fs cannot tell a tone at f from one at
 * |f − k·fs| for any whole k: its samples are the same numbers (the sampling theorem; e.g.
 * Oppenheim & Schafer, Discrete-Time Signal Processing, §4.2). A log written by dropping samples
 * (flight controllers log every n-th loop sample, with no filter of their own before it) keeps
 * every tone its filters left, each folded into 0..fs/2 at its full amplitude.
 */

/** The frequency in [0, fs/2] at which a tone at `freqHz` shows when sampled at `sampleRateHz`. */
export function foldedHz(freqHz: number, sampleRateHz: number): number {
  const r = Math.abs(freqHz) % sampleRateHz;
  return r > sampleRateHz / 2 ? sampleRateHz - r : r;
}

/**
 * The folds a frequency range [loHz, hiHz] passes through land together: true when the whole
 * range lies between two consecutive multiples of fs/2, so that it shows as one range in 0..fs/2
 * (its ends folded), never wrapped back on itself.
 */
export function foldsWhole(loHz: number, hiHz: number, sampleRateHz: number): boolean {
  const half = sampleRateHz / 2;
  return Math.floor(loHz / half) === Math.floor(hiHz / half);
}

import { round } from "../signal/stats";

/** Sizes, times and rates as the reader's sentences give them. */

/** Bytes in binary units: "512 bytes", "9.8 KiB", "1 MiB", "1.5 GiB". */
export function formatBytes(n: number): string {
  if (n >= 1024 ** 3) return `${round(n / 1024 ** 3, 1)} GiB`;
  if (n >= 1024 ** 2) return `${round(n / 1024 ** 2, 1)} MiB`;
  if (n >= 1024) return `${round(n / 1024, 1)} KiB`;
  return `${n} bytes`;
}

/** Seconds to the microsecond: "0.004 s". */
export function formatSeconds(s: number): string {
  return `${round(s, 6)} s`;
}

/** A sample rate: "250 Hz", "4 kHz", or what a rate that is not finite means. */
export function formatRate(hz: number): string {
  if (!Number.isFinite(hz)) return "no usable time step";
  return hz >= 1000 ? `${round(hz / 1000, 3)} kHz` : `${round(hz, 3)} Hz`;
}

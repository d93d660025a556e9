import type { LogInfo } from "@/lib/logs/read-log";

/**
 * The description a reader would hand on for a log without metadata or headers: for unit tests
 * that feed an analysis part generated blocks directly.
 */
export function logInfo(
  sampleRateHz: number,
  options: { motors?: number[]; hasThrottle?: boolean } = {},
): LogInfo {
  return {
    metadata: {},
    headers: [],
    map: [],
    guesses: [],
    sampleRateHz,
    hasThrottle: options.hasThrottle ?? true,
    motors: options.motors ?? [],
    hasSetpoint: false,
  };
}

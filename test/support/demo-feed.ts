import { LogAnalyzer } from "@/lib/analysis/analyzer";
import type { AnalysisSettings } from "@/lib/analysis/settings";
import type { LogAnalysis } from "@/lib/analysis/types";
import { DemoLogGenerator, type DemoLogOptions } from "@/lib/demo/generator";
import type { LogInfo, ReadSummary } from "@/lib/logs/read-log";

/** One block of samples as the analyser receives them; a transform may change it in place. */
export interface FeedBlock {
  n: number;
  /** Index of the block's first sample in the log. */
  start: number;
  sampleRateHz: number;
  timeS: Float64Array;
  gyro: [Float64Array, Float64Array, Float64Array];
  throttle: Float64Array;
  rpm: Float64Array[];
}

const BLOCK = 4096;

/**
 * A demo log fed to the analyser with a test's own change applied to every block (a broken
 * telemetry channel, a stuck gyro …): generated cases for the unit tests, not demo data.
 */
export function analyzeWith(
  options: DemoLogOptions,
  transform: (b: FeedBlock) => void,
  settings: Partial<AnalysisSettings> = {},
): LogAnalysis {
  const g = new DemoLogGenerator(options);
  const analyzer = new LogAnalyzer(settings);
  const info: LogInfo = {
    metadata: {},
    headers: [],
    map: [],
    guesses: [],
    sampleRateHz: g.sampleRateHz,
    hasThrottle: true,
    motors: g.motors,
    hasSetpoint: false,
  };
  analyzer.begin(info);
  const make = () => new Float64Array(BLOCK);
  const gyro: [Float64Array, Float64Array, Float64Array] = [make(), make(), make()];
  const setpoint: [Float64Array, Float64Array, Float64Array] = [make(), make(), make()];
  const buf = { timeS: make(), gyro, setpoint, throttle: make(), rpm: g.motors.map(make) };
  let samples = 0;
  while (!g.done) {
    const n = g.next(buf);
    transform({
      n,
      start: samples,
      sampleRateHz: g.sampleRateHz,
      timeS: buf.timeS,
      gyro,
      throttle: buf.throttle,
      rpm: buf.rpm,
    });
    samples += n;
    analyzer.block({
      length: n,
      timeS: buf.timeS,
      gyro,
      throttle: buf.throttle,
      rpm: buf.rpm,
      setpoint,
    });
  }
  const summary: ReadSummary = {
    info,
    samples,
    durationS: samples / g.sampleRateHz,
    gaps: [],
    gapCount: 0,
    droppedRows: 0,
    droppedLines: [],
    bytes: 0,
  };
  return analyzer.finish(summary);
}

import { LogAnalyzer } from "../analysis/analyzer";
import type { AnalysisSettings } from "../analysis/settings";
import type { LogAnalysis } from "../analysis/types";
import type { LogInfo, ReadSummary } from "../logs/read-log";
import { DemoLogGenerator, type DemoLogOptions, type ScenarioTruth } from "./generator";

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

export interface DemoFeed {
  /** Samples per block handed to the analyser (default 8192). */
  blockSize?: number;
  /** Whether the log carries set-points (default true). */
  hasSetpoint?: boolean;
  /** A change applied to every block before the analyser sees it (default none). */
  transform?: (b: FeedBlock) => void;
}

/**
 * Feeds a demo log straight from the generator into the analyser, skipping the CSV text. The
 * round trip through CSV is tested separately; this keeps scenario tests and the demo seed fast.
 */
export function analyzeDemoLog(
  options: DemoLogOptions,
  settings: Partial<AnalysisSettings> = {},
  feed: DemoFeed = {},
): { analysis: LogAnalysis; truth: ScenarioTruth } {
  const blockSize = feed.blockSize ?? 8192;
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
    hasSetpoint: feed.hasSetpoint ?? true,
  };
  analyzer.begin(info);
  const make = () => new Float64Array(blockSize);
  const gyro: [Float64Array, Float64Array, Float64Array] = [make(), make(), make()];
  const setpoint: [Float64Array, Float64Array, Float64Array] = [make(), make(), make()];
  const buf = { timeS: make(), gyro, setpoint, throttle: make(), rpm: g.motors.map(make) };
  let samples = 0;
  while (!g.done) {
    const n = g.next(buf);
    feed.transform?.({
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
  return { analysis: analyzer.finish(summary), truth: g.truth };
}

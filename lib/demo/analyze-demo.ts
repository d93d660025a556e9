import { LogAnalyzer } from "../analysis/analyzer";
import type { AnalysisSettings } from "../analysis/settings";
import type { LogAnalysis } from "../analysis/types";
import type { LogInfo, ReadSummary } from "../logs/read-log";
import { DemoLogGenerator, type DemoLogOptions, type ScenarioTruth } from "./generator";

const BLOCK = 8192;

/**
 * Feeds a demo log straight from the generator into the analyser, skipping the CSV text. The
 * round trip through CSV is tested separately; this keeps scenario tests and the demo seed fast.
 */
export function analyzeDemoLog(
  options: DemoLogOptions,
  settings: Partial<AnalysisSettings> = {},
): { analysis: LogAnalysis; truth: ScenarioTruth } {
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
    hasSetpoint: true,
  };
  analyzer.begin(info);
  const make = () => new Float64Array(BLOCK);
  const gyro: [Float64Array, Float64Array, Float64Array] = [make(), make(), make()];
  const setpoint: [Float64Array, Float64Array, Float64Array] = [make(), make(), make()];
  const buf = { timeS: make(), gyro, setpoint, throttle: make(), rpm: g.motors.map(make) };
  let samples = 0;
  while (!g.done) {
    const n = g.next(buf);
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

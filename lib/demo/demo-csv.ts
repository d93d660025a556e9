import { DemoLogGenerator, type DemoLogOptions } from "./generator";

export interface DemoCsvMeta {
  airframe?: string;
  flownAt?: string;
  note?: string;
  /** Also write the pilot's commanded rates (setpoint_roll|pitch|yaw). Default false. */
  setpoint?: boolean;
}

const BLOCK = 4096;

/**
 * A demo log as CSV text in heatcheck's canonical format, produced block by block so that even a
 * gigabyte-sized benchmark log is written in constant memory.
 */
export function* demoCsvChunks(options: DemoLogOptions, meta: DemoCsvMeta = {}): Generator<string> {
  const g = new DemoLogGenerator(options);
  const lines: string[] = [];
  if (meta.airframe) lines.push(`# airframe: ${meta.airframe}`);
  lines.push(`# flown_at: ${meta.flownAt ?? new Date(0).toISOString()}`);
  lines.push(`# note: ${meta.note ?? "synthetic demo log"}`);
  lines.push(
    `# generator: heatcheck demo, scenario ${g.truth.scenario}, severity ${g.truth.severity}, seed ${options.seed}`,
  );
  const rpmHeaders = g.motors.map((m) => `rpm_${m}`);
  const setpointHeaders = meta.setpoint ? ["setpoint_roll", "setpoint_pitch", "setpoint_yaw"] : [];
  lines.push(
    [
      "time_us",
      "gyro_roll",
      "gyro_pitch",
      "gyro_yaw",
      "throttle",
      ...rpmHeaders,
      ...setpointHeaders,
    ].join(","),
  );
  yield lines.join("\n") + "\n";
  const make = () => new Float64Array(BLOCK);
  const buf = {
    timeS: make(),
    gyro: [make(), make(), make()],
    setpoint: [make(), make(), make()],
    throttle: make(),
    rpm: g.motors.map(make),
  };
  while (!g.done) {
    const n = g.next(buf);
    let text = "";
    for (let i = 0; i < n; i++) {
      let row = `${Math.round((buf.timeS[i] ?? 0) * 1e6)},${fixed(buf.gyro[0]?.[i], 3)},${fixed(buf.gyro[1]?.[i], 3)},${fixed(buf.gyro[2]?.[i], 3)},${fixed(buf.throttle[i], 4)}`;
      for (const r of buf.rpm) row += `,${Math.round(r[i] ?? 0)}`;
      if (meta.setpoint)
        row += `,${fixed(buf.setpoint[0]?.[i], 2)},${fixed(buf.setpoint[1]?.[i], 2)},${fixed(buf.setpoint[2]?.[i], 2)}`;
      text += row + "\n";
    }
    yield text;
  }
}

/** The whole demo log as one string (small logs only). */
export function demoCsv(options: DemoLogOptions, meta: DemoCsvMeta = {}): string {
  let s = "";
  for (const chunk of demoCsvChunks(options, meta)) s += chunk;
  return s;
}

function fixed(v: number | undefined, digits: number): string {
  return (v ?? 0).toFixed(digits);
}

import { describe, expect, it } from "vitest";
import { demoCsv } from "@/lib/demo/demo-csv";
import {
  importable,
  phaseForAirframe,
  readItem,
  type UploadItem,
} from "@/app/(team)/upload/_components/upload-item";

// The upload screen's metadata step, run in Node on File objects (Node's File is the browser's
// Blob API). The logs are the invented demo generator's; the airframes are invented names.
const AIRFRAMES = [
  { id: "a1", name: "HV-04" },
  { id: "a2", name: "HV-08" },
];

function csvFile(text: string, name: string): File {
  return new File([text], name, { type: "text/csv" });
}

const canonical = demoCsv({ seed: 11, durationS: 2, airframeSeed: 3 }, { airframe: "HV-04" });

describe("readItem", () => {
  it("a log in heatcheck's own columns, named in its metadata, is ready to import", async () => {
    const item = await readItem(csvFile(canonical, "practice.csv"), AIRFRAMES);
    expect(item).toMatchObject({
      airframeId: "a1",
      matchedBy: "matched by metadata",
      canonical: true,
      mapText: "",
      phase: "ready",
      message: "",
    });
    expect(importable(item)).toBe(true);
  });

  it("foreign headers get a proposed map and wait for it; the file name finds the airframe", async () => {
    const text = ["Time (ms),Gyro X (rad/s),Gyro Y (rad/s),Gyro Z (rad/s),Thr %"]
      .concat(Array.from({ length: 20 }, (_, i) => `${i},0.01,0.02,0.03,40`))
      .join("\n");
    const item = await readItem(csvFile(text, "HV-08 other logger.csv"), AIRFRAMES);
    expect(item.phase).toBe("needs-map");
    expect(item.matchedBy).toBe("matched by file name");
    expect(item.mapText).toContain("time=Time (ms)|ms");
    expect(item.headers).toHaveLength(5);
    expect(item.rows.length).toBeGreaterThan(0);
  });

  it("no airframe found: the person chooses one", async () => {
    const text = canonical.replace("# airframe: HV-04", "# airframe: XX-99");
    const item = await readItem(csvFile(text, "practice.csv"), AIRFRAMES);
    expect(item).toMatchObject({ phase: "needs-airframe", matchedBy: "no match: choose" });
    expect(importable(item)).toBe(false);
    expect(phaseForAirframe(item, "a2")).toBe("ready");
    expect(phaseForAirframe(item, "")).toBe("needs-airframe");
  });

  it("a file that is not a .csv log is skipped, one without a header row fails", async () => {
    const skipped = await readItem(csvFile("x", "photo.jpg"), AIRFRAMES);
    expect(skipped).toMatchObject({ phase: "skipped", message: "not a .csv log; skipped" });
    const failed = await readItem(csvFile("", "empty.csv"), AIRFRAMES);
    expect(failed).toMatchObject({
      phase: "failed",
      message: "no header row found: not a CSV flight log",
    });
  });
});

describe("importable", () => {
  const base: UploadItem = {
    key: "k",
    file: csvFile("", "a.csv"),
    airframeId: "a1",
    matchedBy: "chosen",
    canonical: false,
    mapText: "",
    headers: [],
    rows: [],
    guesses: [],
    phase: "needs-map",
    uploadFraction: 0,
    analysisFraction: 0,
    message: "",
  };
  it("a file waiting for its map goes only once the map binds every needed field", () => {
    expect(importable({ ...base, mapText: "time=t|us" })).toBe(false);
    expect(
      importable({
        ...base,
        mapText: "time=t|us,roll=r|deg/s,pitch=p|deg/s,yaw=y|deg/s,throttle=thr|fraction",
      }),
    ).toBe(true);
    expect(phaseForAirframe(base, "a2")).toBe("needs-map");
  });
});

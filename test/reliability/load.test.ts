import { rmSync } from "node:fs";
import { afterAll, beforeAll, expect, it } from "vitest";
import { seededDataDir, startThroughScript, type RunningApp } from "./harness";
import { runLoad } from "./load";

// A short loopback load run: readers of the queue and the home page with uploaders at the same
// time. The assertion is the server's contract (every request answered, 200 or a 429 that says
// when to retry; every upload answered 200 is recorded); latency targets are measured by
// `npm run soak` on a quiet machine, not asserted on a shared CI box.

let app: RunningApp;

beforeAll(async () => {
  app = await startThroughScript(seededDataDir("load"));
}, 300_000);

afterAll(async () => {
  await app?.stop();
  if (app) rmSync(app.dataDir, { recursive: true, force: true });
});

it("20 readers and 4 uploaders for 10 s: no errors, no lost upload", async () => {
  const report = await runLoad(app, app.pid, {
    readers: 20,
    uploaders: 4,
    seconds: 10,
    uploadMb: 4,
  });
  console.log(`load run: ${JSON.stringify(report)}`);
  expect(report.errorSamples).toEqual([]);
  expect(report.errors).toBe(0);
  expect(report.lostUploads).toBe(0);
  expect(report.uploads).toBeGreaterThan(0);
  expect(report.queueMs.count).toBeGreaterThan(20);
  expect(report.homeMs.count).toBeGreaterThan(20);
}, 120_000);

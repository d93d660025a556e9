import { rmSync } from "node:fs";
import { afterAll, beforeAll, expect, it } from "vitest";
import { addToken, seededDataDir, startThroughScript, type RunningApp } from "./harness";
import { killTrials } from "./kill-trials";

// kill -9 (SIGKILL: no handler runs) during uploads and analyses. SQLite promises atomic commits
// across a crash (sqlite.org "Atomic Commit In SQLite"); the checks are SQLite's own
// integrity_check and foreign_key_check, SHA-256 of every original against its record, no upload
// answered 200 that is missing, no temporary left after the restart, and no log left pending once
// the resumed analyses finish. 10 trials here; `npm run soak` runs 50.

let app: RunningApp;
let token: string;

beforeAll(async () => {
  app = await startThroughScript(seededDataDir("kill"));
  token = addToken(app.dataDir);
}, 300_000);

afterAll(async () => {
  await app?.stop();
  if (app) rmSync(app.dataDir, { recursive: true, force: true });
});

it("10 kill -9 trials during upload and analysis lose nothing and leave nothing behind", async () => {
  const { report, app: last } = await killTrials(
    app,
    token,
    Number(process.env.HEATCHECK_KILL_TRIALS ?? 10),
    7,
  );
  app = last;
  console.log(
    `kill -9 trials: ${JSON.stringify({ ...report, restartMs: undefined, medianRestartMs: [...report.restartMs].sort((a, b) => a - b)[Math.floor(report.restartMs.length / 2)] })}`,
  );
  expect(report.integrityFailures).toEqual([]);
  expect(report.lost).toBe(0);
  expect(report.leftovers).toBe(0);
  expect(report.stuckPending).toBe(0);
  expect(report.answered200).toBeGreaterThan(0);
}, 600_000);

// npm run soak: the long reliability run. A loopback load (50 readers of the queue and the home
// page, 20 uploaders of 15 MB logs, 60 s; SOAK_READERS, SOAK_UPLOADERS, SOAK_SECONDS, SOAK_UPLOAD_MB
// change it), then 50 kill -9 trials during uploads and analyses (SOAK_KILLS). Prints requests,
// errors, p50/p95/p99, upload MB/s, lost uploads and peak RSS; the README shows the latest figures.
import { rmSync } from "node:fs";
import { config } from "../lib/config";
import { addToken, seededDataDir, startThroughScript } from "../test/reliability/harness";
import { killTrials } from "../test/reliability/kill-trials";
import { runLoad, type Stats } from "../test/reliability/load";

const { tools } = config();
const ms = (s: Stats) =>
  `p50 ${s.p50.toFixed(0)} ms, p95 ${s.p95.toFixed(0)} ms, p99 ${s.p99.toFixed(0)} ms (n = ${s.count})`;

const dir = seededDataDir("soak");
let app = await startThroughScript(dir);
let failed = false;
try {
  const load = await runLoad(app, app.pid, {
    readers: tools.soakReaders ?? 50,
    uploaders: tools.soakUploaders ?? 20,
    seconds: tools.soakSeconds ?? 60,
    uploadMb: tools.soakUploadMb ?? 15,
  });
  console.log(`
load: ${load.options.readers} readers + ${load.options.uploaders} uploaders of ${load.options.uploadMb} MB for ${load.options.seconds} s
  requests ${load.requests}, errors ${load.errors}${load.errorSamples.length ? ` (${load.errorSamples.join("; ")})` : ""}, told to come back (429/503) ${load.refused}
  queue API  ${ms(load.queueMs)}
  home page  ${ms(load.homeMs)}
  uploads    ${ms(load.uploadMs)}; per upload ${load.uploadMBps.median.toFixed(1)} MB/s median, ${load.uploadMBps.p5.toFixed(1)} MB/s 5th percentile, ${load.uploadMBps.min.toFixed(1)} MB/s slowest
  uploads answered 200: ${load.uploads}, lost: ${load.lostUploads}; peak RSS of one server process ${load.maxRssMb} MB`);
  failed ||= load.errors > 0 || load.lostUploads > 0;
  const trials = tools.soakKills ?? 50;
  if (trials > 0) {
    const token = addToken(app.dataDir);
    const { report, app: last } = await killTrials(app, token, trials, Date.now() % 100_000);
    app = last;
    const restart = [...report.restartMs].sort((a, b) => a - b);
    console.log(`
kill -9: ${report.trials} trials, uploads answered 200 ${report.answered200}, lost ${report.lost}, integrity failures ${report.integrityFailures.length}${report.integrityFailures.length ? ` (${report.integrityFailures.slice(0, 5).join("; ")})` : ""}
  files left behind after restarts ${report.leftovers}, logs still pending at the end ${report.stuckPending}, median restart ${((restart[Math.floor(restart.length / 2)] ?? 0) / 1000).toFixed(1)} s`);
    failed ||=
      report.lost > 0 ||
      report.integrityFailures.length > 0 ||
      report.leftovers > 0 ||
      report.stuckPending > 0;
  }
} finally {
  await app.stop();
  rmSync(dir, { recursive: true, force: true });
}
process.exitCode = failed ? 1 : 0;

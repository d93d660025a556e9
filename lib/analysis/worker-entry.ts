// Worker-thread entry for log analysis, bundled to generated/worker/analysis-worker.mjs by
// scripts/build-bundles.ts. It reads the stored file itself and posts progress, so the server's
// request threads never parse or transform a log.
import { parentPort } from "node:worker_threads";
import { runJob, type AnalysisJob } from "./worker";

const port = parentPort;
if (port) port.on("message", (job: AnalysisJob) => void runJob(job, (m) => port.postMessage(m)));

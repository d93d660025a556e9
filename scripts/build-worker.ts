// Bundles the analysis worker to plain JavaScript, so worker threads can run it under Next.js
// and plain Node alike: generated/worker/analysis-worker.mjs.
import { build } from "esbuild";

await build({
  entryPoints: ["lib/analysis/worker-entry.ts"],
  bundle: true,
  platform: "node",
  format: "esm",
  target: "node20",
  outfile: "generated/worker/analysis-worker.mjs",
  logLevel: "warning",
});
console.log("built generated/worker/analysis-worker.mjs");

// Bundles the programs that run outside Next.js to plain JavaScript, so they start without the
// TypeScript loader: the analysis and upload-check workers (generated/worker/, run by the app's
// worker threads) and the command line (generated/cli/heatcheck.mjs, run by `npx heatcheck`).
// Runs at install (postinstall), at `npm start` when lib/ changed, and on the CLI's first run.
import { build } from "esbuild";

const common = {
  bundle: true,
  platform: "node",
  format: "esm",
  target: "node20",
  logLevel: "warning",
} as const;
const only = process.argv[2];

if (only === undefined || only === "worker") {
  await build({
    ...common,
    entryPoints: ["lib/analysis/worker-entry.ts"],
    outfile: "generated/worker/analysis-worker.mjs",
  });
  await build({
    ...common,
    entryPoints: ["lib/analysis/upload-check-worker.ts"],
    outfile: "generated/worker/upload-check-worker.mjs",
  });
  console.log("built generated/worker/analysis-worker.mjs and upload-check-worker.mjs");
}
if (only === undefined || only === "cli") {
  await build({
    ...common,
    entryPoints: ["scripts/cli.ts"],
    outfile: "generated/cli/heatcheck.mjs",
  });
  console.log("built generated/cli/heatcheck.mjs");
}

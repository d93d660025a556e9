#!/usr/bin/env node
// `npx heatcheck …`: the command line as users run it. Plain JavaScript, so it starts as fast as
// Node does: it runs the bundled CLI in generated/cli/, first (re)building it when it is missing or
// older than its sources (a clone that skipped the install script, or a developer's edit).
import { spawnSync } from "node:child_process";
import { existsSync, readdirSync, statSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = dirname(dirname(fileURLToPath(import.meta.url)));
const bundle = join(root, "generated", "cli", "heatcheck.mjs");

function newest(path) {
  const stat = statSync(path);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let n = 0;
  for (const entry of readdirSync(path)) n = Math.max(n, newest(join(path, entry)));
  return n;
}

function stale() {
  if (!existsSync(bundle)) return true;
  const built = statSync(bundle).mtimeMs;
  return newest(join(root, "lib")) > built || newest(join(root, "scripts", "cli.ts")) > built;
}

if (stale()) {
  const tsx = join(root, "node_modules", "tsx", "dist", "cli.mjs");
  const r = spawnSync(process.execPath, [tsx, join(root, "scripts", "build-bundles.ts"), "cli"], {
    cwd: root,
    stdio: ["ignore", "ignore", "inherit"],
  });
  if (r.status !== 0) {
    process.stderr.write(
      "heatcheck: the command line could not be built; run `npm install` in the heatcheck folder.\n",
    );
    process.exit(1);
  }
}
// For `npm run bench`: the peak memory of this whole process (both threads), told on exit.
if (process.env.HEATCHECK_REPORT_RSS === "1") {
  process.on("exit", () =>
    process.stderr.write(`\nHEATCHECK_MAX_RSS_KB ${process.resourceUsage().maxRSS}\n`),
  );
}
await import(pathToFileURL(bundle).href);

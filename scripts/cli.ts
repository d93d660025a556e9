// The heatcheck command line: `npm run -s cli -- <command> …`. All logic lives in lib/cli.
// This module is also the entry of the analysis thread that `analyze` and `compare` run their
// spectra on (lib/analysis/two-threads.ts), so it starts by asking which of the two it is.
import { runAnalysisThreadIfWorker } from "../lib/analysis/two-threads";

if (!runAnalysisThreadIfWorker()) {
  // `heatcheck analyze x.csv --json | head` closes the pipe early: that is not an error.
  process.stdout.on("error", (e: NodeJS.ErrnoException) => {
    if (e.code === "EPIPE") process.exit(0);
    throw e;
  });
  const { runCli } = await import("../lib/cli/run");
  process.exitCode = await runCli(
    process.argv.slice(2),
    { stdout: (t) => process.stdout.write(t), stderr: (t) => process.stderr.write(t) },
    { entryUrl: import.meta.url },
  );
}

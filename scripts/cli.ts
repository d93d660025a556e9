// The heatcheck command line: `npm run -s cli -- <command> …`. All logic lives in lib/cli.
import { runCli } from "../lib/cli/run";

const code = await runCli(process.argv.slice(2), {
  stdout: (t) => process.stdout.write(t),
  stderr: (t) => process.stderr.write(t),
});
process.exitCode = code;

// npm run export-team -- <team name or id> <file.tar.gz>: every record and original log of one
// team as a documented archive (see README "Team export"). Exit 0 done, 1 failed, 2 usage.
import { createWriteStream } from "node:fs";
import { rm } from "node:fs/promises";
import { resolve } from "node:path";
import { createGzip } from "node:zlib";
import { config } from "../lib/config";

// The database is npm start's (lib/config.ts): the data folder's unless DATABASE_URL says otherwise.
const { db } = await import("../lib/server/db");
const { writeTeamExport } = await import("../lib/server/team-export");

async function main(): Promise<number> {
  const [which, target] = process.argv.slice(2);
  if (!which || !target || process.argv.length > 4) {
    console.error("usage: npm run export-team -- <team name or id> <file.tar.gz>");
    return 2;
  }
  const teams = await db.team.findMany({ where: { OR: [{ id: which }, { name: which }] } });
  const team = teams[0];
  if (!team || teams.length > 1) {
    console.error(
      teams.length > 1
        ? `heatcheck: more than one team is named "${which}"; give its id.`
        : `heatcheck: there is no team "${which}".`,
    );
    return 1;
  }
  const out = resolve(config().invocationDir, target);
  const file = createWriteStream(out, { mode: 0o600, flags: "wx" });
  const gzip = createGzip();
  const done = new Promise<void>((ok, fail) => {
    file.on("finish", ok);
    file.on("error", fail);
  });
  gzip.pipe(file);
  try {
    const r = await writeTeamExport(team.id, gzip);
    await done;
    console.log(
      `heatcheck: ${team.name} exported to ${out}: ${r.records} records, ${r.originals} original logs${r.missing ? `, ${r.missing} originals missing on disk` : ""}`,
    );
    return 0;
  } catch (e) {
    await rm(out, { force: true });
    console.error(`heatcheck: the export failed: ${e instanceof Error ? e.message : String(e)}`);
    return 1;
  } finally {
    await db.$disconnect();
  }
}

process.exitCode = await main();

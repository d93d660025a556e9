import { readdirSync, readFileSync } from "node:fs";
import { join, relative } from "node:path";
import { describe, expect, it } from "vitest";

// The layering rules DEVELOPERS.md states, checked on the source tree itself.

const root = process.cwd();

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const e of readdirSync(join(root, dir), { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...sources(p));
    else if (/\.(ts|tsx|mts|mjs)$/.test(e.name)) out.push(p);
  }
  return out;
}

const rootFiles = readdirSync(root).filter((f) => /\.(ts|mts|mjs)$/.test(f));
const tree = [
  ...sources("app"),
  ...sources("lib"),
  ...sources("prisma"),
  ...sources("scripts"),
  ...rootFiles,
];

describe("layering", () => {
  it("has no file in app/ import the database module or the Prisma client (they go through lib/server services)", () => {
    const importers = sources("app").filter((file) =>
      /from\s+["'](@\/lib\/server\/db|@\/generated\/prisma[^"']*|[./]+(lib\/server\/)?db)["']/.test(
        readFileSync(join(root, file), "utf8"),
      ),
    );
    expect(importers).toEqual([]);
  });

  it("has only lib/config.ts read the environment", () => {
    // Not yet switched: the worker pool,
    // the plain-JavaScript bin (it runs before any TypeScript loader), and NEXT_RUNTIME, which
    // Next.js replaces at build time to drop the Node-only start-up from other runtimes.
    const allowed = new Map<string, RegExp>([
      ["lib/server/analysis-pool.ts", /process\.env\.HEATCHECK_WORKERS/],
      ["scripts/heatcheck.mjs", /process\.env\.HEATCHECK_REPORT_RSS/],
      ["instrumentation.ts", /process\.env\.NEXT_RUNTIME/],
    ]);
    const readers: string[] = [];
    for (const file of tree) {
      if (file === join("lib", "config.ts") || file.endsWith("vitest.config.mts")) continue;
      const lines = readFileSync(join(root, file), "utf8").split("\n");
      lines.forEach((line, i) => {
        if (!line.includes("process.env")) return;
        if (allowed.get(relative(".", file))?.test(line)) return;
        readers.push(`${file}:${i + 1}: ${line.trim()}`);
      });
    }
    expect(readers).toEqual([]);
  });
});

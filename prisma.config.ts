import { PrismaBetterSQLite3 } from "@prisma/adapter-better-sqlite3";
import { defineConfig } from "prisma/config";

// Prisma's JavaScript schema engine with the better-sqlite3 adapter: no engine binary to
// download. Paths resolve from the project root; run Prisma commands from there.
export default defineConfig({
  experimental: { adapter: true },
  engine: "js",
  schema: "prisma/schema.prisma",
  adapter() {
    return Promise.resolve(
      new PrismaBetterSQLite3({ url: process.env.DATABASE_URL ?? "file:./data/heatcheck.db" }),
    );
  },
});

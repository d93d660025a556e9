import { PrismaBetterSQLite3 } from "@prisma/adapter-better-sqlite3";
import { defineConfig } from "prisma/config";
import { config } from "./lib/config";

// Prisma's JavaScript schema engine with the better-sqlite3 adapter: no engine binary to
// download. Paths resolve from the project root; run Prisma commands from there.
export default defineConfig({
  experimental: { adapter: true },
  engine: "js",
  schema: "prisma/schema.prisma",
  adapter() {
    return Promise.resolve(new PrismaBetterSQLite3({ url: config().databaseUrl }));
  },
});

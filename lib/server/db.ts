import "server-only";
import { PrismaBetterSQLite3 } from "@prisma/adapter-better-sqlite3";
import { PrismaClient } from "@/generated/prisma/client";
import { config } from "@/lib/config";

/**
 * The one Prisma client. SQLite through the better-sqlite3 adapter (DATABASE_URL, default
 * <data dir>/heatcheck.db: lib/config.ts). Nothing else constructs a client. In development the instance is kept on
 * globalThis so that hot reloads do not open a new connection each time.
 */

function createClient(): PrismaClient {
  const adapter = new PrismaBetterSQLite3({ url: config().databaseUrl });
  return new PrismaClient({ adapter });
}

const globalForPrisma = globalThis as unknown as { heatcheckPrisma?: PrismaClient };

export const db: PrismaClient = globalForPrisma.heatcheckPrisma ?? createClient();
if (!config().production) globalForPrisma.heatcheckPrisma = db;

/** The client inside `db.$transaction(async (tx) => …)`. */
export type Tx = Parameters<Parameters<PrismaClient["$transaction"]>[0]>[0];

import "server-only";
import { PrismaBetterSQLite3 } from "@prisma/adapter-better-sqlite3";
import { PrismaClient } from "@/generated/prisma/client";

/**
 * The one Prisma client. SQLite through the better-sqlite3 adapter by default (DATABASE_URL, or
 * data/heatcheck.db). Nothing else constructs a client. In development the instance is kept on
 * globalThis so that hot reloads do not open a new connection each time.
 */

export const DEFAULT_DATABASE_URL = "file:./data/heatcheck.db";

function createClient(): PrismaClient {
  const adapter = new PrismaBetterSQLite3({
    url: process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL,
  });
  return new PrismaClient({ adapter });
}

const globalForPrisma = globalThis as unknown as { heatcheckPrisma?: PrismaClient };

export const db: PrismaClient = globalForPrisma.heatcheckPrisma ?? createClient();
if (process.env.NODE_ENV !== "production") globalForPrisma.heatcheckPrisma = db;

/** The client inside `db.$transaction(async (tx) => …)`. */
export type Tx = Parameters<Parameters<PrismaClient["$transaction"]>[0]>[0];

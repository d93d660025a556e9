export { openSqlite, type SqliteDatabase } from "@/lib/archive/sqlite-file";

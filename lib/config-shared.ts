/**
 * Database connection settings, shared by the app (through lib/config), knexfile.ts and scripts.
 * CAIRN_DB_AS_OWNER=1 connects as the owner account that may run migrations; the app runs as the
 * restricted application account.
 */
export function databaseConnection(asOwner = process.env.CAIRN_DB_AS_OWNER === "1") {
  return {
    host: process.env.CAIRN_DB_HOST ?? "127.0.0.1",
    port: Number(process.env.CAIRN_DB_PORT ?? 3407),
    user: (asOwner ? process.env.CAIRN_DB_OWNER_USER : process.env.CAIRN_DB_APP_USER) ?? "cairn_app",
    password: (asOwner ? process.env.CAIRN_DB_OWNER_PASSWORD : process.env.CAIRN_DB_APP_PASSWORD) ?? "",
    database: process.env.CAIRN_DB_NAME ?? "cairn",
    charset: "utf8mb4",
    timezone: "Z",
    dateStrings: ["DATE"] as ("DATE")[],
    supportBigNumbers: true,
    connectTimeout: 5_000,
  };
}

/**
 * The blinded account (cairn_blind): SELECT only on open tables, open columns and the *_open
 * views (grants from db/classification.ts). Reads made for blinded roles use it, so the database
 * itself refuses closed data even if a query asks for it.
 */
export function blindedDatabaseConnection() {
  return {
    ...databaseConnection(false),
    user: process.env.CAIRN_DB_BLIND_USER ?? "cairn_blind",
    password: process.env.CAIRN_DB_BLIND_PASSWORD ?? "",
  };
}

/**
 * Seeds the invented demo scenario into an empty database; does nothing when the database already
 * has accounts (so running scripts/up twice leaves one copy). Refuses NODE_ENV=production unless --force.
 * Run with: tsx --conditions=react-server scripts/seed.ts
 */
import { db } from "../db/knex";
import { isDatabaseEmpty, seedDemo } from "../db/seeds/demo";

const force = process.argv.includes("--force");
try {
  if (process.env.NODE_ENV === "production" && !force) {
    console.error("Refusing to seed demo data with NODE_ENV=production (pass --force to override).");
    process.exitCode = 1;
  } else if (!(await isDatabaseEmpty())) {
    console.log("database already has data: demo seed skipped");
  } else {
    await seedDemo();
    console.log("demo data seeded");
  }
} finally {
  await db.destroy();
}

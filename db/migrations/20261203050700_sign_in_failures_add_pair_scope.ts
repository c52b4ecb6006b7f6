/**
 * Why: throttling per account alone let anyone lock a person out by typing wrong passwords for them.
 * Failures are now counted per (account, address) pair, with a growing delay, and per address
 * (lib/auth/rate-limit.ts); the pair is a new scope.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE sign_in_failures MODIFY scope ENUM('account','address','pair') NOT NULL");
}

export async function down(knex: Knex): Promise<void> {
  await knex("sign_in_failures").where({ scope: "pair" }).del();
  await knex.raw("ALTER TABLE sign_in_failures MODIFY scope ENUM('account','address') NOT NULL");
}

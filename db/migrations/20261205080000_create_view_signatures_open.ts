/**
 * Why: the blinded database account reads signatures through this view only. A DMC member's vote
 * is signed like every other act, so the signatures table holds one "vote cast" row per vote; with
 * the table open to blinded reads, a blinded request could count the votes on a look (or see who
 * voted) even though votes, comments and tallies are closed. The view leaves those rows out, and
 * the record hash with them.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE VIEW signatures_open AS
    SELECT id, user_id, signer_name, signer_email, meaning, entity_type, entity_id, signed_at, hash_scheme
    FROM signatures WHERE meaning <> 'vote cast'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP VIEW IF EXISTS signatures_open");
}

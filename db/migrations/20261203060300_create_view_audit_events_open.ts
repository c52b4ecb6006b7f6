/**
 * Why: the blinded database account (cairn_blind) reads the audit trail through this view only:
 * open rows, without their hashes (each row's prev_hash is a hash of the row before it, which may
 * be closed). The account has no grant on audit_events itself, so it cannot select closed rows.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE VIEW audit_events_open AS
    SELECT id, occurred_at, actor_user_id, actor_email, trial_id, action, entity_type, entity_id, visibility, old_values, new_values, reason
    FROM audit_events WHERE visibility = 'open'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP VIEW IF EXISTS audit_events_open");
}

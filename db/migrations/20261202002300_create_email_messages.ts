/**
 * Why: every e-mail Cairn sends is recorded before it is sent (to, subject, kind, packet version),
 * then its delivery: attempts, last error, when the next try is due, when it was sent. The body is
 * kept so a retry sends exactly the same message; bodies never carry closed data (templates send
 * DMC members a link, not results), and the only attachment ever sent is an open packet.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("email_messages", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("meeting_id").unsigned().nullable().references("meetings.id").onDelete("CASCADE");
    t.integer("packet_id").unsigned().nullable().references("packets.id");
    t.integer("to_user_id").unsigned().nullable().references("users.id");
    t.string("to_address", 254).notNullable();
    t.string("subject", 300).notNullable();
    t.enu("kind", ["packet_open", "packet_closed_notice", "meeting_reminder"]).notNullable();
    t.text("body_text").notNullable();
    t.enu("status", ["queued", "sending", "sent", "failed"]).notNullable().defaultTo("queued");
    t.integer("attempts").unsigned().notNullable().defaultTo(0);
    t.text("last_error").nullable();
    t.dateTime("next_attempt_at", { precision: 3 }).nullable();
    t.dateTime("sent_at", { precision: 3 }).nullable();
    t.string("smtp_message_id", 300).nullable();
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["status", "next_attempt_at"]);
    t.index(["meeting_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("email_messages");
}

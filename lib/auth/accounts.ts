import "server-only";
/**
 * Account life cycle: creation with a one-time set-password link, re-issuing a link, setting a
 * password through a link, changing one's own password, deactivation, and trial roles under the
 * separation-of-duties rule. Every change is one transaction with its audit row; no audit row
 * carries a password, a hash or a link token.
 *
 * Decisions (DEVELOPERS.md, "Accounts"):
 * - The administrator never types a user's password. A link is shown once to the administrator
 *   (for when mail is down) and e-mailed to the owner; it is 256 random bits, stored only as its
 *   SHA-256, single use, and expires after PASSWORD_LINK_HOURS.
 * - Re-issuing a link revokes the earlier unused links of the account but leaves the current
 *   password working until the new link is used (so re-issuing alone cannot lock anyone out).
 *   Using a link replaces the password, ends every session, and e-mails the owner a notice, so a
 *   link used by someone else is noticed by its owner.
 */
import { createHash, randomBytes } from "node:crypto";
import { db, writeTransaction, type Tx } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import {
  countActiveAdmins,
  fetchUserByEmail,
  fetchUserById,
  fetchUserForUpdate,
  insertUser,
  updateUserActive,
  updateUserPassword,
} from "@/db/queries/users";
import { fetchPasswordLinkByHash, fetchPasswordLinkForUpdate, insertPasswordLink, markPasswordLinkUsed, revokeOpenPasswordLinks } from "@/db/queries/password-links";
import { deleteMembership, fetchActiveRoleHoldersForUpdate, fetchMembershipById, fetchRolesOnTrial, fetchTrialsWithRole, insertMembership } from "@/db/queries/memberships";
import { insertEmails } from "@/db/queries/emails";
import { fetchTrial } from "@/db/queries/trials";
import type { PasswordLinkRow, PublicUser, TrialRole, UserRow } from "@/db/types";
import { config } from "@/lib/config";
import { conflict, HttpError, notFoundError } from "@/lib/http";
import { passwordChangedMail, passwordLinkMail } from "@/lib/mail/templates";
import { hashPassword, NO_PASSWORD, verifyPassword } from "./passwords";
import { roleGrantRefusal } from "./separation-of-duties";
import { tooManyAttemptsMessage } from "./rate-limit";
import { clearPairFailures, recordSignInFailure, signInWaitMs } from "./sign-in-throttle";

const PASSWORD_LINK_HOURS = 24;
/** 32 bytes = 256 bits from the operating system's CSPRNG. */
const TOKEN_BYTES = 32;

export const tokenSha256 = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");

/** The link's token travels in the fragment: browsers send no fragment to a server, a log or a Referer. */
function passwordLinkUrl(token: string): string {
  return `${config.appUrl().replace(/\/$/, "")}/set-password#${token}`;
}

type IssuedLink = { url: string; expiresAt: Date; emailId: number };

async function issueLink(tx: Tx, user: Pick<UserRow, "id" | "name" | "email">, issuer: PublicUser, now: Date): Promise<IssuedLink> {
  await revokeOpenPasswordLinks(tx, user.id, now);
  const token = randomBytes(TOKEN_BYTES).toString("base64url");
  const expiresAt = new Date(now.getTime() + PASSWORD_LINK_HOURS * 3_600_000);
  await insertPasswordLink(tx, { userId: user.id, tokenSha256: tokenSha256(token), expiresAt, issuedBy: issuer.id });
  const url = passwordLinkUrl(token);
  const mail = passwordLinkMail({ recipientName: user.name, link: url, expiresAt: `${expiresAt.toISOString().slice(0, 16).replace("T", " ")} UTC`, issuerName: issuer.name });
  const [emailId] = await insertEmails(
    tx,
    [{ trialId: null, meetingId: null, packetId: null, toUserId: user.id, toAddress: user.email, subject: mail.subject, kind: "password_link", bodyText: mail.text, createdBy: issuer.id }],
    now,
  );
  return { url, expiresAt, emailId };
}

/** Creates an account with no usable password, and its first set-password link. */
export async function createAccountWithLink(
  admin: PublicUser,
  input: { name: string; email: string; isAdmin: boolean },
  now = new Date(),
): Promise<IssuedLink & { userId: number }> {
  const email = input.email.toLowerCase();
  if (await fetchUserByEmail(email)) throw new HttpError(409, "An account with this e-mail address already exists.", { field: "email" });
  return writeTransaction(async (tx) => {
    const userId = await insertUser(tx, { email, name: input.name, passwordHash: NO_PASSWORD, isAdmin: input.isAdmin });
    const link = await issueLink(tx, { id: userId, name: input.name, email }, admin, now);
    await appendAudit(tx, {
      actorUserId: admin.id,
      actorEmail: admin.email,
      trialId: null,
      action: "account_created",
      entityType: "user",
      entityId: userId,
      visibility: "open",
      newValues: { name: input.name, email, isAdmin: input.isAdmin, passwordLinkExpiresAt: link.expiresAt.toISOString() },
    });
    return { ...link, userId };
  });
}

/** A new set-password link for an account; earlier unused links stop working, the password does not change yet. */
export async function reissuePasswordLink(admin: PublicUser, userId: number, now = new Date()): Promise<IssuedLink> {
  return writeTransaction(async (tx) => {
    const user = await fetchUserForUpdate(tx, userId);
    if (!user) throw notFoundError("That account");
    if (!user.is_active) throw conflict("This account is deactivated; reactivate it before sending a set-password link.");
    const link = await issueLink(tx, user, admin, now);
    await appendAudit(tx, {
      actorUserId: admin.id,
      actorEmail: admin.email,
      trialId: null,
      action: "password_link_issued",
      entityType: "user",
      entityId: user.id,
      visibility: "open",
      newValues: { to: user.email, expiresAt: link.expiresAt.toISOString() },
    });
    return link;
  });
}

const LINK_UNUSABLE = "This set-password link is not valid: it may have expired, been used already, or been replaced by a newer one. Ask your administrator for a new link.";

/** Sets the password of the link's account; the link then stops working and every session ends. */
export async function setPasswordWithLink(token: string, password: string, now = new Date()): Promise<{ userId: number; emailId: number }> {
  const usable = (l: PasswordLinkRow | undefined): l is PasswordLinkRow => !!l && !l.used_at && !l.revoked_at && new Date(l.expires_at).getTime() > now.getTime();
  // A cheap look first, so a public request with a made-up token costs no bcrypt work.
  if (!usable(await fetchPasswordLinkByHash(db, tokenSha256(token)))) throw new HttpError(422, LINK_UNUSABLE, { field: "token" });
  const passwordHash = await hashPassword(password);
  return writeTransaction(async (tx) => {
    const link = await fetchPasswordLinkForUpdate(tx, tokenSha256(token));
    if (!usable(link)) throw new HttpError(422, LINK_UNUSABLE, { field: "token" });
    const user = await fetchUserForUpdate(tx, link.user_id);
    if (!user || !user.is_active) throw new HttpError(422, LINK_UNUSABLE, { field: "token" });
    if ((await markPasswordLinkUsed(tx, link.id, now)) !== 1) throw new HttpError(422, LINK_UNUSABLE, { field: "token" });
    await revokeOpenPasswordLinks(tx, user.id, now);
    await updateUserPassword(tx, user.id, passwordHash);
    const emailId = await queueChangedNotice(tx, user, "link", now);
    await appendAudit(tx, { actorUserId: user.id, actorEmail: user.email, trialId: null, action: "password_set_by_link", entityType: "user", entityId: user.id, visibility: "open", newValues: { linkId: link.id } });
    return { userId: user.id, emailId };
  });
}

async function queueChangedNotice(tx: Tx, user: UserRow, how: "link" | "account page", now: Date): Promise<number> {
  const mail = passwordChangedMail({ recipientName: user.name, when: `${now.toISOString().slice(0, 16).replace("T", " ")} UTC`, how });
  const [id] = await insertEmails(
    tx,
    [{ trialId: null, meetingId: null, packetId: null, toUserId: user.id, toAddress: user.email, subject: mail.subject, kind: "password_changed", bodyText: mail.text, createdBy: user.id }],
    now,
  );
  return id;
}

/**
 * Changes one's own password, with the current one (throttled and audited like a sign-in). Every
 * session of the account ends, this one included.
 */
export async function changeOwnPassword(user: PublicUser, currentPassword: string, newPassword: string, address: string, now = new Date()): Promise<{ emailId: number }> {
  const account = user.email.toLowerCase();
  const wait = await signInWaitMs(account, address);
  if (wait > 0) throw new HttpError(429, `${tooManyAttemptsMessage(wait, "password")} Your password was not changed.`, { field: "currentPassword" });
  const row = await fetchUserById(user.id);
  if (!row || !row.is_active) throw new HttpError(401, "Sign in again.");
  if (!(await verifyPassword(currentPassword, row.password_hash))) {
    await recordSignInFailure(account, address);
    await writeTransaction((tx) =>
      appendAudit(tx, { actorUserId: user.id, actorEmail: user.email, trialId: null, action: "password_change_failed", entityType: "user", entityId: user.id, visibility: "open" }),
    );
    throw new HttpError(422, "Your current password is not correct, so nothing was changed.", { field: "currentPassword" });
  }
  await clearPairFailures(account, address);
  const passwordHash = await hashPassword(newPassword);
  return writeTransaction(async (tx) => {
    const locked = await fetchUserForUpdate(tx, user.id);
    if (!locked || locked.password_hash !== row.password_hash) throw conflict("Your password changed in the meantime. Sign in again and retry.");
    await updateUserPassword(tx, user.id, passwordHash);
    const emailId = await queueChangedNotice(tx, locked, "account page", now);
    await appendAudit(tx, { actorUserId: user.id, actorEmail: user.email, trialId: null, action: "password_changed", entityType: "user", entityId: user.id, visibility: "open" });
    return { emailId };
  });
}

/**
 * The rule that every trial keeps an active unblinded statistician: the closed review, locking looks
 * and preparing the closed packet need one, and a trial left without one cannot be monitored. Refuses
 * (409, naming the person and the trial or trials) when `userId` is the only active holder on any of
 * `trials`; the holders' rows stay locked until the transaction ends, so two administrators removing
 * the last two at once cannot both see "one more left". Used by revokeTrialRole (one role) and
 * setAccountActive (every trial the account is unblinded statistician on).
 */
async function keepAnUnblindedStatistician(tx: Tx, userId: number, userName: string | undefined, trials: { trialId: number; trialCode: string | undefined }[]): Promise<void> {
  const leftWithout: string[] = [];
  for (const t of trials) {
    const holders = await fetchActiveRoleHoldersForUpdate(tx, t.trialId, "unblinded_statistician");
    if (!holders.some((h) => h.userId !== userId)) leftWithout.push(t.trialCode ?? "this trial");
  }
  if (leftWithout.length === 0) return;
  const on = leftWithout.length === 1 ? leftWithout[0] : `${leftWithout.slice(0, -1).join(", ")} and ${leftWithout.at(-1)}`;
  throw conflict(`${userName ?? "This person"} is the last unblinded statistician on ${on}. Give the role to someone else first: the trial needs one to review looks and prepare the closed packet.`);
}

/** Two administrators changing the same trial's roles or accounts at once: the loser changes nothing and may try again. */
function rolesRace(e: unknown): never {
  if ((e as { code?: string }).code === "ER_LOCK_DEADLOCK") throw conflict("Someone else changed this trial's roles at the same moment. Nothing was changed; try again.");
  throw e;
}

/**
 * Deactivates (or reactivates) an account; deactivation ends its sessions at once. Never deletes.
 * Refused for the last active administrator, and for an account that is the last active unblinded
 * statistician of a trial (keepAnUnblindedStatistician).
 */
export async function setAccountActive(admin: PublicUser, userId: number, active: boolean): Promise<PublicUser> {
  if (userId === admin.id) throw conflict(active ? "You are already active." : "You cannot deactivate your own account; another administrator must.");
  return writeTransaction(async (tx) => {
    const user = await fetchUserForUpdate(tx, userId);
    if (!user) throw notFoundError("That account");
    if (Boolean(user.is_active) === active) throw conflict(`${user.name} is already ${active ? "active" : "deactivated"}.`);
    if (!active && user.is_admin && (await countActiveAdmins(tx)) <= 1) throw conflict("This is the last active administrator; it cannot be deactivated.");
    if (!active) await keepAnUnblindedStatistician(tx, user.id, user.name, await fetchTrialsWithRole(user.id, "unblinded_statistician", tx));
    await updateUserActive(tx, userId, active);
    await appendAudit(tx, {
      actorUserId: admin.id,
      actorEmail: admin.email,
      trialId: null,
      action: active ? "account_reactivated" : "account_deactivated",
      entityType: "user",
      entityId: userId,
      visibility: "open",
      oldValues: { isActive: !active },
      newValues: { isActive: active, account: user.email, by: admin.email },
    });
    return { id: user.id, email: user.email, name: user.name, isAdmin: Boolean(user.is_admin), isActive: active };
  }).catch(rolesRace);
}

/** Gives a trial role under the separation-of-duties rule; the audit row names who gave it and to whom. */
export async function grantTrialRole(admin: PublicUser, input: { userId: number; trialId: number; role: TrialRole }): Promise<{ membershipId: number; userName: string; trialCode: string }> {
  return writeTransaction(async (tx) => {
    const user = await fetchUserForUpdate(tx, input.userId);
    const trial = await fetchTrial(input.trialId, tx);
    if (!user) throw new HttpError(422, "That person no longer exists.", { field: "userId" });
    if (!user.is_active) throw new HttpError(422, "That account is deactivated.", { field: "userId" });
    if (!trial) throw new HttpError(422, "That trial no longer exists.", { field: "trialId" });
    const held = await fetchRolesOnTrial(user.id, trial.id, tx);
    if (held.includes(input.role)) throw conflict(`${user.name} already holds that role on ${trial.code}.`);
    const refusal = roleGrantRefusal(admin.id, user.id, input.role, held);
    if (refusal) throw new HttpError(422, refusal, { field: "role" });
    const membershipId = await insertMembership(tx, { trialId: trial.id, userId: user.id, role: input.role });
    await appendAudit(tx, {
      actorUserId: admin.id,
      actorEmail: admin.email,
      trialId: trial.id,
      action: "role_assigned",
      entityType: "trial_membership",
      entityId: membershipId,
      visibility: "open",
      newValues: { grantedBy: { id: admin.id, email: admin.email }, grantedTo: { id: user.id, email: user.email }, trial: trial.code, role: input.role },
    });
    return { membershipId, userName: user.name, trialCode: trial.code };
  });
}

/** Removes one role on one trial. Refused for the last active unblinded statistician of a trial (keepAnUnblindedStatistician). */
export async function revokeTrialRole(admin: PublicUser, membershipId: number): Promise<void> {
  try {
    await writeTransaction(async (tx) => {
      const m = await fetchMembershipById(membershipId, tx);
      if (!m) throw notFoundError("That role assignment");
      const user = await fetchUserById(m.user_id, tx);
      if (m.role === "unblinded_statistician") await keepAnUnblindedStatistician(tx, m.user_id, user?.name, [{ trialId: m.trial_id, trialCode: (await fetchTrial(m.trial_id, tx))?.code }]);
      await deleteMembership(tx, m.id);
      await appendAudit(tx, {
        actorUserId: admin.id,
        actorEmail: admin.email,
        trialId: m.trial_id,
        action: "role_removed",
        entityType: "trial_membership",
        entityId: m.id,
        visibility: "open",
        oldValues: { removedBy: { id: admin.id, email: admin.email }, removedFrom: { id: m.user_id, email: user?.email ?? null }, trialId: m.trial_id, role: m.role },
      });
    });
  } catch (e) {
    rolesRace(e);
  }
}

import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { z } from "zod";
import { bumpSessionVersion, fetchUserByEmail } from "@/db/queries/users";
import { appendAudit, recordAuditEvent } from "@/db/audit";
import { writeTransaction } from "@/db/knex";
import { tooManyAttemptsMessage } from "./rate-limit";
import { clearPairFailures, recordSignInFailure, signInWaitMs } from "./sign-in-throttle";
import { verifyPassword } from "./passwords";
import { clientAddress } from "./client-address";

export { BCRYPT_ROUNDS } from "./passwords";

const signInSchema = z.object({
  email: z.string().trim().min(1, "Enter your e-mail address.").max(254, "That e-mail address is too long.").email("Enter a valid e-mail address."),
  password: z.string().min(1, "Enter your password.").max(200, "That password is too long."),
});

type SignInResult = { id: string; email: string; name: string; sv: number } | null;

/**
 * The sign-in check, separated from next-auth so it can be tested against the database: throttled
 * per (account, address) pair and per address, every attempt audited, a deactivated account or one
 * without a password refused like a wrong password.
 */
export async function authorizeSignIn(raw: unknown, address: string): Promise<SignInResult> {
  const parsed = signInSchema.safeParse(raw ?? {});
  if (!parsed.success) return null;
  const { email, password } = parsed.data;
  const account = email.toLowerCase();
  const wait = await signInWaitMs(account, address);
  // next-auth passes a thrown error's message to the sign-in form.
  if (wait > 0) throw new Error(tooManyAttemptsMessage(wait));
  const user = await fetchUserByEmail(email);
  const ok = await verifyPassword(password, user?.password_hash);
  if (!user || !ok || !user.is_active) {
    await recordSignInFailure(account, address);
    await recordAuditEvent({
      actorUserId: user?.id ?? null,
      actorEmail: account,
      trialId: null,
      action: "sign_in_failed",
      entityType: "user",
      entityId: user?.id ?? null,
      visibility: "open",
    });
    return null;
  }
  await clearPairFailures(account, address);
  await recordAuditEvent({ actorUserId: user.id, actorEmail: user.email, trialId: null, action: "sign_in", entityType: "user", entityId: user.id, visibility: "open" });
  return { id: String(user.id), email: user.email, name: user.name, sv: Number(user.session_version) };
}

/** Sign-out ends every session of the account, including copies of this one's cookie. */
export async function endSessions(userId: number, email: string): Promise<void> {
  await writeTransaction(async (tx) => {
    await bumpSessionVersion(tx, userId);
    await appendAudit(tx, { actorUserId: userId, actorEmail: email, trialId: null, action: "sign_out", entityType: "user", entityId: userId, visibility: "open" });
  });
}

export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: 8 * 60 * 60 },
  pages: { signIn: "/signin" },
  providers: [
    CredentialsProvider({
      name: "Cairn account",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(raw, req) {
        return authorizeSignIn(raw, clientAddress(req?.headers as Record<string, unknown> | undefined));
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = Number(user.id);
        token.sv = (user as { sv?: number }).sv;
      }
      return token;
    },
    async session({ session, token }) {
      if (session.user) (session.user as { id?: number }).id = token.uid as number;
      return session;
    },
  },
  events: {
    async signOut({ token }) {
      const uid = Number(token?.uid);
      if (Number.isInteger(uid) && uid > 0) await endSessions(uid, String(token?.email ?? ""));
    },
  },
};

import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import bcrypt from "bcryptjs";
import { z } from "zod";
import { fetchUserByEmail } from "@/db/queries/users";
import { recordAuditEvent } from "@/db/audit";
import { tooManyAttemptsMessage } from "./rate-limit";
import { clearAccountFailures, recordSignInFailure, signInWaitMs } from "./sign-in-throttle";

/** Longer than any IPv6 address with a zone; a longer header value is cut, not trusted further. */
const MAX_ADDRESS_LENGTH = 100;

function clientAddress(headers: Record<string, unknown> | undefined): string {
  const fwd = String(headers?.["x-forwarded-for"] ?? "").split(",")[0].trim();
  return (fwd || String(headers?.["x-real-ip"] ?? "local")).slice(0, MAX_ADDRESS_LENGTH);
}

export const signInSchema = z.object({
  email: z.string().trim().min(1, "Enter your e-mail address.").max(254, "That e-mail address is too long.").email("Enter a valid e-mail address."),
  password: z.string().min(1, "Enter your password.").max(200, "That password is too long."),
});

/** bcrypt cost for stored passwords (at least 10, per the foundation issue). */
export const BCRYPT_ROUNDS = 11;

// A hash of a random string, compared when the account does not exist, so timing does not reveal which e-mails are registered.
const DUMMY_HASH = "$2b$11$C6UzMDM.H6dfI/f/IKxGhuJ5e5y9lZ7zWBh3fE6Yxc.0kAnWpgbbu";

export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: 8 * 60 * 60 },
  pages: { signIn: "/signin" },
  providers: [
    CredentialsProvider({
      name: "Cairn account",
      credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(raw, req) {
        const parsed = signInSchema.safeParse(raw ?? {});
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        const account = email.toLowerCase();
        const address = clientAddress(req?.headers as Record<string, unknown> | undefined);
        const wait = await signInWaitMs(account, address);
        // next-auth passes a thrown error's message to the sign-in form.
        if (wait > 0) throw new Error(tooManyAttemptsMessage(wait));
        const user = await fetchUserByEmail(email);
        const ok = await bcrypt.compare(password, user?.password_hash ?? DUMMY_HASH);
        if (!user || !ok || !user.is_active) {
          await recordSignInFailure(account, address);
          await recordAuditEvent({
            actorUserId: user?.id ?? null,
            actorEmail: email.toLowerCase(),
            trialId: null,
            action: "sign_in_failed",
            entityType: "user",
            entityId: user?.id ?? null,
            visibility: "open",
          });
          return null;
        }
        await clearAccountFailures(account);
        await recordAuditEvent({
          actorUserId: user.id,
          actorEmail: user.email,
          trialId: null,
          action: "sign_in",
          entityType: "user",
          entityId: user.id,
          visibility: "open",
        });
        return { id: String(user.id), email: user.email, name: user.name };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) token.uid = Number(user.id);
      return token;
    },
    async session({ session, token }) {
      if (session.user) (session.user as { id?: number }).id = token.uid as number;
      return session;
    },
  },
};

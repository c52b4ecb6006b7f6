import "server-only";
/**
 * The one SMTP transport, from configuration (lib/config.ts). In development and tests the host
 * is the local mail catcher on loopback; in production, the organisation's relay with credentials.
 */
import nodemailer, { type Transporter } from "nodemailer";
import { config } from "@/lib/config";

const cache = globalThis as unknown as { cairnMail?: { key: string; transport: Transporter } };

export function mailTransport(): Transporter {
  const s = config.smtp();
  const key = `${s.host}:${s.port}:${s.user ?? ""}`;
  if (cache.cairnMail?.key !== key) {
    cache.cairnMail?.transport.close();
    cache.cairnMail = {
      key,
      transport: nodemailer.createTransport({
        host: s.host,
        port: s.port,
        secure: s.port === 465,
        auth: s.user ? { user: s.user, pass: s.pass ?? "" } : undefined,
        // A down server must fail the attempt quickly: the retry schedule handles the rest.
        connectionTimeout: 5_000,
        greetingTimeout: 5_000,
        socketTimeout: 20_000,
      }),
    };
  }
  return cache.cairnMail.transport;
}

export function mailFrom(): string {
  return config.smtp().from;
}

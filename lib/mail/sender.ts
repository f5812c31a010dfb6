import { Resend } from "resend";

/** One e-mail as the provider receives it. */
export interface OutgoingMail {
  from: string;
  to: string[];
  subject: string;
  text: string;
  html?: string | null;
  /** The outbox row's id: a retried send after a lost answer is not delivered twice. */
  idempotencyKey: string;
}

export type SendResult = { ok: true; providerId: string } | { ok: false; error: string };

/** What the delivery job sends through: Resend's SDK in the app, the same in tests (at the fake). */
export interface MailSender {
  send(mail: OutgoingMail): Promise<SendResult>;
}

/**
 * Sends through Resend's SDK. Without `baseUrl` the SDK talks to the provider itself; with it
 * (`npm start` and the tests) to the local fake of the provider's HTTP API.
 */
export function resendSender({ apiKey, baseUrl }: { apiKey: string; baseUrl?: string }): MailSender {
  const client = new Resend(apiKey, baseUrl ? { baseUrl } : undefined);
  return {
    async send(mail) {
      const { data, error } = await client.emails.send(
        { from: mail.from, to: mail.to, subject: mail.subject, text: mail.text, ...(mail.html ? { html: mail.html } : {}) },
        { idempotencyKey: mail.idempotencyKey },
      );
      if (error || !data?.id) {
        const status = error?.statusCode ? `${error.statusCode} ` : "";
        return { ok: false, error: `${status}${error?.name ?? "no_id"}: ${error?.message ?? "the provider answered without an id"}` };
      }
      return { ok: true, providerId: data.id };
    },
  };
}

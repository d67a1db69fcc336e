import nodemailer from 'nodemailer';
import type { Logger } from 'pino';
import type { AppConfig } from '../config';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
}

export interface Mailer {
  /** Sends in the background: the caller never waits on the mail server; failures are logged. */
  enqueue(message: MailMessage): void;
  /** Resolves once every enqueued message has been handed to the SMTP server (used at shutdown). */
  drain(): Promise<void>;
}

export function createMailer(config: Pick<AppConfig, 'SMTP_HOST' | 'SMTP_PORT' | 'MAIL_FROM'>, logger: Logger): Mailer {
  const transport = nodemailer.createTransport({
    host: config.SMTP_HOST,
    port: config.SMTP_PORT,
    secure: false,
    ignoreTLS: true,
    connectionTimeout: 5000,
  });
  const pending = new Set<Promise<unknown>>();
  return {
    enqueue(message) {
      const sending = transport
        .sendMail({ from: config.MAIL_FROM, ...message })
        .then(() => logger.info({ to: message.to, subject: message.subject }, 'mail sent'))
        .catch((err: Error) => logger.error({ err, to: message.to }, 'mail could not be sent'))
        .finally(() => pending.delete(sending));
      pending.add(sending);
    },
    async drain() {
      await Promise.allSettled([...pending]);
    },
  };
}

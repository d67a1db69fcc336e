/** Reads what the app sent through the mail fake (maildev's HTTP API on loopback). */
import { inject } from 'vitest';

export interface CaughtMail {
  id: string;
  subject: string;
  text: string;
  to: { address: string }[];
}

const base = () => `http://127.0.0.1:${inject('mailWebPort')}`;

export async function allMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${base()}/api/email`);
  if (!res.ok) throw new Error(`mail fake answered ${res.status}`);
  return (await res.json()) as CaughtMail[];
}

/** Waits until a mail to `address` whose subject contains `subjectPart` arrives; returns the newest. */
export async function waitForMail(address: string, subjectPart: string, timeoutMs = 10_000): Promise<CaughtMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = (await allMail()).filter(
      (m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()) && m.subject.includes(subjectPart),
    );
    if (found.length) return found[found.length - 1];
    if (Date.now() > deadline) throw new Error(`No mail to ${address} about "${subjectPart}" within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

export function linkToken(mail: CaughtMail): string {
  const match = /token=([A-Za-z0-9_-]+)/.exec(mail.text);
  if (!match) throw new Error(`No link with a token in mail "${mail.subject}"`);
  return match[1];
}

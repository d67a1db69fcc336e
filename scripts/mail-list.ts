/** Prints the mail the app has sent to the local mail fake (newest last). */
export {};
const port = Number(process.env.MAIL_WEB_PORT ?? 1080);

interface Caught {
  date: string;
  subject: string;
  text: string;
  to: { address: string }[];
}

const res = await fetch(`http://127.0.0.1:${port}/api/email`).catch(() => null);
if (!res?.ok) {
  console.error(`The mail fake is not answering on 127.0.0.1:${port} — is \`npm start\` running?`);
  process.exit(1);
}
const mails = (await res.json()) as Caught[];
if (!mails.length) console.log('No mail sent yet.');
for (const m of mails) {
  console.log(`── ${m.date}  to ${m.to.map((t) => t.address).join(', ')}\n   ${m.subject}\n`);
  console.log(m.text.replace(/^/gm, '   '));
}

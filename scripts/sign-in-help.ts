// Printed by `npm start`: how to sign in as each demo person (through the local outbox).
import { demoPeople } from "../tests/fixtures/demo";

const url = process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3000}`;
console.log("\nDemo people of the rig \"Juniper\":");
for (const p of demoPeople) console.log(`  ${p.role.padEnd(6)} ${p.name.padEnd(5)} ${p.email}`);
if (process.env.SMTP_URL) {
  console.log(`\nSign in at ${url}/sign-in; codes go out through SMTP_URL.`);
} else {
  console.log(`\nTo sign in as one of them:`);
  console.log(`  1. open ${url}/sign-in and type their e-mail address`);
  console.log(`  2. open ${url}/dev/outbox (the local mail fake's outbox)`);
  console.log(`  3. type the 6-digit code shown there, or click "Open the sign-in link"`);
}
console.log(`\nOpen ${url}`);

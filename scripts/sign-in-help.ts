// Printed by `npm start`: how to sign in as each demo person.
import { demoPeople } from "../tests/fixtures/demo";

const url = process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3000}`;
console.log("\nDemo people of the rig \"Juniper\":");
for (const p of demoPeople) console.log(`  ${p.role.padEnd(6)} ${p.name.padEnd(5)} ${p.email}`);
console.log(`\nOpen ${url}`);

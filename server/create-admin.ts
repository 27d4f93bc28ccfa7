import { createInterface } from 'node:readline/promises';
import { closeDb, returned, writeTx } from '../db/client';
import { describeDb, openConfiguredDb } from './database';
import { sites } from '../db/tables';
import { SignInRequest } from '../src/contracts/session';
import { cliArgs } from './cli-args';
import { readEnv } from './env';
import { insertUser } from './repositories/users';
import { hashPassword } from './services/auth';
import { appendAudit } from './services/audit';

// First run for a real site: creates the site and its first admin. Reads answers from the terminal, or
// from SITE_NAME / ADMIN_EMAIL / ADMIN_NAME / ADMIN_PASSWORD on stdin-less runs (documented in README).
async function main() {
  const env = readEnv();
  const rl = createInterface({ input: process.stdin, output: process.stdout });
  const ask = async (q: string, fallback?: string) => (fallback !== undefined ? fallback : (await rl.question(q)).trim());
  const args = cliArgs(process.argv.slice(2));
  const siteName = await ask('Site name: ', args.site);
  const timeZone = await ask('Site time zone (IANA, e.g. Europe/Berlin): ', args['time-zone']);
  const name = await ask('Admin name: ', args.name);
  const email = await ask('Admin e-mail: ', args.email);
  const password = await ask('Admin password (at least 12 characters): ', args.password);
  rl.close();
  if (!siteName || !name) throw new Error('Site name and admin name are required');
  try {
    new Intl.DateTimeFormat('en', { timeZone: timeZone || 'UTC' });
  } catch {
    throw new Error(`Unknown time zone: ${timeZone}`);
  }
  if (password.length < 12) throw new Error('The password needs at least 12 characters');
  const creds = SignInRequest.parse({ email, password });
  const db = await openConfiguredDb(env);
  const hash = await hashPassword(creds.password);
  await writeTx(db, async (tx) => {
    const site = await tx
      .insert(sites)
      .values({ name: siteName, timeZone: timeZone || 'UTC' })
      .returning()
      .then(returned);
    const user = await insertUser(tx, { siteId: site.id, email: creds.email, name, role: 'admin', passwordHash: hash });
    await appendAudit(tx, {
      siteId: site.id,
      userId: user.id,
      actor: 'create-admin',
      action: 'user.create',
      entity: 'user',
      entityId: user.id,
      newValue: { email: creds.email, role: 'admin' },
      at: new Date(),
    });
  });
  console.log(`Created site "${siteName}" with admin ${creds.email} in ${describeDb(env)}.`);
  await closeDb(db);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});

import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { closeDb } from '../db/client';
import { describeDb, openConfiguredDb } from './database';
import { DEMO_USERS, isEmpty, seedDemo } from '../db/seed';
import { createApp } from './app';
import { systemClock } from './clock';
import { readEnv } from './env';
import { startIntegrations } from './integrations';
import { sealAudit } from './services/audit-verify';
import { proposeDemoChange } from './services/demo-proposal';
import { createMailSender } from './services/mail';
import { createFileStore } from './file-store';
import { installationSecret } from './installation-secrets';
import { launchPlant } from './opcua/launch-plant';
import { openAppPki } from './opcua/pki';
import { startControlLink } from './services/control-link';

const root = path.resolve(__dirname, '..');

/** A configured secret, else one kept in the installation's folder so sign-ins survive a restart. */
const sessionSecret = (configured: Uint8Array | null, dataDir: string): Uint8Array => configured ?? installationSecret(dataDir, '.session-secret');

async function main() {
  const env = readEnv();
  const dataDir = env.dataDir;
  // In a process of its own, so the server never loads the build's code (Workbox, the rewrites of Expo's output).
  if (!env.skipWebBuild) {
    const build = spawnSync(process.execPath, ['--import', 'tsx', path.join(root, 'server/web-build/build.ts')], { cwd: root, stdio: 'inherit' });
    if (build.status !== 0) throw new Error('The web build failed (see above).');
  }
  const db = await openConfiguredDb(env);
  const seeded = env.seedDemo && (await isEmpty(db)) ? await seedDemo(db, { now: systemClock.now() }) : null;
  // Signed checkpoints of the audit chains outside the database: at start, every AUDIT_CHECKPOINT_MINUTES, at stop.
  const seal = async () => {
    try {
      await sealAudit(db, systemClock.now());
    } catch (err) {
      console.error(`[${new Date().toISOString()}] audit checkpoint not written: ${(err as Error).message}`);
    }
  };
  await seal();
  setInterval(seal, env.auditCheckpointMinutes * 60_000);
  const integrations = await startIntegrations(db, {
    ...env,
    fakeWebhookSecret: () => `whsec_${installationSecret(dataDir, '.webhook-secret').toString('hex')}`,
  });
  const mail = createMailSender({ db, clock: systemClock, transport: integrations.mailTransport, from: integrations.mailFrom, intervalMs: 15_000 });
  const localUrl = `http://${env.host === '0.0.0.0' ? 'localhost' : env.host}:${env.port}`;
  if (seeded) await proposeDemoChange({ db, clock: systemClock, mail, linkUrl: env.publicUrl ?? localUrl }, seeded.siteId);
  // Yieldpoint's OPC UA certificate (made once) and trust list beside the database; the link reads, never writes.
  const pki = await openAppPki(path.join(dataDir, 'pki'));
  const controlLink = startControlLink({ db, clock: systemClock, pki });
  const app = createApp({
    db,
    clock: systemClock,
    auth: { secret: sessionSecret(env.sessionSecret, dataDir), idleMinutes: env.sessionIdleMinutes, absoluteHours: env.sessionAbsoluteHours },
    cookieSecure: env.cookieSecure,
    webDir: path.resolve(root, env.webDir),
    publicUrl: env.publicUrl ?? undefined,
    localUrl,
    billing: integrations.billing,
    mail,
    files: createFileStore(path.join(dataDir, 'files')),
    controlLink,
  });
  // The simulated plant starts beside the app without holding it up (its first start makes its certificate).
  const plant = await launchPlant(db, env, dataDir);
  const server = app.listen(env.port, env.host, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : env.port;
    integrations.appListening(`http://${env.host === '0.0.0.0' ? '127.0.0.1' : env.host}:${port}`);
    mail.kick();
    console.log(`\nYieldpoint is running at http://localhost:${port}`);
    if (integrations.stripeFake)
      console.log(
        `Payments: local fake Stripe at ${integrations.stripeFake.url} (test card 4242 4242 4242 4242; API key for /_fake calls ${integrations.stripeFake.apiKey})`,
      );
    if (integrations.smtpSink)
      console.log(
        `Mail: local sink on 127.0.0.1:${integrations.smtpSink.port}, messages kept in ${path.resolve(env.mail.mode === 'sink' ? env.mail.sinkDir : '')}`,
      );
    console.log(`Database: ${describeDb(env)}${seeded ? ' (demo site seeded)' : ''}`);
    if (env.seedDemo) {
      console.log('Demo sign-ins:');
      for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(12)} ${u.email.padEnd(28)} ${u.password}`);
    }
  });
  // Longer than the usual 5 s so a client reusing a kept-alive socket does not race the server closing it.
  server.keepAliveTimeout = 65_000;
  const stop = () => {
    server.close(async () => {
      await seal();
      void Promise.all([mail.stop(), integrations.close(), controlLink.close().then(() => pki.dispose()), plant.close()]).finally(async () => {
        await closeDb(db);
        process.exit(0);
      });
    });
    setTimeout(() => process.exit(0), 3000);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});

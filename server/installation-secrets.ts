import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

/**
 * A random secret of this installation, kept in a file in its folder (beside the SQLite file, or DATA_DIR; created 0600 on first use), so it
 * survives a restart without being a constant anyone can read in the source. Used when no secret is configured:
 * the session key, the local payment fake's webhook secret, the audit chain's key.
 */
export function installationSecret(dir: string, name: '.session-secret' | '.webhook-secret' | '.audit-key', bytes = 32): Buffer {
  const file = path.join(path.resolve(dir), name);
  if (!fs.existsSync(file)) {
    fs.mkdirSync(path.dirname(file), { recursive: true });
    // 'wx': two processes starting at once do not overwrite each other's secret.
    try {
      fs.writeFileSync(file, crypto.randomBytes(bytes).toString('base64'), { mode: 0o600, flag: 'wx' });
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
    }
  }
  return Buffer.from(fs.readFileSync(file, 'utf8').trim(), 'base64');
}

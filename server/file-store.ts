import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { sha256 } from './digest';

/** Uploaded files on disk, each named by the SHA-256 of its bytes: the same bytes are stored once. */
export type FileStore = {
  put(bytes: Buffer): { sha256: string };
  /** The bytes, or null when missing or when they no longer hash to their name. */
  get(sha256: string): Buffer | null;
};

export function createFileStore(dir: string): FileStore {
  fs.mkdirSync(dir, { recursive: true });
  const fileOf = (sha: string) => {
    if (!/^[0-9a-f]{64}$/.test(sha)) throw new Error('not a SHA-256');
    return path.join(dir, sha);
  };
  return {
    put(bytes) {
      const sha = sha256(bytes);
      const file = fileOf(sha);
      if (!fs.existsSync(file)) {
        // Written beside and renamed, so a crash never leaves a half file under a valid name.
        const tmp = `${file}.${process.pid}.${crypto.randomBytes(4).toString('hex')}.part`;
        fs.writeFileSync(tmp, bytes, { mode: 0o600 });
        fs.renameSync(tmp, file);
      }
      return { sha256: sha };
    },
    get(sha) {
      const file = fileOf(sha);
      if (!fs.existsSync(file)) return null;
      const bytes = fs.readFileSync(file);
      return sha256(bytes) === sha ? bytes : null;
    },
  };
}

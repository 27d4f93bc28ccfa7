import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Db } from '../db/client';
import type { Clock } from './clock';
import { createFileStore, type FileStore } from './file-store';
import type { Billing } from './services/billing-provider';
import type { ControlLink } from './services/control-link';
import type { SignInLimit } from './services/sign-in-throttle';

export type AuthConfig = {
  secret: Uint8Array;
  idleMinutes: number;
  absoluteHours: number;
};

/**
 * What the API's routes and services share, built once by `createApp` (`createContext`). A route takes the whole
 * context; a service names the part it reads (`Pick<AppContext, ...>`), so a test or a script can hand it just that.
 */
export type AppContext = {
  db: Db;
  clock: Clock;
  auth: AuthConfig;
  cookieSecure: boolean;
  signInLimit: SignInLimit;
  /** The address for links in e-mails: PUBLIC_URL when set, else the server's own. */
  linkUrl: string;
  /** PUBLIC_URL when set: where the payment page sends the browser back (else to the address the admin's browser used). */
  publicUrl: string | null;
  /** The payment provider; without it the billing screens read local records and payments answer 503. */
  billing: Billing | null;
  /** Asked to deliver the outbox soon after a write queued mail; the outbox is delivered without it too. */
  mail: { kick(): void } | null;
  /** Where uploaded files (certificates of analysis) live. */
  files: FileStore;
  /** The read-only control-system link (OPC UA); without it its routes answer 503. */
  controlLink: ControlLink | null;
};

/** What most services need: the database and the clock. */
export type Services = Pick<AppContext, 'db' | 'clock'>;

/** The parts `server/start.ts` (or a test) hands over; what is left out takes its default. */
export type ContextParts = {
  db: Db;
  clock: Clock;
  auth: AuthConfig;
  cookieSecure?: boolean;
  signInLimit?: SignInLimit;
  /** PUBLIC_URL when set: the address for mail links and the payment page's return. */
  publicUrl?: string;
  /** The address for mail links when PUBLIC_URL is not set (the server's own). */
  localUrl?: string;
  billing?: Billing;
  mail?: { kick(): void };
  /** A fresh temporary folder when omitted (tests). */
  files?: FileStore;
  controlLink?: ControlLink;
};

// Failed sign-ins only. 300 per address per 15 min: a shift of up to 60 people behind one plant address, each
// mistyping up to 5 times at shift change, stays under it; guessing one account is held back per account below it.
// 5 free failures per account, then waits doubling from 1 s to 60 s (README, Sign-in limits).
const DEFAULT_SIGN_IN_LIMIT: SignInLimit = { perAddress: 300, perAccount: 5, windowMs: 15 * 60_000, maxDelayMs: 60_000 };

export function createContext(parts: ContextParts): AppContext {
  return {
    db: parts.db,
    clock: parts.clock,
    auth: parts.auth,
    cookieSecure: parts.cookieSecure ?? false,
    signInLimit: parts.signInLimit ?? DEFAULT_SIGN_IN_LIMIT,
    linkUrl: parts.publicUrl ?? parts.localUrl ?? 'http://localhost:8080',
    publicUrl: parts.publicUrl ?? null,
    billing: parts.billing ?? null,
    mail: parts.mail ?? null,
    files: parts.files ?? createFileStore(fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-files-'))),
    controlLink: parts.controlLink ?? null,
  };
}

import crypto from 'node:crypto';
import type { Clock } from '../clock';

/**
 * Sign-in limits. `perAddress`: failed sign-ins one address may make per window (successes never count).
 * `perAccount`: failed sign-ins on one account before each further attempt waits; the wait then doubles from
 * 1 s up to `maxDelayMs`. Failures are forgotten after a quiet window.
 */
export type SignInLimit = { perAddress: number; perAccount: number; windowMs: number; maxDelayMs?: number };

const DEFAULT_MAX_DELAY_MS = 60_000;
// Beyond this many tracked accounts and devices the oldest are dropped (memory stays bounded under a spray).
const MAX_TRACKED = 50_000;

export type AccountThrottle = {
  /** 0 when an attempt may go ahead now (and it is counted as a failure until it succeeds), else the wait in ms. */
  begin(key: string): number;
  /** The attempt under `key` signed in: its failures are forgotten. */
  succeeded(key: string): void;
};

/**
 * Progressive slow-down per account instead of a lock: a guesser gets `perAccount` tries, then one per
 * 1, 2, 4 ... up to `maxDelayMs` seconds. Attempts in flight count at once, so parallel guesses do not slip through.
 */
export function createAccountThrottle(clock: Clock, limit: SignInLimit): AccountThrottle {
  const maxDelay = limit.maxDelayMs ?? DEFAULT_MAX_DELAY_MS;
  const state = new Map<string, { failures: number; lastAt: number }>();
  const delayAfter = (failures: number) => (failures < limit.perAccount ? 0 : Math.min(maxDelay, 1000 * 2 ** (failures - limit.perAccount)));
  return {
    begin(key) {
      const now = clock.now().getTime();
      let s = state.get(key);
      if (s && now - s.lastAt > limit.windowMs) {
        state.delete(key);
        s = undefined;
      }
      if (s) {
        const wait = s.lastAt + delayAfter(s.failures) - now;
        if (wait > 0) return wait;
        state.delete(key); // re-inserted below: the map keeps the most recently tried last
      }
      if (state.size >= MAX_TRACKED) state.delete(state.keys().next().value!);
      state.set(key, { failures: (s?.failures ?? 0) + 1, lastAt: now });
      return 0;
    },
    succeeded(key) {
      state.delete(key);
    },
  };
}

/**
 * A browser that signed in to an account carries a device token for it; its attempts are slowed on their own,
 * so a stranger's wrong passwords never slow the account's own browsers (the stranger cannot forge the token).
 */
export const DEVICE_COOKIE = 'yp_device';

const deviceMac = (secret: Uint8Array, email: string, nonce: string) =>
  crypto.createHmac('sha256', secret).update(`device|${email}|${nonce}`).digest('base64url');

export function deviceToken(secret: Uint8Array, email: string): string {
  const nonce = crypto.randomBytes(12).toString('base64url');
  return `${nonce}.${deviceMac(secret, email, nonce)}`;
}

/** The throttle key of one attempt: the device's own when its token was issued for this e-mail, else the account's. */
export function throttleKey(secret: Uint8Array, email: string, token: unknown): string {
  if (typeof token === 'string') {
    const [nonce, mac] = token.split('.');
    if (nonce && mac) {
      const want = Buffer.from(deviceMac(secret, email, nonce));
      const got = Buffer.from(mac);
      if (got.length === want.length && crypto.timingSafeEqual(got, want)) return `device:${nonce}`;
    }
  }
  return `account:${email}`;
}

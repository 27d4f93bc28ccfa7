import { createHash } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { precompress } from '../../server/web-build/build';
import { pageWithSession } from '../../server/web-app';
import { PAGE_SESSION_ID } from '../../src/contracts/rules';
import { startTestApp, type TestApp } from './harness';

// The exported web app as the server hands it to a phone: precompressed bundles chosen by Accept-Encoding,
// hashed files cached for a year, the page itself revalidated.
const raw = (base: string, urlPath: string, acceptEncoding?: string) =>
  new Promise<{ status: number; headers: http.IncomingHttpHeaders; body: Buffer }>((resolve, reject) => {
    http
      .get(`${base}${urlPath}`, { headers: acceptEncoding ? { 'accept-encoding': acceptEncoding } : {} }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) }));
      })
      .on('error', reject);
  });

const sessionBlock = (html: string) => {
  const m = new RegExp(`<script id="${PAGE_SESSION_ID}" type="application/json">(.*?)</script>`).exec(html);
  return m ? JSON.parse(m[1]!) : undefined;
};

describe('serving the exported web app', () => {
  let t: TestApp;
  let webDir: string;
  const bundle = `globalThis.x = ${JSON.stringify('yieldpoint '.repeat(5000))};\n`;
  const bundlePath = '/_expo/static/js/web/entry-0123abcd.js';

  beforeAll(async () => {
    webDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-web-'));
    fs.mkdirSync(path.join(webDir, '_expo/static/js/web'), { recursive: true });
    fs.writeFileSync(path.join(webDir, bundlePath), bundle);
    fs.writeFileSync(path.join(webDir, 'index.html'), '<!doctype html><html><head><title>Yieldpoint</title></head><body><div id="root"></div></body></html>');
    precompress(webDir);
    t = await startTestApp({ webDir });
  });
  afterAll(async () => {
    await t.close();
    fs.rmSync(webDir, { recursive: true, force: true });
  });

  it('writes a brotli and a gzip copy beside each text file', () => {
    const file = path.join(webDir, bundlePath);
    expect(zlib.brotliDecompressSync(fs.readFileSync(`${file}.br`)).toString()).toBe(bundle);
    expect(zlib.gunzipSync(fs.readFileSync(`${file}.gz`)).toString()).toBe(bundle);
  });

  it('sends brotli to a browser that takes it, gzip to one that takes only gzip, plain text otherwise', async () => {
    const br = await raw(t.base, bundlePath, 'gzip, deflate, br');
    expect(br.status).toBe(200);
    expect(br.headers['content-encoding']).toBe('br');
    expect(br.headers.vary).toMatch(/accept-encoding/i);
    expect(br.headers['content-type']).toMatch(/javascript/);
    expect(zlib.brotliDecompressSync(br.body).toString()).toBe(bundle);
    expect(br.body.length).toBeLessThan(bundle.length / 10);

    const gz = await raw(t.base, bundlePath, 'gzip');
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(zlib.gunzipSync(gz.body).toString()).toBe(bundle);

    const plain = await raw(t.base, bundlePath);
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.toString()).toBe(bundle);
  });

  it('caches hashed bundles for a year and never the page, which names the signed-in user', async () => {
    const js = await raw(t.base, bundlePath, 'br');
    expect(js.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    const page = await raw(t.base, '/batches', 'br');
    expect(page.status).toBe(200);
    expect(page.headers['cache-control']).toBe('no-store');
    expect(page.headers.vary).toMatch(/cookie/i);
    expect(page.headers['content-type']).toMatch(/html/);
  });

  it('writes the session the page is served for into it: the signed-in user, or none', async () => {
    const operator = await t.signIn('operator');
    const signedIn = await operator.get('/batches');
    expect(signedIn.status).toBe(200);
    const mine = await operator.get('/api/session');
    expect(sessionBlock(signedIn.body as string)).toEqual(mine.body);
    expect((mine.body as { user: { role: string } }).user.role).toBe('operator');

    expect(sessionBlock((await t.client().get('/sign-in')).body as string)).toEqual({ user: null });

    await operator.del('/api/session');
    expect(sessionBlock((await operator.get('/batches')).body as string)).toEqual({ user: null });
  });

  it('escapes the session so no name can close the block and run as script', () => {
    const user = {
      id: 1,
      email: 'a@b.test',
      name: '</script><script>alert(1)</script>',
      role: 'operator' as const,
      siteId: 1,
      siteName: 'S',
      siteTimeZone: 'UTC',
      siteCurrency: 'EUR',
      cautionsAcknowledgedAt: null,
    };
    const html = pageWithSession('<html><head></head><body></body></html>', { user });
    expect(html).not.toContain('</script><script>');
    expect(html.match(/<script/g)).toHaveLength(1);
    expect(sessionBlock(html).user.name).toBe(user.name);
  });

  it("allows the export's own inline scripts by their hashes, read again when the export is rebuilt, and no data block", async () => {
    const scriptSrc = async (urlPath: string) =>
      /script-src ([^;]*)/.exec((await raw(t.base, urlPath)).headers['content-security-policy'] as string)![1]!.trim();
    expect(await scriptSrc('/batches')).toBe("'self'");
    const index = path.join(webDir, 'index.html');
    const before = fs.readFileSync(index, 'utf8');
    const loader = 'window.started=1';
    fs.writeFileSync(index, before.replace('</head>', `<script id="data" type="application/json">{"a":1}</script><script>${loader}</script></head>`));
    try {
      const hash = `'sha256-${createHash('sha256').update(loader).digest('base64')}'`;
      expect(await scriptSrc('/batches')).toBe(`'self' ${hash}`);
      // An API answer keeps the sources last read (it runs no script).
      expect(await scriptSrc('/api/no-such-thing')).toBe(`'self' ${hash}`);
    } finally {
      fs.writeFileSync(index, before);
    }
    expect(await scriptSrc('/batches')).toBe("'self'");
  });

  it('answers an unknown API path with JSON 404, not the page', async () => {
    const r = await raw(t.base, '/api/no-such-thing');
    expect(r.status).toBe(404);
    expect(r.headers['content-type']).toMatch(/json/);
  });
});

// A static export (`web.output: "static"`): one page per route, named like the route file, plus the group copies,
// the sitemap and the not-found page.
describe('serving the page of each route', () => {
  let t: TestApp;
  let webDir: string;
  const pages: Record<string, string> = {
    'index.html': 'home',
    'sign-in.html': 'sign-in',
    'planner/index.html': 'planner',
    'planner/[recipeId].html': 'recipe',
    'planner/plan/[planId].html': 'plan',
    'batches/index.html': 'batches',
    'batches/start.html': 'start',
    'batches/[id].html': 'batch',
    '(app)/batches/[id].html': 'group copy',
    '_sitemap.html': 'sitemap',
    '+not-found.html': 'not found',
  };
  const page = (name: string) => `<!doctype html><html><head><title>${name}</title></head><body><div id="root">${name}</div></body></html>`;

  beforeAll(async () => {
    webDir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-pages-'));
    for (const [file, name] of Object.entries(pages)) {
      fs.mkdirSync(path.dirname(path.join(webDir, file)), { recursive: true });
      fs.writeFileSync(path.join(webDir, file), page(name));
    }
    t = await startTestApp({ webDir });
  });
  afterAll(async () => {
    await t.close();
    fs.rmSync(webDir, { recursive: true, force: true });
  });

  const servedAs = async (urlPath: string) => {
    const r = await raw(t.base, urlPath);
    return { status: r.status, name: /<div id="root">(.*?)<\/div>/.exec(r.body.toString())?.[1], location: r.headers.location };
  };

  it('answers each path with its route’s page, a fixed segment before a parameter', async () => {
    expect(await servedAs('/sign-in')).toMatchObject({ status: 200, name: 'sign-in' });
    expect(await servedAs('/planner')).toMatchObject({ status: 200, name: 'planner' });
    expect(await servedAs('/planner/')).toMatchObject({ status: 200, name: 'planner' });
    expect(await servedAs('/planner/3')).toMatchObject({ status: 200, name: 'recipe' });
    expect(await servedAs('/planner/plan/12')).toMatchObject({ status: 200, name: 'plan' });
    expect(await servedAs('/batches/start')).toMatchObject({ status: 200, name: 'start' });
    expect(await servedAs('/batches/42?tab=readings')).toMatchObject({ status: 200, name: 'batch' });
  });

  it('answers a path no route names with the not-found page and 404, and never serves the sitemap or group copies', async () => {
    expect(await servedAs('/no/such/place')).toMatchObject({ status: 404, name: 'not found' });
    expect(await servedAs('/batches/42/more')).toMatchObject({ status: 404, name: 'not found' });
    expect(await servedAs('/_sitemap')).toMatchObject({ status: 404, name: 'not found' });
    expect(await servedAs('/(app)/batches/42')).toMatchObject({ status: 404, name: 'not found' });
  });

  it('sends `/` to the signed-in role’s home, or to the sign-in page', async () => {
    expect(await servedAs('/')).toMatchObject({ status: 302, location: '/sign-in' });
    const engineer = await t.signIn('engineer');
    const r = await fetch(`${t.base}/`, { headers: { cookie: engineer.cookie! }, redirect: 'manual' });
    expect(r.status).toBe(302);
    expect(r.headers.get('location')).toBe('/planner');
    expect(r.headers.get('cache-control')).toBe('no-store');
  });

  it('writes the session into every page it serves', async () => {
    const operator = await t.signIn('operator');
    const r = await operator.get('/batches/42');
    expect(r.status).toBe(200);
    expect(sessionBlock(r.body as string)?.user?.role).toBe('operator');
  });
});

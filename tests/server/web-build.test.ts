import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { renderOverSnapshots, warmOrder } from '../../server/web-build';
import { WARM_ORDER_ID } from '../../src/web/warm-up';

// An export in the shape Metro writes it: one `__d(factory, id, [dependency ids])` per module, then the entry.
function fakeExport(modules: [number, number[]][], html: string): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'yieldpoint-export-'));
  fs.mkdirSync(path.join(dir, '_expo/static/js/web'), { recursive: true });
  const body = modules.map(([id, deps]) => `__d(function(g,r,i,a,m,e,d){m.exports=${id}},${id},[${deps.join(',')}]);`).join('\n');
  fs.writeFileSync(path.join(dir, '_expo/static/js/web/index-0abc.js'), `var __BUNDLE_START_TIME__=0;\n${body}\n__r(0);\n//# sourceMappingURL=index-0abc.js.map\n`);
  fs.writeFileSync(path.join(dir, 'index.html'), html);
  return dir;
}

describe('finishing the web export', () => {
  const dirs: string[] = [];
  afterEach(() => dirs.splice(0).forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

  it('orders the modules so each comes after everything it imports, once each, through a cycle', () => {
    const dir = fakeExport([[0, [1, 3]], [1, [2, 4]], [2, []], [3, [2]], [4, [1]], [5, []]], '<html><head></head><body></body></html>');
    dirs.push(dir);
    const order = warmOrder(dir);
    expect([...order].sort()).toEqual([0, 1, 2, 3, 4, 5]);
    const at = (id: number) => order.indexOf(id);
    expect(at(2)).toBeLessThan(at(1));
    expect(at(2)).toBeLessThan(at(3));
    expect(at(1)).toBeLessThan(at(0));
    expect(at(3)).toBeLessThan(at(0));
  });

  it('takes out the hydration flag and the empty title, and writes the order as a data block', () => {
    const html =
      '<html><head><title data-rh="true"></title><title>Yieldpoint</title></head><body><div id="root">x</div>' +
      '<script type="module">globalThis.__EXPO_ROUTER_HYDRATE__=true;</script></body></html>';
    const dir = fakeExport([[0, [1]], [1, []]], html);
    dirs.push(dir);
    renderOverSnapshots(dir);
    const out = fs.readFileSync(path.join(dir, 'index.html'), 'utf8');
    expect(out).not.toContain('__EXPO_ROUTER_HYDRATE__');
    expect(out).not.toContain('<title data-rh="true"></title>');
    expect(out).toContain('<title>Yieldpoint</title>');
    const block = new RegExp(`<script id="${WARM_ORDER_ID}" type="application/json">(.*?)</script></head>`).exec(out);
    expect(JSON.parse(block![1]!)).toEqual([1, 0]);
  });
});

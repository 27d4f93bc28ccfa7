import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../support/server';

// The API process serves the finished export and never loads what makes it: React (the pages are rendered by
// `expo export` at build time), Workbox and the rewrites of Expo's output (server/web-build/, run by `npm start` in a
// process of its own). Loaded in a fresh Node, as `npm start` loads it.
describe('the API process', () => {
  it('loads the app without React, React Native, Workbox or any build step', () => {
    const script = "require('./server/app.ts'); console.log('loaded:' + JSON.stringify(Object.keys(require.cache)))";
    const out = execFileSync(process.execPath, ['--import', 'tsx', '-e', script], { cwd: ROOT, encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'] });
    // node-opcua writes its own notices to stdout as well.
    const line = out.split('\n').find((l) => l.startsWith('loaded:'))!;
    const loaded = (JSON.parse(line.slice('loaded:'.length)) as string[]).map((f) => f.slice(ROOT.length + 1));
    // What it does load: the serving side of the web app.
    expect(loaded).toEqual(expect.arrayContaining(['server/web-app.ts', 'server/web-pages.ts', 'node_modules/express/index.js']));
    const offending = loaded.filter(
      (f) =>
        /^node_modules\/(react|react-dom|react-native|react-native-web|expo|expo-router|workbox-build)\//.test(f) ||
        f.startsWith('server/web-build/') ||
        f.startsWith('app/'),
    );
    expect(offending).toEqual([]);
  });
});

// npm run icons: the manifest's PNG icons from icon.svg, drawn by Debian's Chromium (playwright-core). The
// maskable one keeps the mark inside the central 80 % that every launcher mask leaves visible, on the tile colour.
import fs from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';

const dir = path.dirname(new URL(import.meta.url).pathname);
const svg = fs.readFileSync(path.join(dir, 'icon.svg'), 'utf8');
const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu'] });
try {
  for (const [name, size, inset] of [
    ['icon-192.png', 192, 0],
    ['icon-512.png', 512, 0],
    ['icon-maskable-512.png', 512, 0.12],
  ]) {
    const page = await browser.newPage({ viewport: { width: size, height: size } });
    const pad = Math.round(size * inset);
    await page.setContent(
      `<body style="margin:0;background:${inset ? '#0F4C5C' : 'transparent'}">${svg.replace('width="64" height="64"', `width="${size - 2 * pad}" height="${size - 2 * pad}" style="display:block;margin:${pad}px"`)}</body>`,
    );
    await page.screenshot({ path: path.join(dir, name), omitBackground: !inset });
    await page.close();
  }
} finally {
  await browser.close();
}

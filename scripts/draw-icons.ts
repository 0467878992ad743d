// Draws the app's PNG icons from its own SVGs with Debian's chromium (the one the tests drive):
// `node --import tsx scripts/draw-icons.ts`. The PNGs are committed; run this after changing an SVG.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { chromium } from '@playwright/test';

const dir = join(import.meta.dirname, '..', 'public', 'icons');
const ICONS = [
  { svg: 'railcall.svg', png: 'railcall-192.png', size: 192 },
  { svg: 'railcall.svg', png: 'railcall-512.png', size: 512 },
  { svg: 'railcall-maskable.svg', png: 'railcall-maskable-512.png', size: 512 },
  { svg: 'railcall.svg', png: 'apple-touch-icon.png', size: 180 },
];

const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu'] });
try {
  for (const icon of ICONS) {
    const page = await browser.newPage({ viewport: { width: icon.size, height: icon.size } });
    const svg = readFileSync(join(dir, icon.svg), 'utf8');
    await page.setContent(`<html><body style="margin:0;background:transparent">${svg.replace('<svg ', `<svg width="${icon.size}" height="${icon.size}" `)}</body></html>`);
    await page.screenshot({ path: join(dir, icon.png), omitBackground: true, clip: { x: 0, y: 0, width: icon.size, height: icon.size } });
    await page.close();
    console.log(`drew ${icon.png}`);
  }
} finally {
  await browser.close();
}

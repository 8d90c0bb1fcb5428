/**
 * Renders the app icons in manifest/icons/ from the original artwork manifest/icons/crankhouse.svg.
 * Run with `npm run icons` after changing the artwork; the PNGs are committed.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { launchFreshChromium } from './chromium';

const iconsDir = resolve(import.meta.dirname, '../../manifest/icons');
const artwork = readFileSync(resolve(iconsDir, 'crankhouse.svg'), 'utf8');

/** Maskable icons fill the square and keep the drawing inside the central safe circle (radius 40 %). */
function maskable(svg: string): string {
  return svg
    .replace(
      '<rect width="512" height="512" rx="96" fill="#14212b"/>',
      '<rect width="512" height="512" fill="#14212b"/>',
    )
    .replace('<g fill="none"', '<g transform="translate(256 256) scale(0.78) translate(-259 -264)" fill="none"');
}

const targets = [
  { file: 'icon-192.png', size: 192, svg: artwork },
  { file: 'icon-512.png', size: 512, svg: artwork },
  { file: 'icon-maskable-512.png', size: 512, svg: maskable(artwork) },
];

const browser = await launchFreshChromium({ viewport: { width: 512, height: 512 } });
try {
  const page = await browser.context.newPage();
  for (const { file, size, svg } of targets) {
    await page.setViewportSize({ width: size, height: size });
    const dataUrl = `data:image/svg+xml;base64,${Buffer.from(svg).toString('base64')}`;
    await page.setContent(
      `<html><body style="margin:0;background:transparent"><img src="${dataUrl}" width="${size}" height="${size}"></body></html>`,
    );
    await page.locator('img').evaluate((img: HTMLImageElement) => img.decode());
    writeFileSync(resolve(iconsDir, file), await page.screenshot({ omitBackground: true, type: 'png' }));
    console.log(`wrote manifest/icons/${file} (${size}x${size})`);
  }
} finally {
  await browser.close();
}

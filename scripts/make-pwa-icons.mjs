// Renders the PWA icons in static/ from the mark in static/favicon.svg with headless Chromium.
// Run once after changing the mark: node scripts/make-pwa-icons.mjs
import { chromium } from '@playwright/test';
import { readFileSync } from 'node:fs';
const mark = readFileSync('static/favicon.svg', 'utf8');
// The maskable variant: full-bleed ink with the mark's contents inside the central safe zone (80 % circle).
const inner = mark
	.replace(/^<svg[^>]*>/, '')
	.replace(/<\/svg>$/, '')
	.replace(/<rect[^>]*\/>/, '');
const maskable = `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64"><rect width="64" height="64" fill="#14312b"/><g transform="translate(32 33) scale(0.72) translate(-32 -33)">${inner}</g></svg>`;
const browser = await chromium.launch({
	executablePath: '/usr/bin/chromium',
	args: ['--no-sandbox', '--disable-gpu']
});
const page = await browser.newPage();
for (const [name, svg, size] of [
	['icon-192.png', mark, 192],
	['icon-512.png', mark, 512],
	['icon-maskable-192.png', maskable, 192],
	['icon-maskable-512.png', maskable, 512],
	['apple-touch-icon.png', maskable, 180]
]) {
	await page.setViewportSize({ width: size, height: size });
	await page.setContent(
		`<html><body style="margin:0;background:transparent">${svg.replace('<svg ', `<svg width="${size}" height="${size}" `)}</body></html>`
	);
	await page.screenshot({
		path: `static/${name}`,
		omitBackground: true,
		clip: { x: 0, y: 0, width: size, height: size }
	});
}
await browser.close();

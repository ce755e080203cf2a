// Renders the app's icons from the SVGs in this folder into public/ (copied into the web build by
// `expo export`): the manifest's 192/512 px icons and maskable icon, the home-screen icon for
// phones that ignore the manifest's, and the favicon (PNG and a .ico wrapping 16 and 32 px PNGs).
// Run by hand after changing a drawing: `node assets/icons/render-icons.js` (uses Debian's Chromium).
const { execSync } = require('node:child_process');
const { mkdirSync, readFileSync, writeFileSync, copyFileSync } = require('node:fs');
const path = require('node:path');
const { chromium } = require('playwright-core');

const here = __dirname;
const out = path.resolve(here, '../../public');

const renders = [
  { svg: 'boardside-icon.svg', size: 192, file: 'icons/icon-192.png' },
  { svg: 'boardside-icon.svg', size: 512, file: 'icons/icon-512.png' },
  { svg: 'boardside-maskable.svg', size: 512, file: 'icons/maskable-512.png' },
  { svg: 'boardside-maskable.svg', size: 180, file: 'icons/apple-touch-icon.png' },
  { svg: 'boardside-icon.svg', size: 32, file: 'icons/favicon-32.png' },
  { svg: 'boardside-icon.svg', size: 16, file: 'icons/favicon-16.png' },
];

/** A .ico file holding PNG images (every current browser reads PNG inside ICO). */
function ico(pngs) {
  const header = Buffer.alloc(6 + 16 * pngs.length);
  header.writeUInt16LE(0, 0);
  header.writeUInt16LE(1, 2);
  header.writeUInt16LE(pngs.length, 4);
  let offset = header.length;
  pngs.forEach(({ size, data }, i) => {
    const at = 6 + 16 * i;
    header.writeUInt8(size >= 256 ? 0 : size, at);
    header.writeUInt8(size >= 256 ? 0 : size, at + 1);
    header.writeUInt16LE(1, at + 4); // colour planes
    header.writeUInt16LE(32, at + 6); // bits per pixel
    header.writeUInt32LE(data.length, at + 8);
    header.writeUInt32LE(offset, at + 12);
    offset += data.length;
  });
  return Buffer.concat([header, ...pngs.map((p) => p.data)]);
}

(async () => {
  const executablePath = process.env.CHROMIUM_PATH ?? execSync('command -v chromium', { encoding: 'utf8' }).trim();
  const browser = await chromium.launch({ executablePath, args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking'] });
  const page = await browser.newPage();
  mkdirSync(path.join(out, 'icons'), { recursive: true });
  const pngs = {};
  for (const { svg, size, file } of renders) {
    const source = readFileSync(path.join(here, svg), 'utf8');
    await page.setViewportSize({ width: size, height: size });
    await page.setContent(`<html><body style="margin:0;background:transparent">${source.replace('<svg ', `<svg width="${size}" height="${size}" `)}</body></html>`);
    const data = await page.screenshot({ omitBackground: true, clip: { x: 0, y: 0, width: size, height: size } });
    writeFileSync(path.join(out, file), data);
    pngs[file] = { size, data };
  }
  writeFileSync(path.join(out, 'favicon.ico'), ico([pngs['icons/favicon-16.png'], pngs['icons/favicon-32.png']]));
  copyFileSync(path.join(here, 'boardside-icon.svg'), path.join(out, 'icons/icon.svg'));
  await browser.close();
  console.log(`icons written to ${out}`);
})();

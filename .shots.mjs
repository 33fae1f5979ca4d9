import { chromium } from 'playwright-core';
const [file, outDir, ...hashes] = process.argv.slice(2);
const b = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--headless', '--no-sandbox', '--disable-gpu'] });
for (const spec of hashes) {
  const [hash, w] = spec.split('@');
  const ctx = await b.newContext({ viewport: { width: Number(w || 1200), height: 900 } });
  const p = await ctx.newPage();
  const errs = [];
  p.on('console', (m) => { if (m.type() === 'error') errs.push(m.text()); });
  p.on('pageerror', (e) => errs.push(e.message));
  await p.goto('file://' + file + hash);
  await p.waitForTimeout(400);
  const name = (hash.replace(/[^a-z0-9-]/gi, '') || 'overview') + '-' + (w || 1200);
  await p.screenshot({ path: `${outDir}/${name}.png`, fullPage: Number(w || 1200) > 600 });
  console.log(name, errs.join(' | '));
  await ctx.close();
}
await b.close();

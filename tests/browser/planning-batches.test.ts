// Issue 6, the lab lead's part: compare the devices of two fabrication batches, set a spec window,
// download the comparison as CSV, and open a device from it. The statistics shown are checked
// against values computed here from the devices' own calibrated parameters: mean, sample standard
// deviation (n − 1) and median (textbook definitions), and the modified z-score
// M = 0.6745·(x − median)/MAD with |M| > 3.5 an outlier (Iglewicz & Hoaglin, "How to Detect and
// Handle Outliers", ASQC 1993 [from memory]).
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import type { Browser, Page } from 'playwright-core';
import type { BatchCompareResponse } from '@/shared/api/planning';
import type { TestServer } from '@/tests/support/testServer';
import { DEMO, horizontalOverflow, openPage, PHONE, sessionToken, shot, signInThroughUi, WIDE, demoSite } from './support';

jest.setTimeout(300_000);

let server: TestServer;
let browser: Browser;

demoSite((s, b) => {
  server = s;
  browser = b;
});

async function api<T>(page: Page, p: string): Promise<T> {
  const res = await fetch(`${server.url}${p}`, { headers: { Authorization: `Bearer ${await sessionToken(page)}` } });
  if (!res.ok) throw new Error(`GET ${p}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

async function text(page: Page, testID: string): Promise<string> {
  return (await page.getByTestId(testID).first().textContent()) ?? '';
}

function firstNumber(t: string): number {
  const m = /-?\d+(?:\.\d+)?(?:e[-+]?\d+)?/.exec(t);
  if (!m) throw new Error(`no number in ${JSON.stringify(t)}`);
  return Number(m[0]);
}

const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const sampleSd = (xs: number[]) => Math.sqrt(xs.reduce((a, x) => a + (x - mean(xs)) ** 2, 0) / (xs.length - 1));
function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const PARAMS = ['f0_hz', 'gamma0', 'asymmetry', 'qi'];

describe.each([
  ['phone', PHONE, false],
  ['wide', WIDE, true],
] as const)('%s: lab lead compares batches', (label, viewport, wide) => {
  test('statistics, spec window, CSV export, device link', async () => {
    const { page, context, errors } = await openPage(browser, viewport);
    await signInThroughUi(page, server.url, DEMO.lab_lead.email, DEMO.lab_lead.password);
    await page.getByTestId('nav-batches').click();
    await page.getByTestId('batch-row-NB-2611').waitFor();
    await page.getByTestId('compare-results').waitFor();
    const { batches } = await api<{ batches: { id: number; code: string }[] }>(page, '/api/batches');
    const ids = batches.slice(0, 2).map((b) => b.id).sort((a, b) => a - b);
    const q = `params=${PARAMS.join(',')}&batches=${ids.join(',')}`;
    const cmp = await api<BatchCompareResponse>(page, `/api/batches/compare?${q}`);
    expect(cmp.batches.map((b) => b.code).sort()).toEqual(['NB-2611', 'NB-2614']);

    // Per batch and parameter: n, mean (UI in GHz for f0) against values computed here.
    for (const b of cmp.batches) {
      for (const p of PARAMS) {
        const s = b.stats[p];
        const xs = s.devices.map((d) => d.value);
        expect(Number(await text(page, `compare-n-${p}-${b.code}`).then((t) => firstNumber(t)))).toBe(xs.length);
        if (xs.length === 0) continue;
        const scale = p === 'f0_hz' ? 1e-9 : 1;
        expect(firstNumber(await text(page, `compare-mean-${p}-${b.code}`)) / (mean(xs) * scale)).toBeCloseTo(1, 5);
        expect(s.mean! / mean(xs)).toBeCloseTo(1, 12);
        expect(s.median! / median(xs)).toBeCloseTo(1, 12);
        if (xs.length > 1) expect(s.std! / sampleSd(xs)).toBeCloseTo(1, 10);
        const med = median(xs);
        const mad = median(xs.map((x) => Math.abs(x - med)));
        for (const d of s.devices) {
          if (mad > 0) {
            const z = (0.6745 * (d.value - med)) / mad;
            expect(d.robustZ!).toBeCloseTo(z, 9);
            expect(d.outlier).toBe(Math.abs(z) > 3.5);
          }
          // every compared device is listed (a link to it) with an outlier mark when flagged
          await page.getByTestId(`compare-device-${p}-${d.deviceName}`).waitFor();
          expect(await page.getByTestId(`compare-outlier-${p}-${d.deviceName}`).count()).toBe(d.outlier ? 1 : 0);
        }
      }
    }
    await page.getByTestId('compare-chart-f0_hz-canvas').locator('canvas').first().waitFor({ timeout: 60_000 });
    await page.getByTestId('batch-compare').evaluate((e) => e.scrollIntoView({ block: 'start' }));
    await shot(page, `planning-batches-compare-${label}`);

    // Spec window on f0 (GHz in the form, Hz in the API): one device of NB-2611 falls outside.
    const f0s = cmp.batches.flatMap((b) => b.stats.f0_hz.devices);
    const sorted = [...f0s].sort((a, b) => a.value - b.value);
    const top = sorted[sorted.length - 1];
    const lo = Math.floor((sorted[0].value / 1e9) * 100) / 100 - 0.01;
    const hi = Number(((sorted[sorted.length - 2].value + top.value) / 2e9).toFixed(4));
    await page.getByTestId('spec-edit-f0_hz').click();
    await page.getByTestId('spec-min-f0_hz').fill(String(lo));
    await page.getByTestId('spec-max-f0_hz').fill(String(hi));
    await page.getByTestId('spec-save-f0_hz').click();
    await page.getByTestId(`compare-outofspec-f0_hz-${top.deviceName}`).waitFor();
    expect(await text(page, 'spec-shown-f0_hz')).toContain(`${lo}`);
    const after = await api<BatchCompareResponse>(page, `/api/batches/compare?${q}`);
    expect(after.specWindows.f0_hz.min).toBeCloseTo(lo * 1e9, 0);
    expect(after.specWindows.f0_hz.max).toBeCloseTo(hi * 1e9, 0);
    for (const d of after.batches.flatMap((b) => b.stats.f0_hz.devices)) {
      expect(d.inSpec).toBe(d.value >= lo * 1e9 && d.value <= hi * 1e9);
      expect(await page.getByTestId(`compare-outofspec-f0_hz-${d.deviceName}`).count()).toBe(d.inSpec ? 0 : 1);
    }
    await page.getByTestId('compare-section-f0_hz').evaluate((e) => e.scrollIntoView({ block: 'start' }));
    await shot(page, `planning-batches-spec-${label}`);

    // CSV: one row per device × parameter, the same values as the API.
    await page.getByTestId('compare-controls').evaluate((e) => e.scrollIntoView({ block: 'start' }));
    const dl = page.waitForEvent('download');
    await page.getByTestId('compare-csv').click();
    const download = await dl;
    expect(download.suggestedFilename()).toMatch(/\.csv$/);
    const csv = Papa.parse<Record<string, string>>(readFileSync((await download.path())!, 'utf8').trim(), { header: true });
    expect(csv.errors).toEqual([]);
    const expected = after.batches.flatMap((b) => PARAMS.flatMap((p) => b.stats[p].devices.map((d) => ({ b: b.code, p, d }))));
    expect(csv.data).toHaveLength(expected.length);
    for (const e of expected) {
      const row = csv.data.find((r) => r.batch === e.b && r.parameter === e.p && r.device === e.d.deviceName);
      expect(row).toBeDefined();
      expect(Number(row!.value)).toBe(e.d.value);
      if (e.p === 'f0_hz') expect(row!.in_spec).toBe(String(e.d.inSpec));
    }
    await page.getByTestId('compare-csv-done').waitFor();

    // More parameters on demand; a device opens from the comparison.
    await page.getByTestId('compare-param-flux_period').click();
    await page.getByTestId('compare-section-flux_period').waitFor();
    await page.getByTestId('compare-table-flux_period').waitFor();
    const first = after.batches[0].stats.f0_hz.devices[0];
    await page.getByTestId(`compare-device-f0_hz-${first.deviceName}`).click();
    await page.waitForURL((u) => u.pathname === `/devices/${first.deviceId}`);
    await page.getByTestId('device-name').waitFor();
    expect(await text(page, 'device-name')).toBe(first.deviceName);
    if (!wide) {
      await page.getByTestId('nav-batches').click();
      await page.getByTestId('compare-results').waitFor();
      const o = await horizontalOverflow(page);
      expect(o.scrollWidth).toBeLessThanOrEqual(o.innerWidth);
    }
    // Remove the window again (the other viewport starts from the seeded state).
    await fetch(`${server.url}/api/spec-windows/f0_hz`, { method: 'DELETE', headers: { Authorization: `Bearer ${await sessionToken(page)}` } });
    expect(errors).toEqual([]);
    await context.close();
  });
});

test('an experimentalist compares but cannot set spec windows', async () => {
  const { page, context } = await openPage(browser, PHONE);
  await signInThroughUi(page, server.url, DEMO.experimentalist.email, DEMO.experimentalist.password);
  await page.getByTestId('nav-batches').click();
  await page.getByTestId('compare-results').waitFor();
  await page.getByTestId('spec-shown-gamma0').waitFor();
  expect(await text(page, 'spec-shown-gamma0')).toContain('0.03');
  expect(await page.getByTestId('spec-edit-gamma0').count()).toBe(0);
  // No batch chosen: a clear empty state instead of a table.
  for (const b of ['NB-2611', 'NB-2614']) {
    const { batches } = await api<{ batches: { id: number; code: string }[] }>(page, '/api/batches');
    await page.getByTestId(`compare-batch-${batches.find((x) => x.code === b)!.id}`).click();
  }
  await page.getByText('Choose batches and parameters').waitFor();
  await context.close();
});

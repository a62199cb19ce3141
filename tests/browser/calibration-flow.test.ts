// Issue 5, app part, through the real UI: a device engineer uploads a sweep, follows the fit job,
// reads the fitted tuning curve, residuals and parameters, accepts the fit, and sees it become the
// device's active calibration with the previous one kept as superseded. Also: a bad file is refused
// row-precisely with nothing stored, and an experimentalist sees no review buttons.
//
// The sweeps are generated here with the core's synthetic generator (calibration/synth.ts) from
// known parameters; the truths the fit must recover are those parameters. The core's own accuracy
// is tested against outside references in tests/unit; this test checks the app shows what it got.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { rawComplexCsv, tuningPointsCsv, type SyntheticDevice } from '@/calibration/synth';
import request from 'supertest';
import { startTestServer, type TestServer } from '@/tests/support/testServer';
import { bearer, signInAs } from '@/tests/support/api';
import { countColour, countInk, decodePng } from './calibration-pixels';
import { DEMO, horizontalOverflow, launchChromium, openPage, PHONE, requireExport, sessionToken, shot, signInThroughUi, WIDE } from './support';

jest.setTimeout(300_000);

// Theme colours (client/theme.ts): the card background and the copper of the fitted curve.
const SHEET = '#FBFAF6';
const COPPER = '#B4532A';

// Invented demo device: 6.1 GHz bare λ/4, γ0 = 0.02, d = 0.15, one flux quantum per 1.2 mA.
const TRUTH: SyntheticDevice = {
  f0Hz: 6.1e9,
  gamma0: 0.02,
  asymmetry: 0.15,
  fluxPeriod: 1.2,
  fluxOffset: 0.05,
  biasUnit: 'mA',
  geometry: 'notch',
  qi: 60_000,
  qcAbs: 15_000,
  phiRad: 0.12,
  a: 0.7,
  alphaRad: 0.4,
  delayS: 35e-9,
};
const NOISE_HZ = 50e3;

let server: TestServer;
let browser: Browser;
let dir: string;

function tuningFile(name: string, seed: number): string {
  const file = path.join(dir, name);
  writeFileSync(file, tuningPointsCsv(TRUTH, { biasMin: -0.5, biasMax: 0.5, points: 41, seed, noiseHz: NOISE_HZ }));
  return file;
}

beforeAll(async () => {
  const staticDir = requireExport();
  dir = mkdtempSync(path.join(tmpdir(), 'fw-cal-'));
  server = await startTestServer({ seedDemo: true, staticDir });
  // The demo devices already carry calibrations; the flow starts from devices that have none.
  const token = await signInAs(server.app, 'device_engineer');
  const batches = await request(server.app).get('/api/batches').set(bearer(token));
  const batchId = batches.body.batches[0].id as number;
  for (const name of ['BT-PHONE', 'BT-WIDE']) {
    const res = await request(server.app)
      .post('/api/devices')
      .set(bearer(token))
      .send({ name, batchId, chipPosition: 'Z9', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.1e9 });
    expect(res.status).toBe(201);
  }
  browser = await launchChromium();
});

afterAll(async () => {
  await browser?.close();
  await (server?.app.locals.jobs as { close?: () => Promise<void> } | undefined)?.close?.();
  await server?.close();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

async function api<T>(page: Page, p: string): Promise<T> {
  const res = await fetch(`${server.url}${p}`, { headers: { Authorization: `Bearer ${await sessionToken(page)}` } });
  if (!res.ok) throw new Error(`${p}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

async function deviceId(page: Page, name: string): Promise<number> {
  const { devices } = await api<{ devices: { id: number; name: string }[] }>(page, '/api/devices');
  const d = devices.find((x) => x.name === name);
  if (!d) throw new Error(`no demo device ${name}`);
  return d.id;
}

/** Records every data-testid that ever appears, so short-lived states (uploading, fitting) can be asserted afterwards. */
async function watchTestIds(page: Page): Promise<void> {
  await page.addInitScript(() => {
    const seen = new Set<string>();
    (window as unknown as { __seen: Set<string> }).__seen = seen;
    const scan = (n: Node) => {
      if (n instanceof Element) {
        const id = n.getAttribute('data-testid');
        if (id) seen.add(id);
        n.querySelectorAll('[data-testid]').forEach((e) => seen.add(e.getAttribute('data-testid')!));
      }
    };
    new MutationObserver((ms) => ms.forEach((m) => m.addedNodes.forEach(scan))).observe(document, { childList: true, subtree: true });
  });
}

async function seenTestIds(page: Page): Promise<string[]> {
  return page.evaluate(() => [...(window as unknown as { __seen: Set<string> }).__seen]);
}

async function pickFiles(page: Page, files: string[]): Promise<void> {
  const chooser = page.waitForEvent('filechooser');
  await page.getByTestId('upload-pick').click();
  await (await chooser).setFiles(files);
}

/** Screenshot of the chart's canvas, decoded: how many pixels are drawn, how many in copper. */
async function canvasInk(page: Page, testID: string): Promise<{ ink: number; copper: number; area: number }> {
  const canvas = page.locator(`[data-testid="${testID}"] canvas`).first();
  await canvas.waitFor({ state: 'visible', timeout: 60_000 });
  // Skia draws on the next frames after the wasm is ready.
  await page.waitForTimeout(400);
  const px = decodePng(await canvas.screenshot());
  return { ink: countInk(px, SHEET), copper: countColour(px, COPPER, 45), area: px.width * px.height };
}

function firstNumber(text: string | null): { value: number; err: number | null } {
  const m = /(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)(?:\s*±\s*(\d+(?:\.\d+)?(?:e[-+]?\d+)?))?/.exec(text ?? '');
  if (!m) throw new Error(`no number in ${JSON.stringify(text)}`);
  return { value: Number(m[1]), err: m[2] ? Number(m[2]) : null };
}

/** The shown value must be within 5 of its own standard errors of the truth (and the error must be small). */
async function expectParamNear(page: Page, name: string, truth: number, maxRelErr: number): Promise<void> {
  const { value, err } = firstNumber(await page.getByTestId(`param-${name}-value`).textContent());
  expect(err).not.toBeNull();
  expect(Math.abs(value - truth)).toBeLessThanOrEqual(5 * err! + Math.abs(truth) * 1e-6);
  expect(err! / Math.abs(truth)).toBeLessThan(maxRelErr);
}

/** Scrolls the element to the top of its scroll view, then takes the viewport screenshot. */
async function shotOf(page: Page, testID: string, name: string): Promise<void> {
  await page.getByTestId(testID).evaluate((e) => e.scrollIntoView({ block: 'start' }));
  await shot(page, name);
}

async function uploadAndOpen(page: Page, files: string[]): Promise<number> {
  await pickFiles(page, files);
  for (const f of files) await page.getByTestId(`upload-file-${path.basename(f)}`).waitFor();
  await page.getByTestId('upload-submit').click();
  await page.getByTestId('open-new-fit').waitFor({ timeout: 120_000 });
  const seen = await seenTestIds(page);
  // Processing was visible: the byte progress of the upload or the job's own status.
  expect(seen.some((s) => s === 'upload-progress' || s === 'job-status')).toBe(true);
  await page.getByTestId('open-new-fit').click();
  await page.waitForURL((u) => /^\/fits\/\d+$/.test(u.pathname));
  await page.getByTestId('fit-detail').waitFor();
  return Number(new URL(page.url()).pathname.split('/').pop());
}

async function acceptWithComment(page: Page, comment: string): Promise<void> {
  await page.getByTestId('review-comment').fill(comment);
  await page.getByTestId('review-accept').click();
  await page.getByTestId('fit-status-accepted').waitFor();
  expect(await page.getByTestId('review-comment-shown').textContent()).toContain(comment);
}

describe.each([
  ['phone', PHONE, false, 'BT-PHONE'],
  ['wide', WIDE, true, 'BT-WIDE'],
] as const)('%s: device engineer calibrates a device', (label, viewport, wide, deviceName) => {
  test('upload, follow the job, read the fit, accept it, then replace it by a newer one', async () => {
    const { page, context, errors } = await openPage(browser, viewport);
    await watchTestIds(page);
    await signInThroughUi(page, server.url, DEMO.device_engineer.email, DEMO.device_engineer.password);
    await page.getByTestId(`device-row-${deviceName}`).click();
    await page.getByTestId('device-calibration').waitFor();
    await page.getByTestId('active-calibration-none').waitFor();
    await page.getByTestId('fit-timeline-empty').waitFor();

    // Version 1: tuning points.
    const fit1 = await uploadAndOpen(page, [tuningFile(`${label}-sweep-1.csv`, 11)]);
    await page.getByTestId('fit-status-proposed').waitFor();
    expect(await page.getByTestId('fit-title').textContent()).toBe(`${deviceName} · fit v1`);

    // Charts are drawn: the tuning chart shows ink and the copper model curve; the residuals chart shows ink.
    const tuning = await canvasInk(page, 'tuning-chart-canvas');
    expect(tuning.ink / tuning.area).toBeGreaterThan(0.01);
    expect(tuning.copper).toBeGreaterThan(150); // a 2-px curve across the plot
    const residuals = await canvasInk(page, 'residuals-chart-canvas');
    expect(residuals.ink / residuals.area).toBeGreaterThan(0.005);
    // Control for the pixel count: a plain card area is (nearly) all background.
    const blank = decodePng(await page.getByTestId('goodness').screenshot());
    expect(countColour(blank, COPPER, 45)).toBe(0);

    // Residual rms close to the injected noise (41 points: the rms scatters by ~1/sqrt(2·36) ≈ 12 %).
    const rms = firstNumber(await page.getByTestId('residual-rms').textContent());
    expect(rms.value).toBeGreaterThan(0.6 * (NOISE_HZ / 1e3));
    expect(rms.value).toBeLessThan(1.4 * (NOISE_HZ / 1e3));
    expect(await page.getByTestId('residual-rms').textContent()).toContain('kHz');

    // Parameters with uncertainties near the synthetic truth.
    await expectParamNear(page, 'f0_hz', TRUTH.f0Hz / 1e9, 1e-4);
    await expectParamNear(page, 'gamma0', TRUTH.gamma0, 0.05);
    await expectParamNear(page, 'asymmetry', TRUTH.asymmetry, 0.05);
    await expectParamNear(page, 'flux_period', TRUTH.fluxPeriod, 0.02);
    await expectParamNear(page, 'flux_offset', TRUTH.fluxOffset, 0.5);
    expect(await page.getByTestId('param-f0_hz-value').textContent()).toContain('GHz');
    expect(await page.getByTestId('param-flux_period-value').textContent()).toContain('mA');
    // χ²_red near 1: the file states the true σ (sigma column = noise).
    const redchi = firstNumber(await page.getByTestId('goodness-redchi').textContent()).value;
    expect(redchi).toBeGreaterThan(0.4);
    expect(redchi).toBeLessThan(2);
    await page.getByTestId('correlation-matrix').waitFor();
    await shotOf(page, 'tuning-chart', 'calibration-fit-charts');
    await shotOf(page, 'param-table', 'calibration-fit-params');
    await shotOf(page, 'fit-title', 'calibration-fit-proposed');

    await acceptWithComment(page, 'Curve and residuals look clean; accepting as first calibration.');
    await page.getByTestId('back-to-device').click();
    await page.getByTestId('active-calibration').waitFor();
    expect(await page.getByTestId('active-calibration-version').textContent()).toBe('Version 1');
    expect(await page.getByTestId('active-f0').textContent()).toContain('GHz');
    await page.getByTestId('device-detail').getByTestId('calibration-accepted').waitFor();
    // The devices list shows the status too (beside the detail on wide screens, one tap back on phones).
    if (wide) await page.getByTestId(`device-row-${deviceName}`).getByTestId('calibration-accepted').waitFor();

    // Version 2 replaces it: on the phone another tuning sweep; on the wide screen a raw S21 sweep.
    let fit2: number;
    if (!wide) {
      fit2 = await uploadAndOpen(page, [tuningFile(`${label}-sweep-2.csv`, 12)]);
    } else {
      const raw = path.join(dir, 'wide-raw.csv');
      writeFileSync(raw, rawComplexCsv(TRUTH, { biasMin: -0.5, biasMax: 0.5, points: 15, seed: 5, freqPoints: 201, noise: 0.004 }));
      fit2 = await uploadAndOpen(page, [raw]);
      // Per-trace Q values and one raw trace with its fitted circle.
      const q = await canvasInk(page, 'q-chart-canvas');
      expect(q.ink / q.area).toBeGreaterThan(0.005);
      expect(q.copper).toBeGreaterThan(15 * 20); // 15 filled copper Q_i dots of radius 3.5 px
      await page.getByTestId('raw-trace').waitFor();
      const iq = page.locator('[data-testid="trace-iq"] canvas').first();
      await iq.waitFor({ timeout: 60_000 });
      await page.waitForTimeout(400);
      const iqPx = decodePng(await iq.screenshot());
      expect(countColour(iqPx, COPPER, 45)).toBeGreaterThan(100);
      await shotOf(page, 'q-chart', 'calibration-fit-q');
      await shotOf(page, 'raw-trace', 'calibration-fit-trace');
      await page.getByTestId('trace-next').click();
      await page.waitForFunction(() => document.querySelector('[data-testid="trace-index"]')?.textContent?.startsWith('9/'));
      await expectParamNear(page, 'f0_hz', TRUTH.f0Hz / 1e9, 1e-4);

      // The traces endpoint re-derives what the fit stored: same f_r for the same trace, the model on every frequency.
      const stored = await api<{ fit: { calibration: { traces: { fr_hz: number | null }[] } } }>(page, `/api/fits/${fit2}`);
      const view = await api<{ trace: { freqHz: number[]; model: { re: number[] } | null; extraction: { frHz: number } } }>(page, `/api/fits/${fit2}/traces/7`);
      expect(view.trace.freqHz).toHaveLength(201);
      expect(view.trace.model?.re).toHaveLength(201);
      expect(Math.abs(view.trace.extraction.frHz / stored.fit.calibration.traces[7].fr_hz! - 1)).toBeLessThan(1e-9);
      const tok = await sessionToken(page);
      for (const bad of [`/api/fits/${fit2}/traces/15`, `/api/fits/${fit1}/traces/0`]) {
        const r = await fetch(`${server.url}${bad}`, { headers: { Authorization: `Bearer ${tok}` } });
        expect(r.status).toBe(404);
      }
    }
    expect(fit2).not.toBe(fit1);
    await page.getByTestId('fit-status-proposed').waitFor();
    await acceptWithComment(page, 'Second cooldown confirms it.');
    await shotOf(page, 'review-record', 'calibration-fit-accepted');

    // Export: the calibration JSON as a download, with the same f0 the page shows.
    if (wide) {
      const dl = page.waitForEvent('download');
      await page.getByTestId('export-json').click();
      const file = await (await dl).path();
      const json = JSON.parse(readFileSync(file, 'utf8')) as { schema: string; params: { f0_hz: { value: number } } };
      expect(json.schema).toBe('fluxwright.calibration/1');
      const shown = firstNumber(await page.getByTestId('param-f0_hz-value').textContent()).value;
      expect(Math.abs(json.params.f0_hz.value / 1e9 - shown)).toBeLessThan(1e-6);
    }

    // The device: v2 active, v1 kept as superseded.
    await page.getByTestId('back-to-device').click();
    await page.getByTestId('fit-row-v2').waitFor();
    expect(await page.getByTestId('active-calibration-version').textContent()).toBe('Version 2');
    await page.waitForFunction(() => document.querySelector('[data-testid="fit-row-v1-status"]')?.textContent === 'Superseded');
    expect(await page.getByTestId('fit-row-v2-status').textContent()).toBe('Accepted');
    expect((await horizontalOverflow(page)).scrollWidth).toBeLessThanOrEqual(viewport.width);
    await shotOf(page, 'active-calibration-card', 'calibration-device');
    await shotOf(page, 'fit-timeline', 'calibration-device-timeline');

    // Wide screens: the fit page has the versions beside the detail.
    if (wide) {
      await page.getByTestId('fit-row-v1').click();
      await page.getByTestId('fits-list-pane').waitFor();
      await page.getByTestId('fit-status-superseded').waitFor();
      const list = (await page.getByTestId('fits-list-pane').boundingBox())!;
      const detail = (await page.getByTestId('fit-detail').boundingBox())!;
      expect(detail.x).toBeGreaterThanOrEqual(list.x + list.width - 1);
      await shot(page, 'calibration-fit-superseded');
    }
    expect(errors).toEqual([]);
    await context.close();
  });
});

test('a bad file is refused with its row and column beside the file, and nothing is stored', async () => {
  const { page, context } = await openPage(browser, PHONE);
  await signInThroughUi(page, server.url, DEMO.device_engineer.email, DEMO.device_engineer.password);
  const id = await deviceId(page, 'Q4-R1');
  const before = {
    fits: (await api<{ fits: unknown[] }>(page, `/api/devices/${id}/fits`)).fits.length,
    sweeps: (await api<{ sweeps: unknown[] }>(page, `/api/devices/${id}/sweeps`)).sweeps.length,
  };
  // 'n/a' in the frequency cell of the 13th line (header on line 2, data from line 3).
  const lines = tuningPointsCsv(TRUTH, { biasMin: -0.5, biasMax: 0.5, points: 41, seed: 3, noiseHz: NOISE_HZ }).split('\n');
  const cells = lines[12].split(',');
  cells[1] = 'n/a';
  lines[12] = cells.join(',');
  const bad = path.join(dir, 'bad-row.csv');
  writeFileSync(bad, lines.join('\n'));

  await page.goto(`${server.url}/devices/${id}`);
  await pickFiles(page, [bad]);
  await page.getByTestId('upload-submit').click();
  const issue = page.getByTestId('upload-file-bad-row.csv').getByTestId('upload-issue').first();
  await issue.waitFor();
  const text = (await issue.textContent()) ?? '';
  expect(text).toContain('row 13');
  expect(text).toContain('frequency');
  expect(text).toContain('n/a');
  expect(await page.getByTestId('upload-error').textContent()).toContain('Nothing was stored');
  await shot(page, 'calibration-bad-file');

  const after = {
    fits: (await api<{ fits: unknown[] }>(page, `/api/devices/${id}/fits`)).fits.length,
    sweeps: (await api<{ sweeps: unknown[] }>(page, `/api/devices/${id}/sweeps`)).sweeps.length,
  };
  expect(after).toEqual(before);
  await context.close();
});

test.each([PHONE, WIDE])('an experimentalist reads a proposed fit but gets no review buttons and no upload (%o)', async (viewport) => {
  // A proposed fit on Q7-R5, uploaded through the API as the engineer.
  const eng = await fetch(`${server.url}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: DEMO.device_engineer.email, password: DEMO.device_engineer.password }),
  }).then((r) => r.json() as Promise<{ token: string }>);
  const auth = { Authorization: `Bearer ${eng.token}` };
  const devices = (await fetch(`${server.url}/api/devices`, { headers: auth }).then((r) => r.json())) as { devices: { id: number; name: string }[] };
  const dev = devices.devices.find((d) => d.name === 'Q7-R5')!;
  const form = new FormData();
  form.append('files', new Blob([tuningPointsCsv(TRUTH, { biasMin: -0.5, biasMax: 0.5, points: 31, seed: 21, noiseHz: NOISE_HZ })]), 'exp-view.csv');
  const up = (await fetch(`${server.url}/api/devices/${dev.id}/sweeps`, { method: 'POST', headers: auth, body: form }).then((r) => r.json())) as {
    job: { id: number; fitId: number | null };
    fit?: { id: number };
  };
  let fitId = up.fit?.id ?? up.job.fitId;
  for (let i = 0; !fitId && i < 200; i++) {
    await new Promise((r) => setTimeout(r, 250));
    const j = (await fetch(`${server.url}/api/jobs/${up.job.id}`, { headers: auth }).then((r) => r.json())) as { job: { fitId: number | null; status: string } };
    if (j.job.status === 'failed') throw new Error('fit job failed');
    fitId = j.job.fitId;
  }

  const { page, context, errors } = await openPage(browser, viewport);
  await signInThroughUi(page, server.url, DEMO.experimentalist.email, DEMO.experimentalist.password);
  await page.goto(`${server.url}/fits/${fitId}`);
  await page.getByTestId('fit-status-proposed').waitFor();
  await page.getByTestId('review-not-allowed').waitFor();
  expect(await page.getByTestId('review-accept').count()).toBe(0);
  expect(await page.getByTestId('review-reject').count()).toBe(0);
  await page.getByTestId('param-table').waitFor();
  await page.goto(`${server.url}/devices/${dev.id}`);
  await page.getByTestId('fit-timeline').waitFor();
  expect(await page.getByTestId('upload-panel').count()).toBe(0);
  await shot(page, 'calibration-experimentalist');
  expect(errors).toEqual([]);
  await context.close();
});

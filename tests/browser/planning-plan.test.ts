// Issue 6, app part, through the real UI: the demo experimentalist opens a calibrated device, plans a
// drive live in the browser (bias slider → pump frequency, amplitude, power, threshold margin and
// uncertainty follow), saves it, and after a device engineer accepts a new calibration the saved plan
// says it is stale and re-plans on the new version.
//
// References outside the app: the inverse problem must hand back the requested pair rate (the core
// plans δΦ for it); the pump sits at 2(f_r + shift) when on resonance (degenerate parametric pumping);
// the chip power follows P = Z0·I²/8 for a peak current I at a shorted line end (standing wave with
// twice the incident current; Pozar, Microwave Engineering, 4th ed., §2.3 [from memory]) with
// I = δΦ × (dc flux period), and the attenuators add in dB. The UI's numbers must equal the API's
// preview for the same request (same core, same seed).
import { readFileSync } from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { bandDigits, hz, phi0, sci } from '@/client/planning/format';
import type { Plan, PreviewResponse } from '@/shared/api/planning';
import { signInAs } from '@/tests/support/api';
import { files, uploadAndFit } from '@/tests/support/calibration';
import type { TestServer } from '@/tests/support/testServer';
import { DEMO, openPage, PHONE, sessionToken, shot, signInThroughUi, WIDE, horizontalOverflow, demoSite } from './support';

jest.setTimeout(300_000);

let server: TestServer;
let browser: Browser;

demoSite((s, b) => {
  server = s;
  browser = b;
});

const SUPER: Record<string, string> = { '⁻': '-', '⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6', '⁷': '7', '⁸': '8', '⁹': '9' };

/** First number in a UI text, reading the "1.23 × 10⁵" notation. */
function readNumber(t: string | null): number {
  const s = (t ?? '').replace(/[⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+/g, (m) => m.split('').map((c) => SUPER[c]).join(''));
  const m = /(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)(?:\s*×\s*10(-?\d+))?/.exec(s);
  if (!m) throw new Error(`no number in ${JSON.stringify(t)}`);
  const v = Number(m[1]) * (m[2] ? 10 ** Number(m[2]) : 1);
  if (!Number.isFinite(v)) throw new Error(`not finite: ${t}`);
  return v;
}

async function text(page: Page, testID: string): Promise<string> {
  return (await page.getByTestId(testID).first().textContent()) ?? '';
}

async function api<T>(page: Page, p: string, init: { method?: string; body?: unknown } = {}): Promise<T> {
  const res = await fetch(`${server.url}${p}`, {
    method: init.method ?? 'GET',
    headers: { Authorization: `Bearer ${await sessionToken(page)}`, ...(init.body !== undefined ? { 'Content-Type': 'application/json' } : {}) },
    body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
  });
  if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${p}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

async function deviceIdOf(page: Page, name: string): Promise<number> {
  const { devices } = await api<{ devices: { id: number; name: string }[] }>(page, '/api/devices');
  const d = devices.find((x) => x.name === name);
  if (!d) throw new Error(`no demo device ${name}`);
  return d.id;
}

async function scrollTo(page: Page, testID: string): Promise<void> {
  await page.getByTestId(testID).first().evaluate((e) => e.scrollIntoView({ block: 'start' }));
}

/** The request the UI would send, from its JSON card. */
async function uiRequest(page: Page): Promise<Record<string, unknown>> {
  if ((await page.getByTestId('plan-request-json').count()) === 0) await page.getByTestId('plan-request-toggle').click();
  return JSON.parse(await text(page, 'plan-request-json')) as Record<string, unknown>;
}

/** The UI's figures equal the server preview's for the same request, formatted the same way. */
async function expectMatchesPreview(page: Page, deviceId: number): Promise<PreviewResponse> {
  const request = await uiRequest(page);
  const preview = await api<PreviewResponse>(page, '/api/plans/preview', { method: 'POST', body: { deviceId, request } });
  const r = preview.result;
  expect(await text(page, 'plan-pump-frequency')).toContain(hz(r.pump_frequency_hz, 7));
  expect(await text(page, 'plan-amplitude')).toBe(phi0(r.pump_amplitude_phi0));
  expect(await text(page, 'plan-pair-rate')).toContain(sci(r.predicted_pair_rate));
  expect(r.uncertainty).not.toBeNull();
  const u = r.uncertainty!;
  const d = bandDigits(u.pair_rate_p16, u.pair_rate_p50, u.pair_rate_p84);
  expect(await text(page, 'plan-pair-band')).toContain(`p16 ${sci(u.pair_rate_p16, d)}`);
  expect(await text(page, 'plan-pair-band')).toContain(`p84 ${sci(u.pair_rate_p84, d)}`);
  // The band is a real spread around the median (calibration covariance propagated).
  expect(u.pair_rate_p16).toBeLessThan(u.pair_rate_p50);
  expect(u.pair_rate_p84).toBeGreaterThan(u.pair_rate_p50);
  if (r.generator_power_dbm !== null) expect(await text(page, 'plan-generator-power')).toContain(`${r.generator_power_dbm.toFixed(1)} dBm`);
  return preview;
}

/** Presses at `from` of the slider's width and drags to `to`, in small steps like a finger. */
async function dragSlider(page: Page, from: number, to: number): Promise<void> {
  await page.getByTestId('plan-bias-card').evaluate((e) => e.scrollIntoView({ block: 'start' }));
  const box = await page.getByTestId('plan-bias-slider').boundingBox();
  if (!box) throw new Error('slider not laid out');
  const y = box.y + box.height / 2;
  await page.mouse.move(box.x + box.width * from, y);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * to, y, { steps: 25 });
  await page.mouse.up();
}

/** Records, in the page, the delay from each pointer move to the next change of the amplitude figure. */
async function watchLatency(page: Page): Promise<void> {
  await page.evaluate(() => {
    const w = window as unknown as { __lat: number[]; __draws: Set<string> };
    w.__lat = [];
    w.__draws = new Set();
    let lastMove = -1;
    document.addEventListener('pointermove', () => (lastMove = performance.now()), true);
    const amp = document.querySelector('[data-testid="plan-amplitude"]')!;
    new MutationObserver(() => {
      if (lastMove >= 0) w.__lat.push(performance.now() - lastMove);
      lastMove = -1;
    }).observe(amp, { characterData: true, childList: true, subtree: true });
    const ms = document.querySelector('[data-testid="plan-compute-ms"]')!;
    new MutationObserver(() => w.__draws.add(ms.textContent ?? '')).observe(ms, { characterData: true, childList: true, subtree: true });
  });
}

const measured: Record<string, unknown> = {};

describe.each([
  ['phone', PHONE, false, 'Q4-R3'],
  ['wide', WIDE, true, 'Q4-R1'],
] as const)('%s: experimentalist plans a drive', (label, viewport, wide, deviceName) => {
  test('live plan follows the slider, matches the server, saves, goes stale on a new calibration and re-plans', async () => {
    const { page, context, errors } = await openPage(browser, viewport);
    await signInThroughUi(page, server.url, DEMO.experimentalist.email, DEMO.experimentalist.password);
    const deviceId = await deviceIdOf(page, deviceName);

    // Entry point on the device screen.
    await page.getByTestId(`device-row-${deviceName}`).click();
    await page.getByTestId('device-plans-card').waitFor();
    await shot(page, `planning-device-entry-${label}`);
    await page.getByTestId('plan-a-drive').click();
    await page.waitForURL((u) => u.pathname === '/plans/new' && u.searchParams.get('device') === String(deviceId));
    await page.getByTestId('plan-results').waitFor();
    await page.getByTestId('plan-pair-band').waitFor();
    expect(await text(page, 'plan-title')).toContain(deviceName);

    // The inverse problem hands back the target; values finite; threshold margin below 1.
    const target = 1e5;
    expect(readNumber(await text(page, 'plan-pair-rate'))).toBeCloseTo(target, -2);
    const p0 = await expectMatchesPreview(page, deviceId);
    expect(Math.abs(p0.result.predicted_pair_rate / target - 1)).toBeLessThan(1e-6);
    expect(p0.result.threshold_ratio!).toBeGreaterThan(0);
    expect(p0.result.threshold_ratio!).toBeLessThan(1);
    // On resonance (no detuning asked): f_p = 2(f_r + pump shift).
    expect(Math.abs(p0.result.pump_frequency_hz / (2 * (p0.result.resonance_hz! + p0.result.pump_frequency_shift_hz!)) - 1)).toBeLessThan(1e-12);
    await page.getByTestId('plan-tuning-chart-canvas').locator('canvas').first().waitFor({ timeout: 60_000 });
    await scrollTo(page, 'plan-title');
    await shot(page, `planning-live-${label}`);

    // Drag the bias: the figures change within a frame; fewer draws while dragging, full draws after.
    await watchLatency(page);
    const before = { bias: await text(page, 'plan-bias'), amp: await text(page, 'plan-amplitude'), fp: await text(page, 'plan-pump-frequency') };
    await dragSlider(page, 0.62, 0.72);
    await page.waitForFunction(() => /1000 draws/.test(document.querySelector('[data-testid="plan-compute-ms"]')?.textContent ?? ''));
    const after = { bias: await text(page, 'plan-bias'), amp: await text(page, 'plan-amplitude'), fp: await text(page, 'plan-pump-frequency') };
    expect(after.bias).not.toBe(before.bias);
    expect(after.amp).not.toBe(before.amp);
    expect(after.fp).not.toBe(before.fp);
    await shot(page, `planning-after-drag-${label}`);
    const lat = await page.evaluate(() => (window as unknown as { __lat: number[] }).__lat);
    const drawsSeen = await page.evaluate(() => [...(window as unknown as { __draws: Set<string> }).__draws]);
    expect(lat.length).toBeGreaterThan(5);
    const sorted = [...lat].sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)];
    measured[label] = {
      inputToDomMedianMs: median,
      inputToDomMaxMs: sorted[sorted.length - 1],
      updates: lat.length,
      dragComputeMs: drawsSeen.filter((t) => /200 draws/.test(t)).map(readNumber),
      settled: await text(page, 'plan-compute-ms'),
    };
    // The planner itself runs well inside a 60 Hz frame on every move; input → DOM (React render
    // included) gets two frames, as this box is shared by other jobs (load average often > 2 per core).
    for (const ms of (measured[label] as { dragComputeMs: number[] }).dragComputeMs) expect(ms).toBeLessThan(16.7);
    expect(median).toBeLessThan(33.4);
    expect(drawsSeen.some((t) => /200 draws/.test(t))).toBe(true);
    const settledMs = readNumber(await text(page, 'plan-compute-ms'));
    expect(settledMs).toBeGreaterThan(0);
    expect(settledMs).toBeLessThan(100);
    await expectMatchesPreview(page, deviceId);

    // The step buttons move the bias too.
    const b1 = await text(page, 'plan-bias');
    await page.getByTestId('plan-bias-up').click();
    await page.waitForFunction((b) => document.querySelector('[data-testid="plan-bias"]')?.textContent !== b, b1);

    // A ranked operating point moves the slider there.
    await page.getByTestId('plan-ranked-1').waitFor({ timeout: 60_000 });
    const ranking = await api<{ ranking: { points: { bias: number; plan: { pump_amplitude_phi0: number } }[] } }>(
      page,
      `/api/devices/${deviceId}/operating-points?mode=cavity&target=${target}&top=5`,
    );
    await page.getByTestId('plan-ranked-1').click();
    await page.waitForFunction(() => /1000 draws/.test(document.querySelector('[data-testid="plan-compute-ms"]')?.textContent ?? ''));
    expect(readNumber(await text(page, 'plan-bias-out'))).toBeCloseTo(ranking.ranking.points[0].bias, 5);
    await expectMatchesPreview(page, deviceId);

    // The pump line: Q4-R3 has none (no generator power, and the way to set one); Q4-R1 has the
    // demo one, which is edited here. Either way through the form.
    if (deviceName === 'Q4-R3') {
      expect(await text(page, 'plan-generator-power')).toContain('set a pump line');
      await page.getByTestId('plan-power-howto').waitFor();
      await page.getByTestId('plan-set-pump-line').click();
    } else {
      expect(await text(page, 'plan-generator-power')).toMatch(/dBm/);
      await scrollTo(page, 'pump-line-card');
      await page.getByTestId('pump-line-edit').click();
    }
    await page.getByTestId('pump-line-form').waitFor();
    const periodMaPerPhi0 = 2.5;
    await page.getByTestId('pump-line-period').fill(String(periodMaPerPhi0));
    await page.getByTestId('pump-line-atten').fill('20, 10, 20');
    await page.getByTestId('pump-line-stages').fill('4 K, still, mixing chamber');
    await shot(page, `planning-pump-line-form-${label}`);
    await page.getByTestId('pump-line-save').click();
    await page.getByTestId('pump-line-summary').waitFor();
    await page.waitForFunction(() => /dBm/.test(document.querySelector('[data-testid="plan-generator-power"]')?.textContent ?? ''));
    await page.waitForFunction(() => /2\.5 mA/.test(document.querySelector('[data-testid="pump-line-summary"]')?.textContent ?? ''));
    const p1 = await expectMatchesPreview(page, deviceId);
    // P_chip = Z0·I²/8 with I = δΦ·period; generator = chip + 50 dB of attenuators.
    const iPeak = p1.result.pump_amplitude_phi0 * periodMaPerPhi0 * 1e-3;
    const pChipDbm = 10 * Math.log10(((50 * iPeak * iPeak) / 8) / 1e-3);
    expect(p1.result.power_at_chip_dbm!).toBeCloseTo(pChipDbm, 6);
    expect(p1.result.generator_power_dbm!).toBeCloseTo(pChipDbm + 50, 6);
    expect(await text(page, 'plan-caution')).toMatch(/defer to the lab’s own rules for cryostat heat load and RF safety/i);
    await scrollTo(page, 'plan-results');
    await shot(page, `planning-results-${label}`);
    await scrollTo(page, 'plan-spectrum-chart');
    await page.getByTestId('plan-spectrum-chart-canvas').locator('canvas').first().waitFor({ timeout: 60_000 });
    await shot(page, `planning-spectrum-${label}`);
    await scrollTo(page, 'plan-ranked');
    await shot(page, `planning-ranked-${label}`);

    // Save: the server recomputes and stores the same figures.
    await page.getByTestId('plan-note').fill(`Drive for the ${label} run.`);
    await page.getByTestId('plan-save').click();
    await page.getByTestId('plan-saved').waitFor();
    await page.getByTestId('plan-server-agrees').waitFor();
    await scrollTo(page, 'plan-save-card');
    await shot(page, `planning-saved-${label}`);
    const href = await page.getByTestId('plan-open-saved').getAttribute('href');
    const planId = Number(/\/plans\/(\d+)/.exec(href ?? '')![1]);
    const stored = await api<{ plan: Plan }>(page, `/api/plans/${planId}`);
    expect(stored.plan.filledFromPumpLine).toEqual(expect.arrayContaining(['pumpPeriod', 'attenuationDb']));
    expect(stored.plan.result.generator_power_dbm).toBeCloseTo(p1.result.generator_power_dbm!, 9);

    // The plan sheet; note by the author; export JSON.
    await page.getByTestId('plan-open-saved').click();
    await page.waitForURL((u) => u.pathname === `/plans/${planId}`);
    await page.getByTestId('plan-sheet').waitFor();
    await page.getByTestId('plan-current-badge').waitFor();
    expect(await text(page, 'plan-amplitude')).toBe(phi0(stored.plan.result.pump_amplitude_phi0));
    expect(await text(page, `plan-note-${stored.plan.notes[0].id}`)).toContain(`Drive for the ${label} run.`);
    await page.getByTestId('plan-note-text').fill('Ran it: rate within the band.');
    await page.getByTestId('plan-note-add').click();
    await page.getByText('Ran it: rate within the band.').waitFor();
    const download = page.waitForEvent('download');
    await page.getByTestId('plan-export').click();
    const file = await (await download).path();
    const exported = JSON.parse(readFileSync(file!, 'utf8')) as { id?: number; plan?: { id: number } };
    expect(exported.id ?? exported.plan?.id).toBe(planId);
    await shot(page, `planning-sheet-${label}`);
    await page.emulateMedia({ media: 'print' });
    expect(await page.getByTestId(wide ? 'nav-rail' : 'tab-bar').isVisible()).toBe(false);
    expect(await page.getByTestId('plan-export').isVisible()).toBe(false);
    await shot(page, `planning-sheet-print-${label}`);
    await page.emulateMedia({ media: 'screen' });
    if (!wide) {
      const o = await horizontalOverflow(page);
      expect(o.scrollWidth).toBeLessThanOrEqual(o.innerWidth);
    }

    // A device engineer uploads a new sweep and accepts it (through the API).
    const engineer = await signInAs(server.app, 'device_engineer');
    const { fit } = await uploadAndFit(server.app, engineer, deviceId, files.tuning(label === 'phone' ? 31 : 32));
    const rev = await fetch(`${server.url}/api/fits/${fit.id}/review`, {
      method: 'POST',
      headers: { Authorization: `Bearer ${engineer}`, 'Content-Type': 'application/json' },
      body: JSON.stringify({ decision: 'accept', comment: 'New cooldown, re-measured.' }),
    });
    expect(rev.status).toBe(200);

    // The saved plan now says it was made on the older version and offers a re-plan.
    await page.reload();
    await page.getByTestId('plan-stale').waitFor();
    expect(await text(page, 'plan-stale')).toContain(`calibration v${stored.plan.fitVersion}`);
    expect(await text(page, 'plan-stale')).toContain(`now has v${fit.version}`);
    await scrollTo(page, 'plan-sheet-title');
    await shot(page, `planning-stale-${label}`);
    if (!wide) {
      await page.getByTestId('back-to-plans').click();
      await page.getByTestId(`plan-row-${planId}-stale`).waitFor();
      await shot(page, `planning-list-${label}`);
      await page.getByTestId(`plan-row-${planId}`).click();
      await page.getByTestId('plan-stale').waitFor();
    } else {
      await page.getByTestId(`plan-row-${planId}-stale`).waitFor();
    }
    await page.getByTestId('plan-replan').click();
    await page.waitForURL((u) => /^\/plans\/\d+$/.test(u.pathname) && u.pathname !== `/plans/${planId}`);
    await page.getByTestId('plan-current-badge').waitFor();
    const newId = Number(new URL(page.url()).pathname.split('/').pop());
    const replanned = await api<{ plan: Plan }>(page, `/api/plans/${newId}`);
    expect(replanned.plan.replannedFromId).toBe(planId);
    expect(replanned.plan.fitId).toBe(fit.id);
    expect(replanned.plan.request.bias).toBe(stored.plan.request.bias);
    await page.getByTestId('plan-replanned-from').waitFor();
    // The re-plan is the core's answer for the same inputs on the new calibration.
    const again = await api<PreviewResponse>(page, '/api/plans/preview', { method: 'POST', body: { deviceId, request: { ...stored.plan.request } } });
    expect(again.fit.id).toBe(fit.id);
    expect(replanned.plan.result.pump_amplitude_phi0).toBeCloseTo(again.result.pump_amplitude_phi0, 12);
    expect(await text(page, 'plan-amplitude')).toBe(phi0(replanned.plan.result.pump_amplitude_phi0));
    await shot(page, `planning-replanned-${label}`);

    expect(errors).toEqual([]);
    await context.close();
  });
});

test('a device engineer sees no save button; a device without a calibration gets a clear empty state', async () => {
  const { page, context } = await openPage(browser, PHONE);
  await signInThroughUi(page, server.url, DEMO.device_engineer.email, DEMO.device_engineer.password);
  const r2 = await deviceIdOf(page, 'Q4-R2');
  await page.goto(`${server.url}/plans/new?device=${r2}`);
  await page.getByTestId('plan-results').waitFor();
  await page.getByTestId('plan-save-not-allowed').waitFor();
  expect(await page.getByTestId('plan-save').count()).toBe(0);
  // Q4-R2 has no Q in its calibration (tuning points only): planner defaults, warned.
  await page.getByTestId('plan-warning-default_quality_factors').waitFor();
  const r5 = await deviceIdOf(page, 'Q7-R5'); // fit proposed, none accepted
  await page.goto(`${server.url}/plans/new?device=${r5}`);
  await page.getByText('No accepted calibration', { exact: true }).waitFor();
  await shot(page, 'planning-no-calibration');
  // Phase-only line device: line mode only, with a pump frequency.
  const l1 = await deviceIdOf(page, 'Q7-L1');
  await page.goto(`${server.url}/plans/new?device=${l1}`);
  await page.getByTestId('plan-results').waitFor();
  expect(await page.getByTestId('plan-mode-cavity').count()).toBe(0);
  expect(await page.getByTestId('plan-mode-line').getAttribute('aria-checked')).toBe('true');
  await page.getByTestId('plan-spectrum-chart-canvas').locator('canvas').first().waitFor({ timeout: 60_000 });
  await scrollTo(page, 'plan-results');
  await shot(page, 'planning-line-mode');
  await context.close();
});

afterAll(() => {
  // The live-update timing, for the report.
  // eslint-disable-next-line no-console
  console.log(`planning timing: ${JSON.stringify(measured)}`);
});

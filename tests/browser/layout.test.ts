// Phone-first layout: bottom tab bar under 768 px, left rail and two panes at and above it.
// Screenshots of every main screen at 390×844 and 1440×900 go to test-artifacts/screenshots/.
import type { Browser, Page } from 'playwright-core';
import type { TestServer } from '@/tests/support/testServer';
import { DEMO, horizontalOverflow, openPage, PHONE, shot, signInThroughUi, WIDE, demoSite } from './support';

// The browser project's testTimeout in jest.config.js is not applied per project, so set it here.
jest.setTimeout(240_000);

let server: TestServer;
let browser: Browser;

demoSite((s, b) => {
  server = s;
  browser = b;
});

async function expectShell(page: Page, wide: boolean, where: string): Promise<void> {
  const vp = page.viewportSize()!;
  if (wide) {
    await page.getByTestId('nav-rail').waitFor();
    expect(await page.getByTestId('tab-bar').count()).toBe(0);
    const rail = (await page.getByTestId('nav-rail').boundingBox())!;
    expect(rail.x).toBe(0);
    expect(rail.height).toBeGreaterThanOrEqual(vp.height - 1);
  } else {
    await page.getByTestId('tab-bar').waitFor();
    expect(await page.getByTestId('nav-rail').count()).toBe(0);
    // The tab bar sits on the bottom edge and spans the width.
    const bar = (await page.getByTestId('tab-bar').boundingBox())!;
    expect(Math.abs(bar.y + bar.height - vp.height)).toBeLessThanOrEqual(1);
    expect(Math.abs(bar.width - vp.width)).toBeLessThanOrEqual(1);
  }
  const o = await horizontalOverflow(page);
  if (o.scrollWidth > o.innerWidth) throw new Error(`${where} at ${vp.width}px: page is ${o.scrollWidth}px wide (horizontal overflow)`);
}

describe.each([
  ['phone', PHONE, false],
  ['wide', WIDE, true],
] as const)('%s layout', (label, viewport, wide) => {
  test('main screens render inside the right shell without horizontal overflow', async () => {
    const { page, context, errors, requests } = await openPage(browser, viewport);

    await page.goto(`${server.url}/sign-in`);
    await page.getByTestId('sign-in-screen').waitFor();
    expect((await horizontalOverflow(page)).scrollWidth).toBeLessThanOrEqual(viewport.width);
    await shot(page, 'sign-in');

    await signInThroughUi(page, server.url, DEMO.lab_lead.email, DEMO.lab_lead.password);
    await page.getByTestId('device-row-Q4-R1').waitFor();
    await expectShell(page, wide, 'Devices');
    await shot(page, 'devices');

    await page.getByTestId('device-row-Q4-R1').click();
    await page.getByTestId('device-detail').waitFor();
    expect(await page.getByTestId('device-name').textContent()).toBe('Q4-R1');
    if (wide) {
      // Two panes: the list stays visible beside the detail, the selected row is marked.
      expect(await page.getByTestId('devices-list-pane').isVisible()).toBe(true);
      expect(await page.getByTestId('device-row-Q4-R1').getAttribute('aria-current')).toBe('page');
      const list = (await page.getByTestId('devices-list-pane').boundingBox())!;
      const detail = (await page.getByTestId('device-detail').boundingBox())!;
      expect(detail.x).toBeGreaterThanOrEqual(list.x + list.width);
    } else {
      expect(await page.getByTestId('device-list').count()).toBe(0);
      await page.getByTestId('back-to-devices').waitFor();
    }
    await expectShell(page, wide, 'Device detail');
    await shot(page, 'device-detail');

    // Search narrows the list (server-side ?search=).
    if (!wide) await page.getByTestId('nav-devices').click();
    await page.getByTestId('device-search').fill('Q7');
    await page.getByTestId('device-row-Q7-L1').waitFor();
    await page.waitForFunction(() => document.querySelectorAll('[data-testid^="device-row-Q4"]').length === 0);
    await page.getByTestId('device-search').fill('');
    await page.getByTestId('device-row-Q4-R1').waitFor();

    for (const [nav, screen] of [
      ['plans', 'plans-screen'],
      ['batches', 'batches-screen'],
      ['account', 'account-screen'],
    ] as const) {
      await page.getByTestId(`nav-${nav}`).click();
      await page.getByTestId(screen).waitFor();
      expect(await page.getByTestId(`nav-${nav}`).getAttribute('aria-current')).toBe('page');
      if (nav === 'plans') await page.getByTestId('plans-tally').waitFor();
      if (nav === 'batches') await page.getByTestId('batch-row-NB-2611').waitFor();
      if (nav === 'account') await page.getByTestId('tokens-card').waitFor();
      await expectShell(page, wide, nav);
      await shot(page, nav);
    }

    for (const sub of ['people', 'invitations', 'outbox'] as const) {
      await page.getByTestId(`account-nav-${sub}`).click();
      await page.getByTestId(`${sub}-screen`).waitFor();
      await page.waitForSelector('[data-testid="loading-state"]', { state: 'detached' });
      await expectShell(page, wide, `account/${sub}`);
      await shot(page, `account-${sub}`);
    }

    // Everything (bundle, fonts, API) came from the app's own origin: no network fonts or CDNs.
    const foreign = requests.filter((u) => !u.startsWith(server.url) && !u.startsWith('data:') && !u.startsWith('blob:'));
    expect(foreign).toEqual([]);
    expect(requests.some((u) => /IBMPlexSans_400Regular.*\.ttf/.test(u))).toBe(true);
    expect(requests.some((u) => /IBMPlexMono_400Regular.*\.ttf/.test(u))).toBe(true);
    expect(errors).toEqual([]);
    await context.close();
  });
});

test('Batches links to Devices filtered by that batch', async () => {
  const { page, context } = await openPage(browser, WIDE);
  await signInThroughUi(page, server.url, DEMO.experimentalist.email, DEMO.experimentalist.password);
  await page.getByTestId('nav-batches').click();
  await page.getByTestId('batch-devices-NB-2614').click();
  await page.waitForURL((u) => u.pathname === '/devices' && u.searchParams.get('batch') === 'NB-2614');
  await page.getByTestId('device-row-Q7-L1').waitFor();
  expect(await page.getByTestId('batch-filter-NB-2614').getAttribute('aria-checked')).toBe('true');
  await page.waitForFunction(() => document.querySelectorAll('[data-testid^="device-row-Q4"]').length === 0);
  // The count shown matches the batch's device count in the API.
  const res = await fetch(`${server.url}/api/devices?batch=NB-2614`, {
    headers: { Authorization: `Bearer ${JSON.parse((await page.evaluate(() => localStorage.getItem('fluxwright.session.v1')))!).token}` },
  });
  const n = ((await res.json()) as { devices: unknown[] }).devices.length;
  expect(await page.getByTestId('device-count').textContent()).toBe(`${n} ${n === 1 ? 'device' : 'devices'}`);
  await context.close();
});

// Sign-in, role-aware shell, sign-out and the invitation round trip, through the real UI.
import type { Browser } from 'playwright-core';
import type { TestServer } from '@/tests/support/testServer';
import { DEMO, type DemoRole, linkIn, openPage, PHONE, SESSION_KEY, sessionToken, signInThroughUi, WIDE, demoSite } from './support';

// The browser project's testTimeout in jest.config.js is not applied per project, so set it here.
jest.setTimeout(240_000);

let server: TestServer;
let browser: Browser;

demoSite((s, b) => {
  server = s;
  browser = b;
});

test('a signed-out visit to /devices lands on sign-in, and after signing in returns to the page asked for', async () => {
  const { page, context, errors } = await openPage(browser, PHONE);
  await page.goto(`${server.url}/devices/1`);
  await page.waitForURL((u) => u.pathname === '/sign-in');
  expect(new URL(page.url()).searchParams.get('next')).toBe('/devices/1');
  await page.getByTestId('sign-in-screen').waitFor();

  await page.goto(`${server.url}/devices`);
  await page.waitForURL((u) => u.pathname === '/sign-in');
  await page.getByTestId('sign-in-email').fill(DEMO.device_engineer.email);
  await page.getByTestId('sign-in-password').fill(DEMO.device_engineer.password);
  await page.getByTestId('sign-in-submit').click();
  await page.waitForURL((u) => u.pathname === '/devices');
  await page.getByTestId('device-list').waitFor();
  expect(errors).toEqual([]);
  await context.close();
});

test('a wrong password keeps the person on sign-in with the server message', async () => {
  const { page, context } = await openPage(browser, PHONE);
  await page.goto(`${server.url}/sign-in`);
  await page.getByTestId('sign-in-email').fill(DEMO.lab_lead.email);
  await page.getByTestId('sign-in-password').fill('not-the-password');
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('sign-in-error').waitFor();
  expect(new URL(page.url()).pathname).toBe('/sign-in');
  expect(await page.evaluate((k) => localStorage.getItem(k), SESSION_KEY)).toBeNull();
  await context.close();
});

describe.each<[DemoRole, { lead: boolean; editor: boolean }]>([
  ['lab_lead', { lead: true, editor: true }],
  ['device_engineer', { lead: false, editor: true }],
  ['experimentalist', { lead: false, editor: false }],
])('signed in as %s', (role, may) => {
  test.each([PHONE, WIDE])('shows its own shell at %o', async (viewport) => {
    const account = DEMO[role];
    const { page, context, errors } = await openPage(browser, viewport);
    await signInThroughUi(page, server.url, account.email, account.password);
    expect((await page.getByTestId('shell-role').textContent())?.trim()).toBe(account.label);

    // Inventory editing: lab lead and device engineer only (API: POST /api/devices).
    await page.getByTestId('device-list').waitFor();
    expect(await page.getByTestId('new-device').count()).toBe(may.editor ? 1 : 0);

    await page.getByTestId('nav-account').click();
    await page.getByTestId('account-screen').waitFor();
    expect(await page.getByTestId('profile-email').textContent()).toContain(account.email);
    expect(await page.getByTestId('profile-name').textContent()).toContain(account.name);
    // Lab-lead sections exist only for the lead.
    expect(await page.getByTestId('account-nav-people').count()).toBe(may.lead ? 1 : 0);
    expect(await page.getByTestId('account-nav-invitations').count()).toBe(may.lead ? 1 : 0);
    expect(await page.getByTestId('account-nav-outbox').count()).toBe(may.lead ? 1 : 0);

    // Typing the address of a lead page directly does not show it to others.
    await page.goto(`${server.url}/account/invitations`);
    if (may.lead) {
      await page.getByTestId('invite-form').waitFor();
      expect(await page.getByTestId('invite-submit').count()).toBe(1);
    } else {
      await page.waitForURL((u) => u.pathname === '/account');
      await page.getByTestId('account-screen').waitFor();
      expect(await page.getByTestId('invite-submit').count()).toBe(0);
    }
    expect(errors).toEqual([]);
    await context.close();
  });
});

test('the experimentalist has no invite button, and the API refuses their invitation with 403', async () => {
  const { page, context } = await openPage(browser, WIDE);
  await signInThroughUi(page, server.url, DEMO.experimentalist.email, DEMO.experimentalist.password);
  const token = await sessionToken(page);

  // The same token is accepted for the experimentalist's own profile...
  const me = await fetch(`${server.url}/api/auth/me`, { headers: { Authorization: `Bearer ${token}` } });
  expect(me.status).toBe(200);
  expect(((await me.json()) as { user: { role: string } }).user.role).toBe('experimentalist');
  // ...so the refusal below is about the role, not the token.
  const res = await fetch(`${server.url}/api/invitations`, {
    method: 'POST',
    headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: 'someone@demo.fluxwright.test', name: 'Some One', role: 'experimentalist' }),
  });
  expect(res.status).toBe(403);
  expect(((await res.json()) as { error: { code: string } }).error.code).toBe('FORBIDDEN');

  await page.getByTestId('nav-account').click();
  await page.getByTestId('account-screen').waitFor();
  expect(await page.getByRole('button', { name: 'Send invitation' }).count()).toBe(0);
  await context.close();
});

test('sign-out drops the session and guards the app again', async () => {
  const { page, context } = await openPage(browser, PHONE);
  await signInThroughUi(page, server.url, DEMO.device_engineer.email, DEMO.device_engineer.password);
  await page.getByTestId('nav-account').click();
  await page.getByTestId('sign-out').click();
  await page.waitForURL((u) => u.pathname === '/sign-in');
  expect(await page.evaluate((k) => localStorage.getItem(k), SESSION_KEY)).toBeNull();
  await page.goto(`${server.url}/batches`);
  await page.waitForURL((u) => u.pathname === '/sign-in');
  await context.close();
});

test('the lab lead invites a new person; the e-mail link lets them set a password and sign in', async () => {
  const invitee = { email: `new.engineer.${Date.now()}@demo.fluxwright.test`, name: 'Ilse Marrow', password: 'flux-quantum-2026' };

  const lead = await openPage(browser, WIDE);
  await signInThroughUi(lead.page, server.url, DEMO.lab_lead.email, DEMO.lab_lead.password);
  await lead.page.getByTestId('nav-account').click();
  await lead.page.getByTestId('account-nav-invitations').click();
  await lead.page.getByTestId('invite-form').waitFor();
  await lead.page.getByTestId('invite-email').fill(invitee.email);
  await lead.page.getByTestId('invite-name').fill(invitee.name);
  await lead.page.getByTestId('invite-role-device_engineer').click();
  await lead.page.getByTestId('invite-submit').click();
  await lead.page.getByTestId('invite-sent').waitFor();
  await lead.page.getByTestId(`invitation-${invitee.email}`).waitFor();

  // The invitation went out through SMTP to the fake mail server.
  const mail = await server.mailbox.waitFor((m) => m.to.includes(invitee.email), 10_000);
  const link = linkIn(mail.text, '/accept-invitation');
  expect(link.startsWith(server.url)).toBe(true);
  expect(new URL(link).searchParams.get('token')).toBeTruthy();

  // The demo outbox shows the same message with its link.
  await lead.page.getByTestId('account-nav-outbox').click();
  await lead.page.getByTestId('outbox-list').waitFor();
  expect(await lead.page.getByText(link, { exact: true }).count()).toBeGreaterThanOrEqual(1);
  await lead.context.close();

  // The invitee opens the link in their own browser.
  const guest = await openPage(browser, PHONE);
  await guest.page.goto(link);
  await guest.page.getByTestId('invitation-email').waitFor();
  expect(await guest.page.getByTestId('invitation-email').textContent()).toContain(invitee.email);
  expect(await guest.page.getByTestId('invitation-role').textContent()).toContain('Device engineer');
  expect(await guest.page.getByTestId('accept-name').inputValue()).toBe(invitee.name);
  // Mismatched repeat is caught before anything is sent.
  await guest.page.getByTestId('accept-password').fill(invitee.password);
  await guest.page.getByTestId('accept-confirm').fill(invitee.password + 'x');
  await guest.page.getByTestId('accept-submit').click();
  await guest.page.getByText('The two passwords differ.').waitFor();
  await guest.page.getByTestId('accept-confirm').fill(invitee.password);
  await guest.page.getByTestId('accept-submit').click();
  await guest.page.waitForURL((u) => u.pathname === '/devices');
  expect((await guest.page.getByTestId('shell-role').textContent())?.trim()).toBe('Device engineer');

  // Signing out and in again with the new password.
  await guest.page.getByTestId('nav-account').click();
  await guest.page.getByTestId('sign-out').click();
  await guest.page.waitForURL((u) => u.pathname === '/sign-in');
  await signInThroughUi(guest.page, server.url, invitee.email, invitee.password);
  await guest.page.getByTestId('nav-account').click();
  expect(await guest.page.getByTestId('profile-name').textContent()).toContain(invitee.name);

  // The link works once.
  await guest.page.goto(link);
  await guest.page.getByTestId('invitation-invalid').waitFor();
  expect(guest.errors.filter((e) => !e.includes('404'))).toEqual([]);
  await guest.context.close();
});

test('a device engineer registers a device and a cooldown; invalid numbers are refused before sending', async () => {
  const { page, context, errors } = await openPage(browser, WIDE);
  await signInThroughUi(page, server.url, DEMO.device_engineer.email, DEMO.device_engineer.password);
  await page.getByTestId('new-device').click();
  await page.getByTestId('new-device-name').fill('Q9-R2');
  await page.getByTestId('new-device-batch').getByRole('radio', { name: 'NB-2614' }).click();
  await page.getByLabel('Design frequency (GHz)').fill('six');
  await page.getByTestId('new-device-submit').click();
  await page.getByText('Design frequency: "six" is not a number.').waitFor();
  await page.getByLabel('Design frequency (GHz)').fill('6.431');
  await page.getByLabel('SQUID loop inductance (pH)').fill('38');
  await page.getByTestId('new-device-submit').click();
  await page.waitForURL((u) => /^\/devices\/\d+$/.test(u.pathname));
  await page.getByTestId('device-detail').waitFor();
  expect(await page.getByTestId('device-name').textContent()).toBe('Q9-R2');
  // GHz and pH typed in the form arrive in SI units and come back formatted.
  expect(await page.getByTestId('design-frequency').textContent()).toContain('6.431 GHz');
  await page.getByTestId('device-row-Q9-R2').waitFor(); // the list pane was refreshed

  await page.getByTestId('add-cooldown').click();
  await page.getByTestId('cooldown-fridge').fill('Dilution fridge Brisk');
  await page.getByTestId('cooldown-submit').click();
  await page.getByText('Dilution fridge Brisk').waitFor();
  expect(await page.getByText('Cooldowns (1)', { exact: false }).count()).toBe(1);
  expect(errors).toEqual([]);
  await context.close();
});

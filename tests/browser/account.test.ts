// API tokens (create → shown once → works → revoke) and password reset, through the real UI.
import type { Browser } from 'playwright-core';
import type { TestServer } from '@/tests/support/testServer';
import { DEMO, linkIn, openPage, PHONE, signInThroughUi, WIDE, demoSite } from './support';

// The browser project's testTimeout in jest.config.js is not applied per project, so set it here.
jest.setTimeout(240_000);

let server: TestServer;
let browser: Browser;

demoSite((s, b) => {
  server = s;
  browser = b;
});

test('an API token is shown once, authenticates API calls, and stops working once revoked', async () => {
  const { page, context } = await openPage(browser, PHONE);
  await signInThroughUi(page, server.url, DEMO.device_engineer.email, DEMO.device_engineer.password);
  await page.getByTestId('nav-account').click();
  await page.getByTestId('tokens-card').waitFor();
  await page.getByTestId('token-name').fill('fridge-3 logger');
  await page.getByTestId('create-token').click();
  const secret = (await page.getByTestId('new-token-value').textContent())!.trim();
  expect(secret.startsWith('fwt_')).toBe(true); // contract: API tokens start with fwt_
  await page.getByTestId('token-row-fridge-3 logger').waitFor();

  const me = await fetch(`${server.url}/api/auth/me`, { headers: { Authorization: `Bearer ${secret}` } });
  expect(me.status).toBe(200);
  expect(((await me.json()) as { user: { email: string } }).user.email).toBe(DEMO.device_engineer.email);

  // Dismissed, the secret is gone from the page for good.
  await page.getByTestId('dismiss-token').click();
  expect(await page.getByText(secret).count()).toBe(0);

  await page.getByTestId('revoke-token-fridge-3 logger').click();
  await page.getByTestId('token-row-fridge-3 logger').getByText('Revoked', { exact: true }).waitFor();
  const after = await fetch(`${server.url}/api/auth/me`, { headers: { Authorization: `Bearer ${secret}` } });
  expect(after.status).toBe(401);
  await context.close();
});

test('a password reset link from the e-mail sets a new password that signs in', async () => {
  const { page, context } = await openPage(browser, WIDE);
  await page.goto(`${server.url}/sign-in`);
  await page.getByTestId('forgot-password').click();
  await page.getByTestId('reset-email').fill(DEMO.experimentalist.email);
  await page.getByTestId('reset-submit').click();
  await page.getByTestId('reset-requested').waitFor();

  const mail = await server.mailbox.waitFor((m) => m.to.includes(DEMO.experimentalist.email), 10_000);
  const link = linkIn(mail.text, '/reset-password');
  await page.goto(link);
  await page.getByTestId('reset-confirm-screen').waitFor();
  const fresh = 'squid-loop-period-42';
  await page.getByTestId('reset-password').fill(fresh);
  await page.getByTestId('reset-confirm').fill(fresh);
  await page.getByTestId('reset-confirm-submit').click();
  await page.waitForURL((u) => u.pathname === '/sign-in' && u.searchParams.get('reset') === 'done');

  // The old password no longer works; the new one does.
  await page.getByTestId('sign-in-email').fill(DEMO.experimentalist.email);
  await page.getByTestId('sign-in-password').fill(DEMO.experimentalist.password);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('sign-in-error').waitFor();
  await signInThroughUi(page, server.url, DEMO.experimentalist.email, fresh);
  expect((await page.getByTestId('shell-role').textContent())?.trim()).toBe('Experimentalist');
  await context.close();
});

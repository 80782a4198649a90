/**
 * Signing in and out on the built app at a tablet viewport: a page asked for without a session goes to
 * /login; a wrong password is answered on the page; the header names who is signed in and the role;
 * signing out ends the session; a viewer sees a rig log without the buttons that log trials.
 * Screenshots: test-results/auth-*.png.
 */
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, signIn, startApp, tabletPage, type RunningApp } from './harness';

describe('signing in, out, and what a viewer sees', () => {
  let app: RunningApp;
  let browser: Browser;
  let rigPath = '';

  beforeAll(async () => {
    app = await startApp({ seed: true });
    browser = await launchBrowser();
    const list = (await (await app.fetch(`${app.baseUrl}/api/v1/campaigns`)).json()) as { campaigns: { id: string }[] };
    const id = list.campaigns[0]!.id;
    const campaign = (await (await app.fetch(`${app.baseUrl}/api/v1/campaigns/${id}`)).json()) as { rigs: { id: string }[] };
    rigPath = `/campaigns/${id}/rigs/${campaign.rigs[0]!.id}`;
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('sends a visitor without a session to /login and back to the page after signing in', async () => {
    const page = await tabletPage(browser, {}, null);
    await page.goto(`${app.baseUrl}${rigPath}`);
    expect(new URL(page.url()).pathname).toBe('/login');
    expect(new URL(page.url()).searchParams.get('next')).toBe(rigPath);
    const api = await page.evaluate(async () => (await fetch('/api/v1/campaigns')).status);
    expect(api).toBe(401);

    await page.getByLabel('E-mail').fill(app.admin.email);
    await page.getByLabel('Password').fill('not the right password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect.poll(() => page.getByTestId('login-error').innerText()).toMatch(/e-mail or the password is wrong/);
    const box = await page.getByRole('button', { name: 'Sign in' }).boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);
    await screenshot(page, 'auth-wrong-password');

    await page.getByLabel('Password').fill(app.admin.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => u.pathname === rigPath);
    await expect.poll(() => page.getByTestId('auth-bar').innerText()).toMatch(/admin/);
    expect(await page.getByRole('button', { name: /^Start run \d+/ }).count()).toBeGreaterThan(0);
    await page.context().close();
  });

  it('signs out: the session ends and pages go to /login again', async () => {
    const page = await tabletPage(browser);
    await page.goto(`${app.baseUrl}/`);
    await page.getByTestId('sign-out').click();
    await page.waitForURL((u) => u.pathname === '/login');
    await page.goto(`${app.baseUrl}/`);
    expect(new URL(page.url()).pathname).toBe('/login');
    expect(await page.evaluate(async () => (await fetch('/api/v1/campaigns')).status)).toBe(401);
    await page.context().close();
  });

  it('shows a viewer the rig log without the buttons that log trials', async () => {
    const viewer = app.addUser('viewer');
    const page = await tabletPage(browser, {}, null);
    await signIn(page, app.baseUrl, viewer);
    await page.goto(`${app.baseUrl}${rigPath}`);
    await expect.poll(() => page.getByTestId('auth-role').innerText()).toBe('viewer');
    await page.getByTestId('read-only').waitFor();
    expect(await page.getByRole('button', { name: /^Start run \d+/ }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /Correct a value/ }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'New campaign' }).count()).toBe(0);
    await screenshot(page, 'auth-viewer-rig');
    // the server refuses it anyway
    const status = await page.evaluate(async (path) => {
      const csrf = /saltus_csrf=([^;]*)/.exec(document.cookie)?.[1] ?? '';
      const id = path.split('/')[2];
      const res = await fetch(`/api/v1/campaigns/${id}/trials/log`, { method: 'POST', headers: { 'content-type': 'application/json', 'x-csrf-token': csrf, 'Idempotency-Key': 'viewer-try-0001' }, body: '{}' });
      return res.status;
    }, rigPath);
    expect(status).toBe(403);
    await page.context().close();
  });
});

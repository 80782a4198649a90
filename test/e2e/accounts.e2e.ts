/**
 * The accounts page on the built app at a tablet viewport: an admin finds it in the header, adds a
 * person (a weak password answered beside the field) and disables them after a confirm step, creates an
 * API token and sees its secret once, then revokes it (the token stops working); a planner has no link and sees the administrators-only
 * message with no data. Screenshots: test-results/accounts-*.png.
 */
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, signIn, startApp, tabletPage, type RunningApp } from './harness';

describe('the accounts page', () => {
  let app: RunningApp;
  let browser: Browser;

  beforeAll(async () => {
    app = await startApp({ seed: false });
    browser = await launchBrowser();
  });

  afterAll(async () => {
    await browser?.close();
    await app?.stop();
  });

  it('lets an admin add and disable a person, create a token shown once, and revoke it', async () => {
    const page = await tabletPage(browser);
    await page.goto(`${app.baseUrl}/`);
    await page.getByRole('link', { name: 'Accounts' }).click();
    await page.waitForURL((u) => u.pathname === '/accounts');
    await expect.poll(() => page.getByTestId('people-table').innerText()).toContain(app.admin.email);

    // add a person: a weak password is answered beside the password field, then accepted
    const form = page.getByTestId('add-person');
    await form.getByLabel('E-mail').fill('ada@lab.example');
    await form.getByLabel('Name').fill('Ada Example');
    await form.getByLabel('Role').selectOption('operator');
    await form.getByLabel(/^Password/).fill('too short');
    await form.getByRole('button', { name: 'Add the person' }).click();
    await expect.poll(() => form.getByTestId('error').innerText()).toMatch(/password: .*12 characters/);
    expect(await form.getByLabel(/^Password/).getAttribute('aria-invalid')).toBe('true');
    await form.getByLabel(/^Password/).fill('four unrelated words here');
    await form.getByRole('button', { name: 'Add the person' }).click();
    await expect.poll(() => page.getByTestId('people-table').innerText()).toContain('ada@lab.example');
    expect(await form.getByTestId('error').count()).toBe(0);
    const row = page.getByTestId('person-row').filter({ hasText: 'ada@lab.example' });
    expect(await row.innerText()).toContain('operator');
    // the admin's own row has no Disable button; another's asks first, and Cancel leaves it alone
    expect(await page.getByTestId('person-row').filter({ hasText: app.admin.email }).getByRole('button').count()).toBe(0);
    await row.getByRole('button', { name: 'Disable ada@lab.example' }).click();
    expect(await page.getByRole('alertdialog').innerText()).toMatch(/Disable ada@lab.example\?/);
    await page.getByRole('alertdialog').getByRole('button', { name: 'Cancel' }).click();
    expect(await page.getByRole('alertdialog').count()).toBe(0);
    await row.getByRole('button', { name: 'Disable ada@lab.example' }).click();
    await page.getByRole('alertdialog').getByRole('button', { name: 'Yes, disable' }).click();
    await expect.poll(() => page.getByTestId('people').getByRole('status').innerText()).toMatch(/ada@lab.example is disabled/);
    await expect.poll(() => row.getByRole('button').count()).toBe(0);

    // create a token: the secret shows once, in a read-only field, with the warning
    const tokenForm = page.getByTestId('create-token');
    await tokenForm.getByLabel(/^Token name/).fill('rig-pc-e2e');
    await tokenForm.getByLabel('Token role').selectOption('viewer');
    await tokenForm.getByLabel(/^Expires after/).fill('30');
    await tokenForm.getByRole('button', { name: 'Create the token' }).click();
    const shown = page.getByTestId('new-token');
    await shown.waitFor();
    expect(await shown.innerText()).toContain('Copy it now: it is not shown again');
    const secretField = page.locator('#t-secret');
    const secret = await secretField.inputValue();
    expect(secret).toMatch(/^saltus_/);
    expect(await secretField.getAttribute('readonly')).not.toBeNull();
    expect(await shown.getByRole('button', { name: 'Copy' }).count()).toBe(1);
    await expect.poll(() => page.getByTestId('tokens-table').innerText()).toContain('rig-pc-e2e');
    expect(await page.getByTestId('tokens-table').innerText()).not.toContain(secret);
    const works = await fetch(`${app.baseUrl}/api/v1/campaigns`, { headers: { authorization: `Bearer ${secret}` } });
    expect(works.status).toBe(200);
    await screenshot(page, 'accounts-token-created');

    // after "Done" (or a reload) the secret is gone from the page
    await shown.getByRole('button', { name: 'Done' }).click();
    expect(await page.getByTestId('new-token').count()).toBe(0);
    await page.reload();
    expect(await page.content()).not.toContain(secret);

    // revoke it, with a confirm step
    const tokenRow = page.getByTestId('token-row').filter({ hasText: 'rig-pc-e2e' });
    await tokenRow.getByRole('button', { name: 'Revoke rig-pc-e2e' }).click();
    await page.getByRole('alertdialog').getByRole('button', { name: 'Yes, revoke' }).click();
    await expect.poll(() => page.getByTestId('tokens').getByRole('status').innerText()).toMatch(/rig-pc-e2e is revoked/);
    await expect.poll(() => tokenRow.getByRole('button', { name: /Revoke/ }).count()).toBe(0);
    const refused = await fetch(`${app.baseUrl}/api/v1/campaigns`, { headers: { authorization: `Bearer ${secret}` } });
    expect(refused.status).toBe(401);

    // the buttons are tablet-sized
    const box = await page.getByRole('button', { name: 'Create the token' }).boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);
    await screenshot(page, 'accounts-admin');
    await page.context().close();
  });

  it('shows a planner the administrators-only message, no data and no link', async () => {
    const planner = app.addUser('planner');
    const page = await tabletPage(browser, {}, null);
    await signIn(page, app.baseUrl, planner);
    await page.goto(`${app.baseUrl}/`);
    await expect.poll(() => page.getByTestId('auth-role').innerText()).toBe('planner');
    expect(await page.getByRole('link', { name: 'Accounts' }).count()).toBe(0);
    await page.goto(`${app.baseUrl}/accounts`);
    await expect.poll(() => page.getByTestId('admins-only').innerText()).toContain('This page is for administrators');
    expect(await page.getByTestId('people-table').count()).toBe(0);
    expect(await page.getByTestId('tokens-table').count()).toBe(0);
    expect(await page.content()).not.toContain(app.admin.email);
    await screenshot(page, 'accounts-planner');
    await page.context().close();
  });
});

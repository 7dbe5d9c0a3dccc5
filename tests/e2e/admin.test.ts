import { describe, expect, it } from 'vitest';
import { screenshotPath, useBrowserTestEnv } from './helpers';

// Demo admin seeded on first start (server/services/seed.ts DEMO_ACCOUNTS).
const ADMIN = 'admin@aftercue.test';
const INVITEE = 'new.experimenter@lab.test';
const INVITEE_PASSWORD = 'twelve-characters-at-least';

describe('administration in the browser', () => {
  const env = useBrowserTestEnv();

  it('an admin invites a user, who sets a password from the mailed link and signs in', async () => {
    const { context, page } = await env.signedInPage(ADMIN, '/admin/users');

    await page.locator('[data-test="invite-user"]').click();
    const dialog = page.getByRole('dialog', { name: 'Invite a user' });
    await dialog.locator('input[name="email"]').fill(INVITEE);
    await dialog.locator('input[name="displayName"]').fill('New Experimenter');
    await dialog.getByRole('button', { name: 'Send invitation' }).click();
    await dialog.waitFor({ state: 'hidden' });
    const row = page.locator('.el-table__row', { hasText: INVITEE });
    await row.waitFor();
    // A new account has no password until the link is used (shared/api/users.ts passwordSet).
    expect(await row.innerText()).toContain('Invited');
    await page.mouse.move(0, 0);
    await page.screenshot({ path: screenshotPath('admin-users') });

    // The invitation is in the outbox; open it and take the link.
    await page.getByRole('link', { name: 'Outbox' }).click();
    await page.locator('.el-table__row', { hasText: INVITEE }).first().click();
    const body = await page.locator('[data-test="mail-body"]').innerText();
    await page.screenshot({ path: screenshotPath('outbox') });
    // Link form: server/services/mail-templates.ts setPasswordLink.
    const link = /\/set-password\?token=[^\s"<>]+/.exec(body)?.[0];
    expect(link).toBeDefined();

    await page.getByRole('link', { name: 'Audit log' }).click();
    await page.locator('.el-table__row', { hasText: 'user.invite' }).first().waitFor();
    await page.screenshot({ path: screenshotPath('audit') });
    await context.close();

    // The invitee, in a fresh browser, sets a password and signs in.
    const invitee = await env.newPage();
    await invitee.page.goto(`${env.url}${link}`);
    await invitee.page.locator('input[name="password"]').fill(INVITEE_PASSWORD);
    await invitee.page.locator('input[name="confirm"]').fill(INVITEE_PASSWORD);
    await invitee.page.getByRole('button', { name: 'Save password' }).click();
    await invitee.page.locator('[data-test="password-set"]').waitFor();
    await invitee.page.goto(`${env.url}/studies`);
    await invitee.page.waitForURL(/\/sign-in/);
    await invitee.page.locator('input[name="email"]').fill(INVITEE);
    await invitee.page.locator('input[name="password"]').fill(INVITEE_PASSWORD);
    await invitee.page.getByRole('button', { name: 'Sign in' }).click();
    await invitee.page.waitForURL((u) => u.pathname === '/studies');
    // The invited role was experimenter (the invite dialog's default), labelled as in src/components/role-info.ts.
    expect(await invitee.page.locator('[data-test="role"]').innerText()).toBe('Experimenter');
    await invitee.context.close();
  });

  it('an admin registers a rig, sees its key once, and retires it', async () => {
    const { context, page } = await env.signedInPage(ADMIN, '/rigs');

    await page.locator('[data-test="register-rig"]').click();
    const dialog = page.getByRole('dialog', { name: 'Register a rig' });
    await dialog.locator('input[name="name"]').fill('Booth 2');
    await dialog.locator('input[name="location"]').fill('Room 3.14');
    await dialog.getByRole('button', { name: 'Register and create key' }).click();

    const key = await page.locator('[data-test="rig-key"]').innerText();
    // Key format: shared/api/rigs.ts createRigResponseSchema (rig_ + 43 base64url characters).
    expect(key).toMatch(/^rig_[A-Za-z0-9_-]{43}$/);
    await page.screenshot({ path: screenshotPath('rig-key') });
    await page.locator('[data-test="rig-key-done"]').click();
    // Once its dialog has closed, the key is nowhere on the page.
    await page.locator('[data-test="rig-key"]').waitFor({ state: 'detached' });
    expect(await page.content()).not.toContain(key);

    const row = page.locator('.el-table__row', { hasText: 'Booth 2' });
    await row.getByRole('button', { name: 'Retire' }).click();
    await page.getByRole('dialog', { name: 'Retire rig' }).getByRole('button', { name: 'Retire' }).click();
    await row.getByText('Retired').waitFor();
    await page.mouse.move(0, 0);
    await page.screenshot({ path: screenshotPath('rigs') });
    await context.close();
  });

  it('the about page cites the example dataset without signing in', async () => {
    const { context, page } = await env.newPage();
    await page.goto(`${env.url}/about`);
    await page.getByRole('heading', { name: 'Example data' }).waitFor();
    const text = await page.locator('main').innerText();
    // Citations required by the dataset's licence (../shared/data/eegmmidb/README.md).
    expect(text).toContain('IEEE Trans Biomed Eng 51(6):1034–1043');
    expect(text).toContain('Circulation 101(23):e215–e220');
    await page.screenshot({ path: screenshotPath('about'), fullPage: true });
    await context.close();
  });
});

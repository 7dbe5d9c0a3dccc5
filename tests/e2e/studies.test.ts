import { describe, expect, it } from 'vitest';
import { screenshotPath, signInThroughUi, useBrowserTestEnv } from './helpers';

// Demo accounts seeded on first start (server/services/seed.ts DEMO_ACCOUNTS).
const INVESTIGATOR = 'investigator@aftercue.test';
const REVIEWER = 'reviewer@aftercue.test';
const STUDY_NAME = 'Left versus right hand imagery, browser test';

describe('studies in the browser', () => {
  const env = useBrowserTestEnv();

  it('an investigator creates a study and adds a participant through the UI', async () => {
    const { context, page, consoleErrors } = await env.newPage();
    await page.goto(`${env.url}/sign-in`);
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    await page.screenshot({ path: screenshotPath('sign-in') });

    await signInThroughUi(page, env.url, INVESTIGATOR);
    await page.getByRole('heading', { name: 'Studies' }).waitFor();

    // Create a study through the form.
    await page.locator('[data-test="new-study"]').click();
    const dialog = page.getByRole('dialog', { name: 'New study' });
    await dialog.waitFor();
    await dialog.locator('input[name="name"]').fill(STUDY_NAME);
    await dialog.locator('input[name="ethicsReference"]').fill('EC-2026-0142');
    const cueInput = dialog.locator('[data-field="cueClasses"] input');
    for (const cue of ['left-hand', 'right-hand']) {
      await cueInput.fill(cue);
      await cueInput.press('Enter');
    }
    await dialog.getByRole('button', { name: 'Common 32' }).click();
    await page.screenshot({ path: screenshotPath('study-form') });
    await dialog.getByRole('button', { name: 'Create study' }).click();

    // Creating opens the study.
    await page.waitForURL(/\/studies\/\d+$/);
    await page.getByRole('heading', { name: STUDY_NAME }).waitFor();
    // The study page shows what was entered (form values above).
    expect(await page.locator('.study-facts').innerText()).toContain('EC-2026-0142');

    // Add a participant with consent given.
    await page.locator('[data-test="add-participant"]').click();
    const pDialog = page.getByRole('dialog', { name: 'Add participant' });
    await pDialog.waitFor();
    await pDialog.locator('input[name="code"]').fill('P-101');
    await pDialog.getByText('Given', { exact: true }).click();
    const dateInput = pDialog.locator('[data-field="consentDate"] input');
    await dateInput.fill('2025-11-20');
    await dateInput.press('Enter');
    await pDialog.locator('textarea[name="notes"]').fill('Right-handed; prefers morning sessions.');
    await pDialog.locator('[data-test="save-participant"]').click();
    await pDialog.waitFor({ state: 'hidden' });

    // The new participant is in the table with its consent.
    const row = page.locator('[data-test="participants-table"] .el-table__row', { hasText: 'P-101' });
    await row.waitFor();
    expect(await row.innerText()).toContain('Consent given');
    await page.mouse.move(0, 0);
    await page.screenshot({ path: screenshotPath('studies'), fullPage: true });

    // And the list holds the study.
    await page.getByRole('link', { name: '← Studies' }).click();
    await page.locator('.study-table', { hasText: STUDY_NAME }).waitFor();
    await page.screenshot({ path: screenshotPath('study-list') });

    // The signed-out probe GET /api/auth/me answers 401 by contract; Chromium logs that load, nothing else may appear.
    expect(consoleErrors.filter((m) => !/status of 401/.test(m))).toEqual([]);
    await context.close();
  });

  it('a reviewer sees studies but no button to create or change them', async () => {
    const { context, page } = await env.signedInPage(REVIEWER);
    // The seeded demo study (server/services/seed.ts) is listed for every role with study:read.
    await page.locator('.study-table .el-table__row').first().waitFor();
    // shared/api/roles.ts: study:create is admin and investigator only.
    expect(await page.locator('[data-test="new-study"]').count()).toBe(0);

    await page.locator('.study-table .el-table__row').first().click();
    await page.waitForURL(/\/studies\/\d+$/);
    await page.locator('[data-test="participants-table"]').waitFor();
    // shared/api/roles.ts: reviewers hold neither study:edit, study:archive nor participant:create.
    expect(await page.locator('[data-test="edit-study"], [data-test="archive-study"], [data-test="add-participant"]').count()).toBe(0);

    // Admin pages are refused by the guard.
    await page.goto(`${env.url}/admin/users`);
    await page.waitForURL(/\/forbidden/);
    await context.close();
  });
});

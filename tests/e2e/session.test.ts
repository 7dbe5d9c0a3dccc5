import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_STUDY } from '../../server/services/seed';
import { screenshotPath, useBrowserTestEnv } from './helpers';

// Demo accounts and data seeded on first start (server/services/seed.ts): the demo study, its
// participant P-001 with consent given, and the demo rig served by the embedded simulator.
// The server's own background demo decoder is switched off (its training takes minutes on this
// machine); instead the test makes a decoder the way a lab would: `aftercue simulate` writes a
// short calibration run of the demo profile (invented data), `aftercue train` fits and seals
// MODEL.json + REPORT.json, and the investigator imports and freezes it in the browser.
const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const INVESTIGATOR = 'investigator@aftercue.test';
const EXPERIMENTER = 'experimenter@aftercue.test';
const REVIEWER = 'reviewer@aftercue.test';
const DEMO_RIG = 'Demo rig';
const DECODER_NAME = 'Browser-test covariance decoder';

function aftercue(...args: string[]): void {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'cli/main.ts', ...args], { cwd: ROOT, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`aftercue ${args[0]} failed: ${r.stderr}`);
}

/** Pick an option of the Element Plus select in form field `field` by the option's text. */
async function choose(page: Page, field: string, option: string): Promise<void> {
  await page.locator(`[data-field="${field}"] .el-select__wrapper`).click();
  await page.locator('.el-select-dropdown:visible .el-select-dropdown__item', { hasText: option }).first().click();
}

describe('a pilot session in the browser', () => {
  const env = useBrowserTestEnv({ demoDecoder: false });
  let files: string;

  beforeAll(async () => {
    files = mkdtempSync(join(tmpdir(), 'aftercue-e2e-model-'));
    // 300 s of the demo profile (about 40 cues) and the covariance recipe with 3 outer folds.
    aftercue('simulate', '--profile', 'simulator/profiles/demo-hand-imagery.json', '--out', join(files, 'calibration.edf'),
      '--truth', join(files, 'truth.json'), '--seconds', '300', '--seed', '11');
    aftercue('train', '--edf', join(files, 'calibration.edf'), '--classes', DEMO_STUDY.cueClasses.join(','),
      '--tmin', String(DEMO_STUDY.epochStartS), '--tmax', String(DEMO_STUDY.epochEndS), '--recipe', 'covariance',
      '--folds', '3', '--inner', '2', '--seed', '1', '--out', join(files, 'MODEL.json'), '--report', join(files, 'REPORT.json'));
  });

  afterAll(async () => {
    if (files) rmSync(files, { recursive: true, force: true });
  });

  it('an investigator imports a decoder artifact and freezes it', async () => {
    const { context, page, consoleErrors } = await env.signedInPage(INVESTIGATOR);
    await page.locator('.study-table .el-table__row', { hasText: DEMO_STUDY.name }).click();
    await page.locator('[data-test="study-decoders"]').click();
    await page.waitForURL(/\/studies\/\d+\/decoders$/);

    await page.locator('[data-test="import-decoder"]').click();
    const dialog = page.getByRole('dialog', { name: 'Import a decoder' });
    await dialog.locator('input[name="artifact"]').setInputFiles(join(files, 'MODEL.json'));
    await dialog.locator('input[name="report"]').setInputFiles(join(files, 'REPORT.json'));
    await dialog.locator('input[name="name"]').fill(DECODER_NAME);
    await dialog.locator('[data-test="import-decoder-submit"]').click();

    // Importing opens the decoder: a draft, its hash shown in full.
    await page.waitForURL(/\/decoders\/\d+$/);
    await page.getByRole('heading', { name: DECODER_NAME }).waitFor();
    expect(await page.locator('[data-test="decoder-status"]').innerText()).toBe('Draft');
    // The seal is a hex SHA-256 (shared/api/decoders.ts decoderSummarySchema.sha256).
    expect(await page.locator('[data-test="sha256"]').innerText()).toMatch(/^[0-9a-f]{64}$/);
    // The covariance recipe's interpretation: spatial patterns drawn as scalp maps (32 electrodes each).
    await page.locator('[data-test="scalp-map"]').first().waitFor();
    expect(await page.locator('[data-test="scalp-map"]').first().locator('.scalp__electrode').count()).toBe(32);

    await page.locator('[data-test="freeze"]').click();
    const confirm = page.getByRole('dialog', { name: 'Freeze decoder' });
    // The confirmation says the artifact will never change.
    expect(await confirm.innerText()).toContain('never change');
    await confirm.getByRole('button', { name: 'Freeze for good' }).click();
    await page.locator('[data-test="decoder-status"]', { hasText: 'Frozen' }).waitFor();
    await page.locator('.el-message').first().waitFor({ state: 'detached', timeout: 10_000 });
    await page.mouse.move(0, 0);
    await page.screenshot({ path: screenshotPath('decoder'), fullPage: true });
    expect(consoleErrors.filter((m) => !/status of 401/.test(m))).toEqual([]);
    await context.close();
  });

  it('an experimenter uploads a calibration recording, trains a decoder and lands on it', async () => {
    const { context, page, consoleErrors } = await env.signedInPage(EXPERIMENTER);
    await page.locator('.study-table .el-table__row', { hasText: DEMO_STUDY.name }).click();
    await page.locator('[data-test="study-decoders"]').click();
    await page.waitForURL(/\/studies\/\d+\/decoders$/);

    await page.locator('[data-test="recording-file"]').setInputFiles(join(files, 'calibration.edf'));
    const row = page.locator('.recs .el-table__row', { hasText: 'calibration.edf' });
    await row.waitFor({ timeout: 30_000 });
    // The simulated run's cues by annotation text (aftercue simulate writes the class labels as annotations).
    expect(await row.innerText()).toMatch(/left-hand ×\d+/);

    await page.locator('[data-test="train-decoder"]').click();
    const dialog = page.getByRole('dialog', { name: 'Train a decoder' });
    await dialog.getByText('Spatial covariance').click();
    // The covariance recipe's feature map: the tangent-space (log) choice must reach the trained decoder.
    await dialog.getByText('log (tangent space)').click();
    await dialog.locator('input[name="name"]').fill('Trained in the browser');
    // 3 outer folds keep the job short; the rest as the dialog proposes (study classes, seed 1).
    const folds = dialog.locator('[data-field="folds"] input');
    await folds.fill('3');
    await folds.press('Tab');
    await dialog.locator('[data-test="start-training"]').click();
    await dialog.waitFor({ state: 'hidden' });
    // The job shows while it runs, then the page moves to the draft decoder it made (useTrainingJobs polling).
    await page.locator('[data-test="training-jobs"]', { hasText: 'Trained in the browser' }).waitFor();
    await page.screenshot({ path: screenshotPath('decoders') });
    await page.waitForURL(/\/decoders\/\d+$/, { timeout: 150_000 });
    await page.getByRole('heading', { name: 'Trained in the browser' }).waitFor();
    expect(await page.locator('[data-test="decoder-status"]').innerText()).toBe('Draft');
    await page.getByText('the features are the log of the whitened covariance (tangent space)', { exact: false }).waitFor();
    // An experimenter may not freeze (shared/api/roles.ts decoder:freeze is investigator and admin).
    expect(await page.locator('[data-test="freeze"]').count()).toBe(0);
    expect(consoleErrors.filter((m) => !/status of 401/.test(m))).toEqual([]);
    await context.close();
  }, 200_000);

  it('an experimenter runs a session: predictions arrive, accuracy updates, the participant sees cue and feedback', async () => {
    const { context, page, consoleErrors } = await env.signedInPage(EXPERIMENTER, '/sessions');

    // Set up the session: demo study, P-001, demo rig, the frozen decoder.
    await page.locator('[data-test="new-session"]').click();
    const dialog = page.getByRole('dialog', { name: 'New pilot session' });
    await dialog.waitFor();
    await choose(page, 'studyId', DEMO_STUDY.name);
    await choose(page, 'participantId', 'P-001');
    await choose(page, 'rigId', DEMO_RIG);
    await choose(page, 'decoderId', DECODER_NAME);
    await page.screenshot({ path: screenshotPath('session-new') });
    await dialog.locator('[data-test="create-session"]').click();
    await page.waitForURL(/\/sessions\/\d+$/);

    // Start: the embedded simulator streams; a trial follows each cue once its epoch has ended.
    await page.locator('[data-test="start"]').click();
    await page.locator('[data-test="session-status"]', { hasText: 'Running' }).waitFor();
    await page.locator('[data-test="connection"]', { hasText: 'Live' }).waitFor();

    // Two trial predictions arrive (demo profile: a cue every 6.5-8 s after a 3 s lead-in, epoch to 4 s).
    await page.locator('[data-test="trial-row"]').nth(1).waitFor({ timeout: 60_000 });
    // The running accuracy counts scored trials: "k of n correct" (RunningAccuracyPanel).
    await page.locator('[data-test="accuracy-counts"]', { hasText: /\d+ of \d+ correct/ }).waitFor({ timeout: 30_000 });
    const [, k, n] = /(\d+) of (\d+) correct/.exec(await page.locator('[data-test="accuracy-counts"]').innerText())!;
    expect(Number(n)).toBeGreaterThanOrEqual(1);
    expect(Number(k)).toBeLessThanOrEqual(Number(n));
    // The server's trial counter (sent with the status about once a second) follows.
    await expect.poll(async () => Number(await page.locator('[data-test="count-trials"] .counters__value').innerText()),
      { timeout: 5000 }).toBeGreaterThanOrEqual(2);

    // The participant display: a one-time link opened in a browser without an account.
    await page.locator('[data-test="display-link"]').click();
    const url = await page.locator('[data-test="display-url"]').innerText();
    // Link form: shared/api/sessions.ts displayLinkSchema ('/display/<token>').
    expect(url).toMatch(/\/display\/[^/\s]+$/);
    await page.getByRole('dialog', { name: 'Participant display' }).getByRole('button', { name: 'Done' }).click();
    const participant = await env.newPage();
    await participant.page.goto(url);
    await participant.page.locator('[data-test="participant-display"][data-phase="cue"]').waitFor({ timeout: 30_000 });
    await participant.page.screenshot({ path: screenshotPath('display-cue') });
    await participant.page.locator('[data-test="participant-display"][data-phase="feedback"]').waitFor({ timeout: 30_000 });
    await participant.page.screenshot({ path: screenshotPath('display') });

    await page.mouse.move(0, 0);
    await page.screenshot({ path: screenshotPath('console'), fullPage: true });

    // Stop, confirming.
    await page.locator('[data-test="stop"]').click();
    await page.getByRole('dialog', { name: 'Stop session' }).getByRole('button', { name: 'Stop session' }).click();
    await page.locator('[data-test="session-status"]', { hasText: 'Stopped' }).waitFor();
    // The participant's screen says the session has ended.
    await participant.page.locator('[data-test="participant-display"][data-phase="finished"]').waitFor({ timeout: 15_000 });

    // The signed-out probe GET /api/auth/me answers 401 by contract; nothing else may be logged.
    expect(consoleErrors.filter((m) => !/status of 401/.test(m))).toEqual([]);
    expect(participant.consoleErrors.filter((m) => !/status of 401/.test(m))).toEqual([]);
    const consoleUrl = page.url();
    await page.getByRole('link', { name: '← Sessions' }).click();
    await page.locator('[data-test="session-table"] .el-table__row', { hasText: 'Stopped' }).waitFor();
    await page.mouse.move(0, 0);
    await page.screenshot({ path: screenshotPath('sessions') });
    await participant.context.close();
    await context.close();

    // A reviewer sees the same console read-only (shared/api/roles.ts: session:read without session:run).
    const reviewer = await env.signedInPage(REVIEWER, new URL(consoleUrl).pathname);
    await reviewer.page.locator('[data-test="trial-row"]').nth(1).waitFor();
    expect(await reviewer.page.locator('[data-test="start"], [data-test="stop"], [data-test="display-link"]').count()).toBe(0);
    expect(await reviewer.page.locator('.trials__switch input:not([disabled])').count()).toBe(0);

    // The gap review, linked from the stopped session's console: the headline comparison and the
    // seven findings (shared/api/review.ts FINDING_KEYS), each with a verdict; no mail button for a reviewer.
    await reviewer.page.locator('[data-test="review-link"]').click();
    await reviewer.page.waitForURL(/\/sessions\/\d+\/review$/);
    await reviewer.page.locator('[data-test="review-headline"]').waitFor();
    expect(await reviewer.page.locator('[data-test="review-headline"]').innerText()).toMatch(/Online \d+\.\d %/);
    expect(await reviewer.page.locator('article[data-test^="finding-"]').count()).toBe(7);
    // The stored samples re-run offline through the same decoder give the live predictions (server/live/offline.ts;
    // the live tests hold online = offline to 1e-9), so the live path is ruled out.
    expect(await reviewer.page.locator('[data-test="finding-replay"] [data-test="finding-verdict"]').innerText()).toBe('Unlikely');
    expect(await reviewer.page.locator('[data-test="finding-verdict"]').allInnerTexts())
      .toEqual(expect.arrayContaining([expect.stringMatching(/^(Likely|Possible|Unlikely)$/)]));
    expect(await reviewer.page.locator('[data-test="review-mail"]').count()).toBe(0);
    await reviewer.page.mouse.move(0, 0);
    await reviewer.page.screenshot({ path: screenshotPath('review'), fullPage: true });
    expect(reviewer.consoleErrors.filter((m) => !/status of 401/.test(m))).toEqual([]);
    await reviewer.context.close();
  });
});

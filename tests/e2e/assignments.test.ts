// Browser test of the assignment screens: the built site, served by the real
// server against the seeded e2e database (the runner sets E2E_BASE_URL). The
// demo instructor writes an assignment on a generated scenario with one
// variant per student, publishes it, watches the references finish and opens
// the complex-plane preview; a student then opens it and downloads her data.
// Expectations are facts of this project's invented demo data, no outside source.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { artifacts, launchBrowser, openDemoCourse } from './helpers.js';

const title = `Damped rotations seen by sensors ${Date.now().toString(36)}`;

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

const signIn = (email: string, width = 1280) => openDemoCourse(browser, email, { width, acceptDownloads: true });

describe('assignments in the browser', () => {
  it('the instructor writes an assignment on a scenario, publishes it and sees the references and the complex plane', async () => {
    const { page, failures } = await signIn('mara@modewright.test');
    await page.getByRole('link', { name: 'New assignment' }).click();
    await page.getByRole('heading', { name: 'New assignment', level: 1 }).waitFor();

    await page.getByLabel('Title').fill(title);
    await page.getByLabel('Statement').fill('Compute the eigenvalues $\\lambda_k$ of the exact DMD operator $A = U^\\top Y V \\Sigma^{-1}$.');
    // The live preview renders the math with KaTeX.
    await page.getByRole('region', { name: 'Preview' }).locator('.katex').first().waitFor();

    // Dataset: generated on the server from a scenario, then shown with its picture.
    await page.getByRole('radio', { name: 'Generate from a scenario' }).click();
    await page.getByLabel('Scenario', { exact: true }).selectOption('linear-field');
    await page.getByLabel('Name', { exact: true }).fill(`Sensors ${Date.now().toString(36)}`);
    await page.getByRole('button', { name: 'Generate and use this dataset' }).click();
    const card = page.getByTestId('dataset-card');
    await card.waitFor();
    expect(await card.innerText()).toMatch(/24 states × \d+ snapshots/);
    await expect.poll(() => card.getByRole('img').count()).toBeGreaterThan(0);

    // One variant per student is the default; the method is exact DMD at rank 7.
    expect(await page.getByRole('radio', { name: 'One variant per student' }).isChecked()).toBe(true);
    await page.getByLabel('Rank r').fill('7');
    await page.screenshot({ path: path.join(artifacts, 'assignment-authoring.png'), fullPage: true });

    await page.getByRole('button', { name: 'Publish…' }).click();
    const dialog = page.getByRole('dialog', { name: 'Publish this assignment?' });
    await dialog.waitFor();
    await dialog.getByRole('button', { name: 'Publish' }).click();

    // The assignment page: the progress bar counts references until every one is ready.
    await page.getByRole('heading', { name: title, level: 1 }).waitFor();
    const bar = page.getByRole('progressbar', { name: 'References ready' });
    await bar.waitFor({ timeout: 30_000 });
    const total = Number(await bar.getAttribute('aria-valuemax'));
    expect(total).toBe(12); // twelve demo students
    await expect.poll(async () => Number(await bar.getAttribute('aria-valuenow')), { timeout: 120_000, interval: 500 }).toBe(total);
    expect(await page.getByTestId('reference-progress').innerText()).toContain(`References ready ${total} of ${total}`);

    // The preview: eigenvalues on the complex plane, with the table beside it.
    const plane = page.getByRole('img', { name: /eigenvalues on the complex plane/ });
    await plane.waitFor({ timeout: 60_000 });
    const table = page.getByRole('table', { name: /Reference eigenvalues and their state/ });
    await expect.poll(() => table.locator('tbody tr').count()).toBe(7);
    // Complex numbers are written with a real minus sign.
    expect(await table.innerText()).toMatch(/\d\.\d{4} [+−] \d\.\d{4}i/);
    // Focus the picture and step to a value: its exact value shows.
    await page.mouse.move(0, 0);
    await page.getByRole('group', { name: /complex plane/ }).focus();
    await page.keyboard.press('Home');
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => page.locator('dl', { hasText: 'condition' }).first().innerText()).toMatch(/λ₂/);
    await page.getByRole('region', { name: 'Eigenvalues on the complex plane' }).screenshot({ path: path.join(artifacts, 'assignment-complex-plane.png') });
    await page.screenshot({ path: path.join(artifacts, 'assignment-staff.png'), fullPage: true });

    // The variants table links to each student's reference.
    await expect.poll(() => page.getByRole('link', { name: 'Reference of Priya' }).count()).toBe(1);
    expect(failures).toEqual([]);
    await page.context().close();
  });

  it('a student opens the published assignment, downloads her own data and sees no reference value', async () => {
    const { page, failures } = await signIn('priya@modewright.test', 420);
    await page.getByRole('link', { name: title }).click();
    await page.getByRole('heading', { name: title, level: 1 }).waitFor();
    await page.getByRole('heading', { name: 'What to compute' }).waitFor();
    const text = await page.locator('main').innerText();
    expect(text).toMatch(/Due in \d+ days?/);
    expect(text).toContain('--method dmd --rank 7');
    expect(text).not.toMatch(/reference of|graded eigenvalues|condition/i);

    const [npy] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Data as .npy' }).click()]);
    const npyPath = path.join(artifacts, 'student-variant.npy');
    await npy.saveAs(npyPath);
    const head = fs.readFileSync(npyPath).subarray(0, 6);
    expect(head.equals(Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]))).toBe(true); // \x93NUMPY, the .npy magic

    const [meta] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Metadata (JSON)' }).click()]);
    const metaPath = path.join(artifacts, 'student-variant.json');
    await meta.saveAs(metaPath);
    const m = JSON.parse(fs.readFileSync(metaPath, 'utf8')) as { shape: number[]; pairs: boolean };
    expect(m.shape[0]).toBe(24);
    expect(m.pairs).toBe(false);

    await page.screenshot({ path: path.join(artifacts, 'assignment-student-narrow.png'), fullPage: true });
    expect(failures).toEqual([]);
    await page.context().close();
  });
});


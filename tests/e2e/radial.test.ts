// Browser test of EDMD with Gaussian radial functions: the demo instructor writes an assignment on a
// generated drift-map scenario, picks "Gaussian radial functions", sees the validation messages next
// to σ and the centre fields, publishes, and opens the preview (warnings, complex plane); a student
// then reads the dictionary, σ and her centre columns in words, as JSON and as CLI options.
// Expectations are facts of this project's invented demo data, no outside source.
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { artifacts, descriptionOf, launchBrowser, openDemoCourse } from './helpers.js';

const title = `Radial functions on the drift map ${Date.now().toString(36)}`;
const datasetName = `Drift ${Date.now().toString(36)}`;

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

const signIn = (email: string, width = 1280) => openDemoCourse(browser, email, { width });

describe('EDMD with Gaussian radial functions in the browser', () => {
  it('the instructor chooses radial functions, sees field messages, publishes, and sees the preview', async () => {
    const { page, failures } = await signIn('mara@modewright.test');
    await page.getByRole('link', { name: 'New assignment' }).click();
    await page.getByRole('heading', { name: 'New assignment', level: 1 }).waitFor();
    await page.getByLabel('Title').fill(title);
    await page.getByLabel('Statement').fill('Approximate the Koopman operator with EDMD on Gaussian radial functions $\\psi_j(x) = e^{-\\|x - c_j\\|^2 / (2\\sigma^2)}$.');

    await page.getByRole('radio', { name: 'Generate from a scenario' }).click();
    await page.getByLabel('Scenario', { exact: true }).selectOption('drift-map');
    await page.getByLabel('Name', { exact: true }).fill(datasetName);
    await page.getByRole('button', { name: 'Generate and use this dataset' }).click();
    await page.getByTestId('dataset-card').waitFor();

    await page.getByLabel('Method', { exact: true }).selectOption('edmd');
    await page.getByLabel('Dictionary', { exact: true }).selectOption('radial');
    // Defaults: σ = 0.5 and every 20th snapshot; the hint counts the centres on this dataset (400 pairs).
    expect(await page.getByLabel('Width σ').inputValue()).toBe('0.5');
    await expect.poll(() => descriptionOf(page, 'Step s')).toContain('X has 400 snapshots: 20 centres, 21 functions with the constant');

    // Field messages: an empty σ, then a list with a repeated index and one past the end of X.
    await page.getByLabel('Width σ').fill('');
    await page.getByLabel('Centres', { exact: true }).selectOption('indices');
    await page.getByLabel('Snapshot indices').fill('0, 40, 40, 400');
    await page.getByRole('button', { name: 'Save draft' }).click();
    await expect.poll(() => descriptionOf(page, 'Width σ')).toContain('Radial functions need their width σ');
    await expect.poll(() => descriptionOf(page, 'Snapshot indices')).toContain('Snapshot 40 is listed twice (entries 2 and 3)');
    await page.getByLabel('Width σ').fill('0.5');
    await page.getByLabel('Snapshot indices').fill('0, 40, 400');
    await page.getByRole('button', { name: 'Save draft' }).click();
    // Past the end of X is the server's check, shown next to the field.
    await expect.poll(() => descriptionOf(page, 'Snapshot indices')).toContain('X has 400 snapshots (0-based columns 0 … 399): 400 is past the end');
    await page.screenshot({ path: path.join(artifacts, 'radial-authoring-errors.png'), fullPage: true });

    await page.getByLabel('Centres', { exact: true }).selectOption('every');
    await page.getByLabel('Step s').fill('20');
    await page.getByRole('region', { name: 'Method' }).or(page.locator('form')).first().screenshot({ path: path.join(artifacts, 'radial-authoring.png') });
    await page.getByRole('button', { name: 'Publish…' }).click();
    const dialog = page.getByRole('dialog', { name: 'Publish this assignment?' });
    await dialog.waitFor();
    await dialog.getByRole('button', { name: 'Publish' }).click();

    await page.getByRole('heading', { name: title, level: 1 }).waitFor();
    const bar = page.getByRole('progressbar', { name: 'References ready' });
    await bar.waitFor({ timeout: 30_000 });
    const total = Number(await bar.getAttribute('aria-valuemax'));
    await expect.poll(async () => Number(await bar.getAttribute('aria-valuenow')), { timeout: 120_000, interval: 500 }).toBe(total);

    // The preview: well posed, 21 values on the complex plane (the constant's λ = 1 among them).
    await page.getByRole('img', { name: /eigenvalues on the complex plane/ }).waitFor({ timeout: 60_000 });
    expect(await page.locator('main').innerText()).toContain('Nothing makes this task ill-posed');
    const table = page.getByRole('table', { name: /Reference eigenvalues and their state/ });
    await expect.poll(() => table.locator('tbody tr').count()).toBe(21);
    expect(await table.innerText()).toContain('1.0000');
    await page.screenshot({ path: path.join(artifacts, 'radial-staff.png'), fullPage: true });
    expect(failures).toEqual([]);
    await page.context().close();
  });

  it('a radial dictionary that is rank-deficient on the data is warned about in the preview, with what to change', async () => {
    const { page, failures } = await signIn('mara@modewright.test');
    await page.getByRole('link', { name: 'New assignment' }).click();
    await page.getByRole('heading', { name: 'New assignment', level: 1 }).waitFor();
    await page.getByLabel('Title').fill(`${title}, wide functions`);
    const ds = page.getByLabel('Dataset', { exact: true });
    // The drift-map dataset the first test generated (400 pairs in [−1, 1]²).
    const drift = (await ds.locator('option').allInnerTexts()).find((o) => o.startsWith(datasetName))!;
    await ds.selectOption({ label: drift });
    await page.getByTestId('dataset-card').waitFor();
    await page.getByLabel('Method', { exact: true }).selectOption('edmd');
    await page.getByLabel('Dictionary', { exact: true }).selectOption('radial');
    // σ = 2 on data in [−1, 1]²: 40 wide, nearly equal bumps (fact of the trade: they are numerically dependent).
    await page.getByLabel('Width σ').fill('2');
    await page.getByLabel('Step s').fill('10');
    await page.getByRole('button', { name: 'Save draft' }).click();
    await page.waitForURL(/\/assignments\/\d+\/edit$/);
    await page.goto(page.url().replace(/\/edit$/, ''));
    const warning = page.getByRole('list', { name: 'Warnings' });
    await warning.waitFor({ timeout: 60_000 });
    const text = await warning.innerText();
    expect(text).toContain('The dictionary is rank-deficient on this data');
    expect(text).toMatch(/numerical rank \d+ of 41 functions/);
    expect(text).toContain('Fewer centres (a larger step), a smaller width σ, or more samples make the task well posed.');
    await page.getByRole('img', { name: /eigenvalues on the complex plane/ }).waitFor();
    await page.getByRole('heading', { name: 'Is the task well-posed?' }).scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifacts, 'radial-rank-deficient.png') });
    expect(failures).toEqual([]);
    await page.context().close();
  });

  it('a student reads the dictionary, σ and her centre columns in words, as JSON and as CLI options', async () => {
    const { page, failures } = await signIn('priya@modewright.test', 420);
    await page.getByRole('link', { name: title }).click();
    await page.getByRole('heading', { name: title, level: 1 }).waitFor();
    await page.getByRole('heading', { name: 'What to compute' }).waitFor();
    const text = await page.locator('main').innerText();
    expect(text).toContain('Gaussian radial functions: the constant 1 and exp(−‖x − c‖² / (2σ²)) for each centre c, with σ = 0.5');
    expect(text).toContain('Every 20th snapshot of X from the first (0-based columns 0, 20, 40, …; 20 centres), taken from your own data');
    expect(text).toContain('0, 20, 40, 60, 80, 100, 120, 140, 160, 180, 200, 220, 240, 260, 280, 300, 320, 340, 360, 380');
    expect(text).toContain('--method edmd --dictionary radial --sigma 0.5 --centres-every 20');
    expect(text).toContain('"centres": {"kind":"every","step":20,"indices":[0,20,40,');
    expect(text).not.toMatch(/reference of|graded eigenvalues|condition/i);
    await page.screenshot({ path: path.join(artifacts, 'radial-student-narrow.png'), fullPage: true });
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.getByRole('heading', { name: 'What to compute' }).scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifacts, 'radial-student.png'), fullPage: true });
    expect(failures).toEqual([]);
    await page.context().close();
  });
});

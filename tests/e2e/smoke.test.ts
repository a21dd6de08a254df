// Browser smoke test: the built site, served by the real server against the
// seeded test database (the runner sets E2E_BASE_URL). Checks the demo data
// described in DEVELOPERS.md ("Demo accounts"): invented scenario data, so
// the expectations are facts of this project, not of any outside source.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Page } from 'playwright-core';

const baseURL = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:5490';
const artifacts = path.resolve('artifacts/e2e');
const password = 'modewright-demo';
const courseTitle = 'Data-Driven Dynamics Studio';

let browser: Browser;

beforeAll(async () => {
  fs.mkdirSync(artifacts, { recursive: true });
  browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-background-networking', '--disable-gpu', '--disable-component-update', '--no-first-run', '--disable-sync'],
  });
});

afterAll(async () => {
  await browser?.close();
});

async function signIn(email: string): Promise<Page> {
  const context = await browser.newContext({ baseURL, viewport: { width: 1280, height: 860 } });
  const page = await context.newPage();
  const failures: string[] = [];
  page.on('pageerror', (e) => failures.push(e.message));
  await page.goto('/');
  await page.getByRole('heading', { name: 'Sign in' }).waitFor();
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Your courses' }).waitFor();
  expect(failures).toEqual([]);
  return page;
}

describe('browser smoke test', () => {
  it('shows a clear error for a wrong password and stays on the sign-in page', async () => {
    const context = await browser.newContext({ baseURL });
    const page = await context.newPage();
    await page.goto('/');
    await page.getByLabel('E-mail').fill('mara@modewright.test');
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.innerText()).toMatch(/could not sign you in/i);
    expect(await page.getByRole('heading', { name: 'Your courses' }).count()).toBe(0);
    await context.close();
  });

  it('instructor sees the course with her role, the members table and the join code', async () => {
    const page = await signIn('mara@modewright.test');
    await expect.poll(() => page.getByRole('banner').innerText()).toContain('Mara Lindqvist');

    const row = page.getByRole('link', { name: new RegExp(courseTitle) });
    await row.waitFor();
    expect(await row.innerText()).toContain('Instructor');
    await page.screenshot({ path: path.join(artifacts, 'course-list.png'), fullPage: true });

    await row.click();
    await page.getByRole('heading', { name: courseTitle, level: 1 }).waitFor();
    const table = page.getByRole('table', { name: 'Course members' });
    await table.waitFor();
    const rows = table.locator('tbody tr');
    await expect.poll(() => rows.count()).toBeGreaterThan(2);
    const text = await table.innerText();
    expect(text).toContain('Teaching assistant');
    expect(text).toContain('Student');
    expect(text).toContain('Tomasz Wrenfield');
    expect(text).toContain('Priya Halvorsen');

    // The join code panel belongs to instructors.
    expect(await page.locator('#join-code-value').innerText()).toBe('ORBIT-4821');

    // Filtering narrows the table to the matching people.
    await page.getByLabel('Filter members').fill('priya');
    await expect.poll(() => rows.count()).toBe(1);
    expect(await rows.first().innerText()).toContain('priya@modewright.test');
    await page.getByLabel('Filter members').fill('');

    await page.screenshot({ path: path.join(artifacts, 'course-page.png'), fullPage: true });
    await page.context().close();
  });

  it('student sees her own enrollment and no members table', async () => {
    const page = await signIn('priya@modewright.test');
    const row = page.getByRole('link', { name: new RegExp(courseTitle) });
    await row.waitFor();
    expect(await row.innerText()).toContain('Student');
    await row.click();
    await page.getByRole('heading', { name: 'Your enrollment' }).waitFor();
    const card = page.locator('section', { has: page.getByRole('heading', { name: 'Your enrollment' }) });
    expect(await card.innerText()).toMatch(/Role\s+Student/);
    expect(await card.innerText()).toMatch(/Enrolled since\s+\d{1,2} [A-Z][a-z]{2} \d{4}/);
    expect(await page.getByRole('table').count()).toBe(0);
    expect(await page.locator('#join-code-value').count()).toBe(0);
    await page.screenshot({ path: path.join(artifacts, 'student-course-page.png'), fullPage: true });

    // Signing out returns to the sign-in page.
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    await page.context().close();
  });
});

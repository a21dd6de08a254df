// Shared set-up of the browser tests: where the site runs (the runner sets
// E2E_BASE_URL), where screenshots go, Debian's Chromium started headless as
// the machine requires, and the sign-in form filled in.
import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';

export const baseURL = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:5490';
export const artifacts = path.resolve('artifacts/e2e');
export const password = 'modewright-demo';
export const courseTitle = 'Data-Driven Dynamics Studio';

/** Headless Debian Chromium (no downloaded browser), with the screenshot folder made. */
export async function launchBrowser(): Promise<Browser> {
  fs.mkdirSync(artifacts, { recursive: true });
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-background-networking', '--disable-gpu', '--disable-component-update', '--no-first-run', '--disable-sync'],
  });
}

/** Fill in and send the sign-in form on the page that shows it. */
export async function submitSignIn(page: Page, email: string, pass = password): Promise<void> {
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(pass);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/**
 * A new browser context signed in as `email` with the demo course open; `failures` collects uncaught page errors.
 * `acceptDownloads` for tests that save the student's files.
 */
export async function openDemoCourse(
  browser: Browser,
  email: string,
  { width = 1280, acceptDownloads = false }: { width?: number; acceptDownloads?: boolean } = {},
): Promise<{ page: Page; failures: string[] }> {
  const context = await browser.newContext({ baseURL, viewport: { width, height: 900 }, acceptDownloads });
  const page = await context.newPage();
  const failures: string[] = [];
  page.on('pageerror', (e) => failures.push(e.message));
  await page.goto('/');
  await submitSignIn(page, email);
  await page.getByRole('heading', { name: 'Your courses' }).waitFor();
  await page.getByRole('link', { name: new RegExp(courseTitle) }).click();
  await page.getByRole('heading', { name: courseTitle, level: 1 }).waitFor();
  return { page, failures };
}

/** The text of the elements an input's aria-describedby points at (hint and error), joined by " | ". */
export function descriptionOf(page: Page, label: string): Promise<string> {
  return page.getByLabel(label, { exact: true }).evaluate((el) =>
    (el.getAttribute('aria-describedby') ?? '')
      .split(/\s+/)
      .filter(Boolean)
      .map((id) => document.getElementById(id)?.textContent ?? '')
      .join(' | '),
  );
}

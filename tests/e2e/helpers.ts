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

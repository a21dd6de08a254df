// Browser smoke test: the built site, served by the real server against the
// seeded test database (the runner sets E2E_BASE_URL). Checks the demo data
// described in DEVELOPERS.md ("Demo accounts"): invented scenario data, so
// the expectations are facts of this project, not of any outside source.
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseURL, artifacts, courseTitle, descriptionOf, launchBrowser, submitSignIn } from './helpers.js';
import axe from 'axe-core';


let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
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
  await submitSignIn(page, email);
  await page.getByRole('heading', { name: 'Your courses' }).waitFor();
  expect(failures).toEqual([]);
  return page;
}

interface AxeFinding {
  id: string;
  impact: string | null;
  help: string;
  nodes: string[];
}

/**
 * Run axe-core (the installed package, injected into the page) over the whole document.
 * Injected through page.evaluate, which is not subject to the site's Content-Security-Policy.
 */
async function runAxe(page: Page): Promise<{ violations: AxeFinding[]; passes: AxeFinding[] }> {
  await page.evaluate(`${axe.source};\nundefined`);
  return page.evaluate(async () => {
    const w = window as unknown as { axe: typeof axe };
    const r = await w.axe.run(document, { resultTypes: ['violations', 'passes'] });
    const brief = (list: typeof r.violations) =>
      list.map((v) => ({ id: v.id, impact: v.impact ?? null, help: v.help, nodes: v.nodes.map((n) => n.target.join(' ')) }));
    return { violations: brief(r.violations), passes: brief(r.passes) };
  });
}

const isFocused = (page: Page, label: string) => page.getByLabel(label, { exact: true }).evaluate((el) => el === document.activeElement);

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
    await expect.poll(() => rows.count()).toBeGreaterThan(2);

    // Accessibility (axe-core): nothing serious or critical, and every button's accessible
    // name contains its visible text (label-content-name-mismatch, WCAG 2.5.3), which the
    // "Allow to teach…" buttons of the members table are checked against.
    const teach = page.getByRole('button', { name: 'Allow to teach: Priya Halvorsen' });
    expect(await teach.innerText()).toBe('Allow to teach…');
    const { violations, passes } = await runAxe(page);
    const serious = violations.filter((v) => v.impact === 'serious' || v.impact === 'critical' || v.id === 'label-content-name-mismatch');
    expect(serious).toEqual([]);
    const checked = passes.find((p) => p.id === 'label-content-name-mismatch');
    expect(checked?.nodes.length ?? 0).toBeGreaterThan(2);

    await page.screenshot({ path: path.join(artifacts, 'course-page.png'), fullPage: true });
    await page.context().close();
  });

  it('an instructor changes a role from the members table after a confirm step; the person sees it; a refusal shows under the row', async () => {
    const mara = await signIn('mara@modewright.test');
    await mara.getByRole('link', { name: new RegExp(courseTitle) }).click();
    const table = mara.getByRole('table', { name: 'Course members' });
    await table.waitFor();
    // Her own row has no control (the API refuses one's own role); everyone else's has one.
    expect(await mara.getByRole('combobox', { name: 'Role of Mara Lindqvist' }).count()).toBe(0);

    // Choosing a role only asks; the question says who and what changes.
    await mara.getByRole('combobox', { name: 'Role of Tomasz Wrenfield' }).selectOption({ label: 'Instructor' });
    const confirm = mara.getByRole('group', { name: 'Make Tomasz Wrenfield an instructor?' });
    await confirm.waitFor();
    expect(await confirm.innerText()).toMatch(/Now teaching assistant\. Instructors can do everything in the course/);
    const { violations } = await runAxe(mara);
    expect(violations.filter((v) => v.impact === 'serious' || v.impact === 'critical' || v.id === 'label-content-name-mismatch')).toEqual([]);
    await mara.screenshot({ path: path.join(artifacts, 'role-change-confirm.png'), fullPage: true });
    await confirm.getByRole('button', { name: /^Change role/ }).click();
    await mara.getByRole('status').filter({ hasText: 'Tomasz Wrenfield is now an instructor.' }).waitFor();
    expect(await mara.getByRole('combobox', { name: 'Role of Tomasz Wrenfield' }).inputValue()).toBe('instructor');

    // As Tomasz sees it: instructor on the course list and the course page, with the instructor's tools.
    const tomasz = await signIn('tomasz@modewright.test');
    const row = tomasz.getByRole('link', { name: new RegExp(courseTitle) });
    expect(await row.innerText()).toContain('Instructor');
    await row.click();
    await tomasz.locator('#join-code-value').waitFor();
    expect(await tomasz.getByText(/^You are/).innerText()).toMatch(/You are\s+Instructor/);
    await tomasz.getByRole('combobox', { name: 'Role of Mara Lindqvist' }).waitFor();

    // Tomasz makes Mara a teaching assistant (over the API); her page still offers the controls, and the
    // API's refusal appears under the row she tried to change, in words; her own role then refreshes.
    const post = async (page: Page, url: string, body: object) => {
      const { token } = (await (await page.request.get('/api/csrf')).json()) as { token: string };
      return page.request.post(url, { data: body, headers: { 'x-csrf-token': token } });
    };
    const courseId = Number(/\/courses\/(\d+)/.exec(tomasz.url())![1]);
    const { members } = (await (await tomasz.request.get(`/api/courses/${courseId}/members`)).json()) as { members: { userId: number; email: string }[] };
    const idOf = (email: string) => members.find((m) => m.email === email)!.userId;
    expect((await post(tomasz, `/api/courses/${courseId}/members/${idOf('mara@modewright.test')}/role`, { role: 'teaching_assistant' })).status()).toBe(200);
    await mara.getByRole('combobox', { name: 'Role of Inés Calloway' }).selectOption({ label: 'Student' });
    await mara.getByRole('group', { name: 'Make Inés Calloway a student?' }).getByRole('button', { name: /^Change role/ }).click();
    const refusal = mara.getByRole('alert').filter({ hasText: 'Role of Inés Calloway not changed' });
    await refusal.waitFor();
    expect(await refusal.innerText()).toContain('Your role in this course does not allow this');
    await expect.poll(() => mara.getByText(/^You are/).innerText()).toMatch(/You are\s+Teaching assistant/);
    expect(await mara.getByRole('combobox', { name: /^Role of / }).count()).toBe(0);
    expect(await refusal.isVisible()).toBe(true);
    await mara.screenshot({ path: path.join(artifacts, 'role-change-refused.png'), fullPage: true });

    // Back as it was, for the other tests: Mara instructor (by Tomasz), Tomasz teaching assistant (by Mara).
    expect((await post(tomasz, `/api/courses/${courseId}/members/${idOf('mara@modewright.test')}/role`, { role: 'instructor' })).status()).toBe(200);
    expect((await post(mara, `/api/courses/${courseId}/members/${idOf('tomasz@modewright.test')}/role`, { role: 'teaching_assistant' })).status()).toBe(200);
    await mara.context().close();
    await tomasz.context().close();
  });

  it('forms show their problems next to the field, focus the first, and place the server\'s field messages too', async () => {
    const page = await signIn('mara@modewright.test');
    const create = page.getByRole('button', { name: 'Create course' });

    // Checked in the browser by the API's own schema: every field named, focus on the first.
    await create.click();
    await expect.poll(() => descriptionOf(page, 'Title')).toBe('A title needs at least 3 characters');
    expect(await isFocused(page, 'Title')).toBe(true);
    expect(await page.getByLabel('Title', { exact: true }).getAttribute('aria-invalid')).toBe('true');
    expect(await descriptionOf(page, 'Course code')).toMatch(/^As in your timetable \| ./);
    expect(await descriptionOf(page, 'Term')).toMatch(/^e\.g\. Autumn 2027 \| ./);

    // A clash only the server knows (409): its field message sits under the code, which gets focus.
    await page.getByLabel('Title', { exact: true }).fill('Studio again');
    await page.getByLabel('Course code', { exact: true }).fill('dds-301');
    await page.getByLabel('Term', { exact: true }).fill('winter 2027');
    await expect.poll(() => descriptionOf(page, 'Title')).toBe('');
    await create.click();
    await expect.poll(() => descriptionOf(page, 'Course code')).toBe('As in your timetable | You already teach dds-301 in winter 2027');
    await expect.poll(() => isFocused(page, 'Course code')).toBe(true);
    expect(await page.getByLabel('Course code', { exact: true }).getAttribute('aria-invalid')).toBe('true');
    expect(await page.getByRole('alert').count()).toBe(0);

    // Join: the schema's message for a short code, then the server's 404 in a banner.
    await page.getByLabel('Join code', { exact: true }).fill('ab');
    await page.getByRole('button', { name: 'Join course' }).click();
    await expect.poll(() => descriptionOf(page, 'Join code')).toMatch(/\| Enter the join code your instructor gave you$/);
    expect(await isFocused(page, 'Join code')).toBe(true);
    await page.getByLabel('Join code', { exact: true }).fill('nope-0000');
    await page.getByRole('button', { name: 'Join course' }).click();
    await expect.poll(async () => (await page.getByRole('alert').allInnerTexts()).join(' ')).toMatch(/No course has that join code/);
    await page.screenshot({ path: path.join(artifacts, 'course-forms-errors.png'), fullPage: true });

    // Change password: every problem at once, focus on the first; nothing is sent.
    await page.goto('/account');
    await page.getByRole('heading', { name: 'Change password' }).waitFor();
    await page.getByLabel('New password', { exact: true }).fill('short');
    await page.getByLabel('New password again', { exact: true }).fill('shorter');
    await page.getByRole('button', { name: 'Change password' }).click();
    await expect.poll(() => descriptionOf(page, 'Current password')).toBe('Enter your current password');
    expect(await descriptionOf(page, 'New password')).toBe('At least 10 characters. A few unrelated words work well. | A password needs at least 10 characters');
    expect(await descriptionOf(page, 'New password again')).toBe('The two new passwords are not the same');
    expect(await isFocused(page, 'Current password')).toBe(true);

    // A wrong current password comes back from the server (400 with details) next to its field.
    await page.getByLabel('Current password', { exact: true }).fill('not-my-password');
    await page.getByLabel('New password', { exact: true }).fill('a brand new passphrase');
    await page.getByLabel('New password again', { exact: true }).fill('a brand new passphrase');
    await page.getByRole('button', { name: 'Change password' }).click();
    await expect.poll(() => descriptionOf(page, 'Current password')).toBe('Your current password is not right');
    await expect.poll(() => isFocused(page, 'Current password')).toBe(true);
    await page.screenshot({ path: path.join(artifacts, 'change-password-errors.png'), fullPage: true });
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
    // No members table (the assignments list is the only table a student sees), no other member's address, no join code.
    expect(await page.getByRole('heading', { name: 'Members' }).count()).toBe(0);
    expect(await page.getByText(/@modewright\.test/).count()).toBe(0);
    expect(await page.locator('#join-code-value').count()).toBe(0);
    await page.screenshot({ path: path.join(artifacts, 'student-course-page.png'), fullPage: true });

    // Signing out returns to the sign-in page.
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.getByRole('heading', { name: 'Sign in' }).waitFor();
    await page.context().close();
  });
});

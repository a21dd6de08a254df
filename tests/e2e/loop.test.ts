// Browser test of the whole loop on the seeded demo course: a student hands in
// a correct file and a wrong one, a teaching assistant sets the points of a
// flagged one with a comment from the review queue, the instructor releases the
// scores, the student's mail is in the catcher and she then sees her own
// reference values. The built site is served by the real server against the
// seeded e2e database (the runner sets E2E_BASE_URL and MAIL_CATCHER_URL).
// The correct file is the student's own reference (read as staff) written as
// re,im lines; the wrong one is every value halved, which no tolerance of the
// demo assignment accepts. Facts of this project's invented demo data only.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { baseURL, artifacts, launchBrowser, submitSignIn } from './helpers.js';

const catcher = process.env.MAIL_CATCHER_URL ?? 'http://127.0.0.1:5492';
const courseCode = 'DDS-301';
const assignmentTitle = 'Exact DMD of a sensor array';

let browser: Browser;
const failures: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
});

async function signIn(email: string, width = 1280): Promise<Page> {
  const context = await browser.newContext({ baseURL, viewport: { width, height: 900 } });
  const page = await context.newPage();
  page.on('pageerror', (e) => failures.push(`${email}: ${e.message}`));
  await page.goto('/');
  await submitSignIn(page, email);
  await page.getByRole('heading', { name: 'Your courses' }).waitFor();
  return page;
}

async function json<T>(page: Page, url: string): Promise<T> {
  const res = await page.request.get(url);
  expect(res.ok(), `${url} answered ${res.status()}`).toBe(true);
  return (await res.json()) as T;
}

interface Setup {
  courseId: number;
  assignmentId: number;
  student: { userId: number; email: string; displayName: string };
}
let setup: Setup;

describe('the loop in the browser: hand-in, review, release, mail', () => {
  it('a student hands in a file that cannot be read (no attempt used), a correct file and a wrong one, and sees each scored on the complex plane', async () => {
    // Staff side, over the API: the course, the published demo assignment, a student with no attempt on it yet, and her reference.
    const staff = await signIn('mara@modewright.test');
    const { courses } = await json<{ courses: { id: number; code: string }[] }>(staff, '/api/courses');
    const courseId = courses.find((c) => c.code === courseCode)!.id;
    const { assignments } = await json<{ assignments: { id: number; title: string; status: string }[] }>(staff, `/api/courses/${courseId}/assignments`);
    const assignmentId = assignments.find((a) => a.title === assignmentTitle && a.status === 'published')!.id;
    const { members } = await json<{ members: { userId: number; email: string; displayName: string; role: string }[] }>(staff, `/api/courses/${courseId}/members`);
    let student: Setup['student'] | undefined;
    for (const m of members.filter((x) => x.role === 'student')) {
      const { submissions } = await json<{ submissions: unknown[] }>(staff, `/api/courses/${courseId}/assignments/${assignmentId}/submissions?student=${m.userId}`);
      if (submissions.length === 0) {
        student = m;
        break;
      }
    }
    expect(student, 'a demo student who has not handed in the demo assignment yet').toBeDefined();
    setup = { courseId, assignmentId, student: student! };
    const ref = await json<{ status: string; reference: { eigenvalues: { re: number; im: number }[] } }>(
      staff,
      `/api/courses/${courseId}/assignments/${assignmentId}/reference?student=${student!.userId}`,
    );
    expect(ref.status).toBe('ready');
    const good = path.join(artifacts, 'loop-correct.csv');
    const wrong = path.join(artifacts, 'loop-wrong.csv');
    const bad = path.join(artifacts, 'loop-unreadable.csv');
    fs.writeFileSync(good, `re,im\n${ref.reference.eigenvalues.map((v) => `${v.re},${v.im}`).join('\n')}\n`);
    fs.writeFileSync(wrong, `re,im\n${ref.reference.eigenvalues.map((v) => `${v.re / 2},${v.im / 2}`).join('\n')}\n`);
    fs.writeFileSync(bad, 're,im\n0.5,0.1\n0.4,abc\n');
    await staff.context().close();

    const page = await signIn(student!.email);
    await page.goto(`/courses/${courseId}/assignments/${assignmentId}`);
    await page.getByRole('heading', { name: 'Hand in your answer' }).waitFor();
    const attemptsLeft = page.getByTestId('attempts-left');
    const before = await attemptsLeft.innerText();

    const handIn = async (file: string) => {
      await page.getByLabel('Your answer file').setInputFiles(file);
      await page.getByRole('button', { name: 'Hand in this file' }).click();
    };

    // A reader error: shown next to the field with its line and column, and no attempt is used.
    await handIn(bad);
    const readerError = page.getByTestId('reader-error');
    await readerError.waitFor();
    expect(await readerError.innerText()).toMatch(/line 3/);
    expect(await readerError.innerText()).toMatch(/column/);
    expect(await readerError.innerText()).toMatch(/no attempt/i);
    expect(await attemptsLeft.innerText()).toBe(before);
    await page.screenshot({ path: path.join(artifacts, 'loop-reader-error.png'), fullPage: true });

    await handIn(good);
    await page.getByText('Attempt 1 received').waitFor();
    const attempt = (n: number) => page.locator('li', { has: page.locator('summary', { hasText: `Attempt ${n}` }) });
    const scored = (n: number) => expect.poll(() => attempt(n).locator('summary').innerText(), { timeout: 60_000, interval: 500 }).toMatch(/Scored/);
    await scored(1);

    await handIn(wrong);
    await page.getByText('Attempt 2 received').waitFor();
    await scored(2);
    expect(await page.getByRole('heading', { name: 'Your attempts' }).isVisible()).toBe(true);

    // Feedback before release: a picture of her values with the unit circle, never a reference value.
    const open = attempt(2);
    await open.getByRole('img', { name: /on the complex plane/ }).waitFor();
    const text = await page.locator('main').innerText();
    expect(text).toMatch(/provisional until (the course )?staff release/);
    expect(await open.getByRole('columnheader', { name: 'Reference' }).count()).toBe(0);
    expect(await open.getByText(/^(your )?reference value/i).count()).toBe(0);
    expect(text).toMatch(/\d\.\d{4} [+−] \d\.\d{4}i/); // one way of writing complex numbers, real minus sign
    await page.screenshot({ path: path.join(artifacts, 'loop-student-scored.png'), fullPage: true });
    await page.setViewportSize({ width: 420, height: 900 });
    await page.screenshot({ path: path.join(artifacts, 'loop-student-scored-narrow.png'), fullPage: true });
    // Her course page says where she stands: points of her latest attempt, provisional, attempts left.
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.goto(`/courses/${courseId}`);
    const row = page.getByRole('row', { name: /Exact DMD/ }).first();
    await expect.poll(() => row.innerText(), { timeout: 30_000 }).toMatch(/\/ 10 provisional/);
    expect(await row.innerText()).toMatch(/attempt 2(, late)? · \d+ attempts? left/);
    await page.context().close();
  });

  it('a teaching assistant sets the points of a flagged submission from the review queue, with a comment, and the history keeps the autograder row', async () => {
    const { courseId, student } = setup;
    const page = await signIn('tomasz@modewright.test');
    await page.goto(`/courses/${courseId}`);
    await page.getByRole('heading', { name: 'Dashboard' }).waitFor();
    await page.getByRole('link', { name: /Review queue/ }).click();
    await page.getByRole('heading', { name: 'Review queue', level: 1 }).waitFor();
    const item = page.getByRole('listitem').filter({ hasText: student.displayName }).filter({ hasText: assignmentTitle }).first();
    await item.waitFor({ timeout: 30_000 });
    // Each reason in a sentence.
    expect(await item.locator('ul li').first().innerText()).toMatch(/\w+ .+\./);
    await page.screenshot({ path: path.join(artifacts, 'loop-review-queue.png'), fullPage: true });
    await item.getByRole('link', { name: /Review the submission/ }).click();

    const detail = page.getByTestId('submission-detail');
    await detail.waitFor();
    await detail.getByRole('radio', { name: 'Set the points' }).check();
    // The comment is required: without it the form refuses.
    await detail.getByLabel('Points', { exact: true }).fill('7.5');
    await detail.getByRole('button', { name: 'Set the points' }).click();
    await detail.getByText('Setting the points needs the points and a comment').waitFor();
    await detail.getByLabel('Comment (required)').fill('Two values are right but computed from the wrong snapshot window; 7.5 of 10.');
    await detail.getByRole('button', { name: 'Set the points' }).click();
    await detail.getByText('Points set.').waitFor();
    const history = detail.getByRole('table', { name: /Score history/ });
    await expect.poll(() => history.locator('tbody tr').count()).toBeGreaterThanOrEqual(2);
    const rows = await history.innerText();
    expect(rows).toContain('Points set by staff');
    expect(rows).toContain('Scored by the autograder');
    expect(rows).toContain('wrong snapshot window');
    expect(rows).toMatch(/7\.5 \/ 10/);
    await detail.screenshot({ path: path.join(artifacts, 'loop-override.png') });
    await page.context().close();
  });

  it('the instructor releases the scores; the student gets her mail and then sees her own reference values', async () => {
    const { courseId, assignmentId, student } = setup;
    const page = await signIn('mara@modewright.test');
    await page.goto(`/courses/${courseId}/assignments/${assignmentId}`);
    await page.getByRole('button', { name: /Release scores…|Release again…/ }).click();
    const dialog = page.getByRole('dialog', { name: /Release the scores/ });
    await dialog.waitFor();
    expect(await dialog.innerText()).toMatch(/e-mail goes to every student/i);
    await dialog.getByRole('button', { name: 'Release and send the e-mails' }).click();
    await page.getByText(/e-mails? on their way/).waitFor();
    await page.screenshot({ path: path.join(artifacts, 'loop-released.png'), fullPage: true });
    await page.context().close();

    // The mail reaches the catcher (a job sends it, so wait for it).
    await expect
      .poll(
        async () => {
          const res = await fetch(`${catcher}/messages`);
          const { messages } = (await res.json()) as { messages: { to: string[]; subject: string; text: string }[] };
          return messages.filter((m) => m.to.includes(student.email) && /score/i.test(`${m.subject} ${m.text}`)).length;
        },
        { timeout: 60_000, interval: 500 },
      )
      .toBeGreaterThanOrEqual(1);

    const me = await signIn(student.email);
    await me.goto(`/courses/${courseId}/assignments/${assignmentId}`);
    await me.getByText('Staff have released the scores').waitFor();
    // After release: her own reference values next to hers, and the per-part breakdown.
    await me.getByRole('table', { name: /Points per part/ }).first().waitFor();
    expect(await me.locator('main').innerText()).toMatch(/reference value/i);
    expect(await me.getByRole('columnheader', { name: 'Reference' }).count()).toBeGreaterThan(0);
    await me.getByRole('button', { name: 'Ask for a second look…' }).first().waitFor();
    await me.screenshot({ path: path.join(artifacts, 'loop-student-released.png'), fullPage: true });
    await me.context().close();
    expect(failures).toEqual([]);
  });
});

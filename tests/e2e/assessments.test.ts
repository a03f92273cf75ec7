/**
 * Tumour assessments in the browser: the coordinator records assessments on the patient page with
 * the keyboard, reads why the best overall response is what it is and what is still needed
 * (RECIST 1.1, Eisenhauer et al. 2009; 28-day confirmation is common practice), corrects one with
 * a reason, and sees the flag when the entered outcome disagrees; the statistician finds that
 * patient on the Needs attention page. Both pages pass axe-core and are saved as screenshots.
 */
import { rmSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { lockDesignDirectly } from '../support/patient-factories.js';
import { daysFromToday, enrolOne, shiftDate } from '../support/assessment-factories.js';
import { buildClient, launchChromium, screenshot, seriousAccessibilityProblems, signInThroughPages, watchConsole } from '../support/e2e-browser.js';
import { longDate } from '../../server/assessments/derivation.js';

let stack: Stack;
let browser: Browser;
let clientDir: string;
let trial: TrialFixture;
let patient: { id: string; studyId: string };
const ENROLLED = daysFromToday(-150);
const day = (n: number) => shiftDate(ENROLLED, n);

beforeAll(async () => {
  [clientDir, browser] = await Promise.all([buildClient(), launchChromium()]);
  stack = await startStack({ SERVE_CLIENT_FROM: clientDir, RATE_LIMIT_PER_MINUTE: '100000' });
  trial = await createTrial(stack.db, { code: 'E2E-ASSESS', sites: ['RVA', 'HCA'] });
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] });
  patient = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, outcome: 'responder', bestOverallResponse: 'PR', responseAssessedOn: day(56) });
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
  if (clientDir) rmSync(clientDir, { recursive: true, force: true });
});

/** Fills the add form as a keyboard user does: the date typed into the date field, the response chosen, Enter in the notes to submit. */
async function addByKeyboard(page: Page, date: string, response: string) {
  const form = page.getByRole('form', { name: 'Add an assessment' });
  await form.getByLabel('Assessment date').focus();
  const [y, m, d] = date.split('-');
  await page.keyboard.type(`${m}${d}${y}`);
  await form.getByLabel('Overall timepoint response').focus();
  await form.getByLabel('Overall timepoint response').selectOption(response);
  await form.getByLabel('Notes (optional)').focus();
  await page.keyboard.press('Enter');
  await page.getByRole('table', { name: 'Timepoint assessments' }).getByText(longDate(date).replace(/^(\d+) (\w{3})\w* (\d+)$/, '$2 $1, $3')).waitFor();
}

describe('assessments in the browser', () => {
  it('when the coordinator records a PR and then SD, then the panel explains the derivation and flags the entered responder', async () => {
    const context = await browser.newContext({ locale: 'en-US' });
    const page = await context.newPage();
    const problems = watchConsole(page);
    await signInThroughPages(page, stack.url, DEMO.coordinator);
    await page.goto(`${stack.url}/trials/${trial.trialId}/patients/${patient.id}`);
    await page.getByRole('heading', { name: 'Tumour assessments' }).waitFor();

    await addByKeyboard(page, day(56), 'PR');
    await expect.poll(() => page.getByText(`PR on ${longDate(day(56))} needs a confirming assessment on or after ${longDate(day(84))}.`).count()).toBe(1);

    await addByKeyboard(page, day(112), 'SD');
    await page.getByRole('alert').filter({ hasText: 'The entered outcome disagrees with the derivation' }).waitFor();
    await expect.poll(() => page.getByText('under RECIST 1.1 an unconfirmed response counts as stable disease').count()).toBe(1);
    await screenshot(page, 'coordinator-patient-assessments');
    expect(await seriousAccessibilityProblems(page)).toEqual([]);

    await page.getByRole('button', { name: `Correct the assessment of ${day(112)}` }).click();
    const correction = page.getByRole('form', { name: 'Correct the assessment' });
    await correction.getByLabel('Overall timepoint response').selectOption('PR');
    await correction.getByRole('button', { name: 'Save correction' }).click();
    await correction.getByText('Give the reason for the correction.').waitFor();
    await correction.getByLabel('Reason for the correction').fill('Central review read a partial response');
    await correction.getByRole('button', { name: 'Save correction' }).click();
    await correction.waitFor({ state: 'detached' });
    await page.getByText('Best overall response: PR, confirmed.', { exact: false }).waitFor();
    expect(await page.getByRole('alert').filter({ hasText: 'disagrees with the derivation' }).count()).toBe(0);
    expect(problems).toEqual([]);
    await context.close();
  }, 120_000);

  it('when the statistician opens Needs attention, then a late confirmation is listed under its site and the page passes axe-core', async () => {
    const late = await enrolOne(stack.db, trial, { enrolledOn: ENROLLED, site: 'HCA' });
    await stack.db('assessments').insert({ trial_id: trial.trialId, patient_id: late.id, assessed_on: day(30), response: 'PR' });
    const { recomputeDerivation } = await import('../../server/assessments/assessments.service.js');
    await stack.db.transaction((trx) => recomputeDerivation(trx, late.id));

    const context = await browser.newContext({ locale: 'en-US' });
    const page = await context.newPage();
    await signInThroughPages(page, stack.url, DEMO.statistician);
    await page.goto(`${stack.url}/trials/${trial.trialId}/needs-attention`);
    const site = page.getByRole('table', { name: 'Needs attention at HCA' });
    await site.getByRole('link', { name: late.studyId }).first().waitFor();
    await expect.poll(() => site.getByText('Confirmation overdue').count()).toBe(1);
    await screenshot(page, 'statistician-needs-attention-with-items');
    expect(await seriousAccessibilityProblems(page)).toEqual([]);
    await context.close();
  }, 90_000);
});

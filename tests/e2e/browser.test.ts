/**
 * Browser tests: the built client served by the real server, driven in Debian's Chromium. Each
 * demo role signs in through the identity provider's page and sees the navigation its roles
 * open (computed from the client's own feature list); every main page passes axe-core with no
 * serious or critical finding, shows no raw code and no glyph that the shipped Inter does not
 * draw, and is saved as a screenshot in test-artifacts/screens; signing out ends the session.
 * Then the trial's journey through the pages, as far as the pages exist, with the same checks on
 * its pages, and on the mails the catcher received and the report's text at the end.
 */
import { rmSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { eventually, startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type RoleName, type TrialFixture } from '../support/factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import {
  buildClient,
  confirmIdentity,
  launchChromium,
  readableText,
  screenshot,
  seriousAccessibilityProblems,
  signInThroughPages,
  textNotDrawnByInter,
  watchConsole,
} from '../support/e2e-browser.js';
import { rawCodesIn } from '../support/raw-codes.js';
import { namedFonts, pdfPages } from '../support/pdf-text.js';
import { GLYPHS } from '../../server/words/index.js';
import { globalNav, trialNav } from '../../client/src/app/features.js';
import type { NavItem } from '../../client/src/lib/feature.js';
import { IMPORT_COLUMNS } from '../../server/patients/patients.schema.js';

const ROLES = Object.keys(DEMO) as RoleName[];

let stack: Stack;
let browser: Browser;
let clientDir: string;
let trial: TrialFixture;

beforeAll(async () => {
  [clientDir, browser] = await Promise.all([buildClient(), launchChromium()]);
  stack = await startStack({ SERVE_CLIENT_FROM: clientDir, RATE_LIMIT_PER_MINUTE: '100000' });
  trial = await createTrial(stack.db, { code: 'E2E-101', sites: ['RVX', 'HCX'] });
  await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId: trial.cohortIds[0] });
  await enrolPatientsDirectly(stack.db, {
    trialId: trial.trialId,
    cohortId: trial.cohortIds[0],
    siteId: trial.siteIds.RVX,
    patients: [{ outcome: 'responder' }, { outcome: 'non_responder' }, { outcome: 'pending' }, {}],
    firstEnrolledOn: '2026-02-02',
  });
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
  if (clientDir) rmSync(clientDir, { recursive: true, force: true });
});

const visible = (items: NavItem[], roles: string[], outbox: boolean) =>
  items.filter((item) => (!item.roles || item.roles.some((r) => roles.includes(r))) && (!item.devOnly || outbox)).map((item) => item.label);

async function navLabels(page: Page, name: string): Promise<string[]> {
  const nav = page.getByRole('navigation', { name });
  await nav.waitFor();
  return (await nav.getByRole('link').allInnerTexts()).map((t) => t.trim());
}

/** Waits until a page has finished loading its data (no spinner left, network quiet). */
async function settle(page: Page) {
  await page.waitForLoadState('networkidle');
  await page.getByRole('status').filter({ hasText: /^Loading/ }).first().waitFor({ state: 'detached', timeout: 10_000 }).catch(() => undefined);
}

/** Raw codes a person would read on the page, and text the shipped Inter does not draw, labelled. */
async function wordingProblems(page: Page, name: string): Promise<string[]> {
  const codes = rawCodesIn(await readableText(page)).map((found) => `${name}: raw code ${found}`);
  const glyphs = (await textNotDrawnByInter(page)).map((problem) => `${name}: ${problem}`);
  return [...codes, ...glyphs];
}

/** Opens a page, checks it with axe-core and for its words and glyphs, and saves its picture; returns the findings, labelled. */
async function inspect(page: Page, url: string, name: string): Promise<string[]> {
  await page.goto(url);
  await settle(page);
  await screenshot(page, name);
  const accessibility = (await seriousAccessibilityProblems(page)).map((v) => `${name}: ${v.impact} ${v.id} (${v.help}) at ${v.nodes.join(' | ')}`);
  return [...accessibility, ...(await wordingProblems(page, name))];
}

describe('each demo role in the browser', () => {
  it('when the signed-out app is opened, then the sign-in page passes axe-core', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    const problems = await inspect(page, stack.url, 'sign-in');
    await context.close();
    expect(problems).toEqual([]);
  }, 60_000);

  it.each(ROLES)(
    'when %s signs in through the identity provider, then the navigation matches the role, every main page passes axe-core, and sign-out ends the session',
    async (role) => {
      const context: BrowserContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
      const page = await context.newPage();
      const pageErrors = watchConsole(page);
      try {
        await signInThroughPages(page, stack.url, DEMO[role]);
        expect(await navLabels(page, 'Main')).toEqual(visible(globalNav, [role], true));

        const problems: string[] = [];
        for (const item of globalNav.filter((i) => visible([i], [role], true).length > 0)) {
          problems.push(...(await inspect(page, new URL(item.path, stack.url).href, `${role}-${item.label}`)));
        }

        await page.goto(`${stack.url}/trials/${trial.trialId}`);
        expect(await navLabels(page, 'Trial pages')).toEqual(visible(trialNav, [role], true));
        for (const item of trialNav.filter((i) => visible([i], [role], true).length > 0)) {
          const url = `${stack.url}/trials/${trial.trialId}${item.path ? `/${item.path}` : ''}`;
          problems.push(...(await inspect(page, url, `${role}-trial-${item.label}`)));
        }
        expect(problems).toEqual([]);
        expect(pageErrors).toEqual([]);

        await page.getByRole('button', { name: 'Sign out' }).click();
        await page.getByRole('link', { name: /sign in with your organisation account/i }).waitFor({ timeout: 20_000 });
        const me = await context.request.get(`${stack.url}/api/me`);
        expect(me.status()).toBe(401);
      } finally {
        await context.close();
      }
    },
    240_000,
  );

  it('when the glossary is opened, then it lists every glyph of the words module once and Chromium draws each with the shipped Inter', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    try {
      await signInThroughPages(page, stack.url, DEMO.monitor);
      await page.goto(`${stack.url}/glossary`);
      await settle(page);
      const listed = await page.locator('[data-glyph]').evaluateAll((items) => items.map((item) => [item.getAttribute('data-glyph'), item.querySelector('.glyph')?.textContent?.trim()]));
      expect(Object.fromEntries(listed)).toEqual(GLYPHS);
      expect(await textNotDrawnByInter(page, '.glyph')).toEqual([]);
      // The glossary names the denominators the pages use.
      for (const term of ['Counted', 'Decided', 'Evaluable', 'At risk']) await page.getByRole('term').filter({ hasText: new RegExp(`^${term}$`) }).waitFor();
    } finally {
      await context.close();
    }
  }, 60_000);

  it('when a glyph Inter lacks is put on a page, then the glyph check reports it (the check can fail)', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    try {
      await page.goto(`${stack.url}/glossary`);
      await page.getByRole('link', { name: /sign in with your organisation account/i }).waitFor();
      // ⏸ is in no Inter file; ✓ is. The page's own CSS (Inter first) still applies.
      await page.evaluate(() => {
        for (const [glyph, id] of [['⏸', 'lacking'], ['✓', 'drawn']]) {
          const span = document.createElement('span');
          span.id = id;
          span.textContent = glyph;
          document.body.append(span);
        }
      });
      expect((await textNotDrawnByInter(page, '#lacking')).length).toBeGreaterThan(0);
      expect(await textNotDrawnByInter(page, '#drawn')).toEqual([]);
    } finally {
      await context.close();
    }
  }, 60_000);

  it('when sign-in is started with a return address on another site, then the browser still lands on Orrery', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    try {
      await page.goto(`${stack.url}/auth/login?returnTo=${encodeURIComponent('//evil.test/phish')}`);
      await page.getByLabel('E-mail').fill(DEMO.monitor);
      await page.getByLabel('Password').fill('demo');
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForURL((url) => url.origin === new URL(stack.url).origin);
      await page.getByRole('navigation', { name: 'Main' }).waitFor();
      expect(new URL(page.url()).origin).toBe(new URL(stack.url).origin);
    } finally {
      await context.close();
    }
  }, 60_000);
});

describe("the trial's journey through the pages", () => {
  /** The trial the admin creates in the first step; each later step works on it. */
  let journeyTrialId: string;

  it('when the admin sets up a new trial and invites its people, then they are members of it in the roles given', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    try {
      await signInThroughPages(page, stack.url, DEMO.admin);
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'People & sites' }).click();
      await page.getByRole('link', { name: /new trial/i }).click();
      await page.getByLabel('Protocol code').fill('E2E-201');
      await page.getByLabel('Title').fill('Journey trial in recurrent disease');
      await page.getByLabel('Indication').fill('Recurrent test indication');
      await page.getByLabel('Sponsor').fill('Tessaly Bio');
      await page.getByLabel('Planned accrual (patients per month, all sites)').fill('4');
      await page.getByLabel('Start date').fill('2026-03-02');
      for (const [index, code] of ['RVX', 'HCX'].entries()) {
        await page.getByRole('button', { name: 'Add a site' }).click();
        await page.getByLabel(`Site ${index + 1}`, { exact: true }).selectOption({ label: `${code} — ${code} Hospital (Testland)` });
      }
      await screenshot(page, 'journey-1-new-trial');
      await page.getByRole('button', { name: 'Create trial' }).click();
      await page.waitForURL(/\/trials\/[0-9a-f-]{36}\/people$/);
      const trialId = /\/trials\/([0-9a-f-]{36})\//.exec(page.url())![1];
      journeyTrialId = trialId;

      const invitations: Array<[RoleName, string | undefined]> = [
        ['statistician', undefined],
        ['coordinator', 'RVX'],
        ['investigator', 'HCX'],
        ['monitor', undefined],
        ['sponsor', undefined],
      ];
      for (const [role, site] of invitations) {
        await page.getByLabel('E-mail').fill(DEMO[role]);
        await page.getByLabel('Role', { exact: true }).selectOption(role);
        if (site) await page.getByLabel('Site', { exact: true }).selectOption({ label: `${site} — ${site} Hospital` });
        await page.getByRole('button', { name: 'Invite', exact: true }).click();
        await page.getByText(new RegExp(`${DEMO[role].replace('.', '\\.')} is (a member now|invited)`)).waitFor();
      }
      await settle(page);
      await screenshot(page, 'journey-2-people');
      expect(await seriousAccessibilityProblems(page)).toEqual([]);
      expect(await wordingProblems(page, 'journey-people')).toEqual([]);
      expect(pageErrors).toEqual([]);

      const members: Array<{ role: string; email: string; site_id: string | null }> = await stack.db('memberships').where({ trial_id: trialId }).select('role', 'email', 'site_id');
      for (const [role, site] of invitations) {
        expect(members).toContainEqual(expect.objectContaining({ role, email: DEMO[role], site_id: site ? trial.siteIds[site] : null }));
      }
    } finally {
      await context.close();
    }
  }, 120_000);

  it('when the statistician compares designs and locks one, then the signature needs the password entered for it at the identity provider, the locked design is recorded with it and accrual opens', async () => {
    expect(journeyTrialId).toBeDefined();
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    try {
      await signInThroughPages(page, stack.url, DEMO.statistician);
      await page.goto(`${stack.url}/trials/${journeyTrialId}`);
      await page.getByRole('navigation', { name: 'Trial pages' }).getByRole('link', { name: 'Designs' }).click();
      await page.getByLabel('p0', { exact: true }).fill('0.2');
      await page.getByLabel('p1', { exact: true }).fill('0.4');
      await page.getByLabel('α', { exact: true }).fill('0.05');
      await page.getByLabel('β', { exact: true }).fill('0.2');
      await page.getByLabel('Protocol reference').fill('E2E-PRT v1.0');
      await page.getByRole('button', { name: 'Compare designs' }).click();
      await page.getByRole('table', { name: 'Candidate designs' }).waitFor({ timeout: 30_000 });
      await page.getByLabel('Compare Simon optimal').check();
      await page.getByLabel('Compare Simon minimax').check();
      await page.getByRole('region', { name: 'Two designs compared' }).waitFor();
      await settle(page);
      await screenshot(page, 'journey-3-designs');
      expect(await seriousAccessibilityProblems(page)).toEqual([]);
      expect(await wordingProblems(page, 'journey-designs')).toEqual([]);

      // Being signed in is not enough: the signature sends the statistician to the provider to enter the password for it.
      await page.getByRole('button', { name: /^Lock…: Simon optimal/ }).click();
      const dialog = page.getByRole('dialog', { name: 'Lock and sign the design' });
      const meaning = await dialog.getByText(/^I approve this design for protocol E2E-PRT v1\.0/).innerText();
      await dialog.getByLabel('I sign with the meaning stated above.').check();
      await screenshot(page, 'journey-4-sign-dialog');
      const askedAt = Date.now();
      await dialog.getByRole('button', { name: 'Enter your password and sign' }).click();

      await page.waitForURL(/\/interaction\//);
      await page.getByText('Confirm it is you').waitFor();
      await confirmIdentity(page, stack.url, DEMO.statistician);
      const reopened = page.getByRole('dialog', { name: 'Lock and sign the design' });
      await reopened.getByText('You entered your password for this signature').waitFor();
      await reopened.getByLabel('I sign with the meaning stated above.').check();
      await reopened.getByRole('button', { name: 'Sign', exact: true }).click();
      await reopened.waitFor({ state: 'detached' });
      await settle(page);
      await screenshot(page, 'journey-5-design-locked');

      await page.getByRole('button', { name: 'Open accrual' }).click();
      const confirm = page.getByRole('group', { name: 'Confirm opening accrual' });
      await confirm.getByRole('button', { name: 'Confirm' }).click();
      await confirm.waitFor({ state: 'detached' });
      expect(pageErrors).toEqual([]);

      const cohort = await stack.db('cohorts').where({ trial_id: journeyTrialId }).first('id');
      const design = await stack.db('design_versions').where({ cohort_id: cohort.id }).first();
      expect(design).toMatchObject({ version: 1, selection: 'optimal', r1: 3, n1: 13, r: 12, n: 43 });
      const signature = await stack.db('signatures').where({ id: design.signature_id }).first();
      expect(signature).toMatchObject({ signer_email: DEMO.statistician, signer_name: 'Sam Stat', meaning });
      // auth_time has whole seconds: the password was entered after the dialog asked for it.
      expect(new Date(signature.authenticated_at).getTime()).toBeGreaterThanOrEqual(Math.floor(askedAt / 1000) * 1000);
      expect(await stack.db('cohorts').where({ id: cohort.id }).first('status')).toEqual({ status: 'enrolling_stage_1' });
    } finally {
      await context.close();
    }
  }, 120_000);

  it('when the coordinator enrols the stage-1 cohort and records outcomes, one by the form and the rest by CSV import, then accrual pauses for the interim review', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    const problems: string[] = [];
    try {
      await signInThroughPages(page, stack.url, DEMO.coordinator);
      await page.goto(`${stack.url}/trials/${journeyTrialId}`);
      await page.getByRole('navigation', { name: 'Trial pages' }).getByRole('link', { name: 'Patients' }).click();
      await page.getByRole('button', { name: 'Enrol a patient' }).click();
      const enrol = page.getByRole('form', { name: 'Enrol a patient' });
      await enrol.getByLabel('Study ID').fill('RVX-1');
      await enrol.getByLabel('Enrolment date').fill('2026-09-01');
      await enrol.getByRole('button', { name: 'Enrol' }).click();
      const first = await eventually(async (): Promise<{ id: string } | undefined> => stack.db('patients').where({ trial_id: journeyTrialId, study_id: 'RVX-1' }).first('id'));
      await settle(page);
      problems.push(...(await seriousAccessibilityProblems(page)).map((v) => `patients: ${v.id}`));
      problems.push(...(await wordingProblems(page, 'patients')));
      await screenshot(page, 'journey-6-patients');

      await page.goto(`${stack.url}/trials/${journeyTrialId}/patients/${first.id}`);
      const outcome = page.getByRole('form', { name: 'Outcome of RVX-1' });
      await outcome.getByLabel('Outcome', { exact: true }).selectOption('responder');
      await outcome.getByLabel('Best overall response').selectOption('PR');
      await outcome.getByLabel('Date of the response assessment').fill('2026-10-15');
      await outcome.getByRole('button', { name: 'Save the outcome' }).click();
      await outcome.getByRole('status').getByText('Outcome saved.').waitFor();
      problems.push(...(await seriousAccessibilityProblems(page)).map((v) => `patient: ${v.id}`));
      problems.push(...(await wordingProblems(page, 'patient')));
      await screenshot(page, 'journey-7-outcome-form');

      // The other twelve of stage 1 (n1 = 13), with their outcomes, from the site's spreadsheet.
      const rows = Array.from({ length: 12 }, (_, i) => {
        const responder = i % 4 === 0;
        return `RVX-${i + 2},RVX,MAIN,2026-09-${String(i + 2).padStart(2, '0')},${responder ? 'responder,PR' : 'non_responder,SD'},2026-10-20,yes,,`;
      });
      await page.goto(`${stack.url}/trials/${journeyTrialId}/patients/import`);
      await page.getByLabel('CSV file').setInputFiles({ name: 'rvx-stage-1.csv', mimeType: 'text/csv', buffer: Buffer.from([IMPORT_COLUMNS.join(','), ...rows].join('\n') + '\n') });
      await page.getByRole('button', { name: 'Check the file' }).click();
      await page.getByRole('button', { name: 'Import 12 rows' }).click();
      await page.getByText('3 · Imported').waitFor({ timeout: 30_000 });
      await settle(page);
      problems.push(...(await seriousAccessibilityProblems(page)).map((v) => `import: ${v.id}`));
      problems.push(...(await wordingProblems(page, 'import')));
      await screenshot(page, 'journey-8-import');
      expect(problems).toEqual([]);
      expect(pageErrors).toEqual([]);

      const patients = await stack.db('patients').where({ trial_id: journeyTrialId }).select('outcome');
      expect(patients).toHaveLength(13);
      expect(patients.filter((p) => p.outcome === 'responder')).toHaveLength(4);
      expect(await stack.db('cohorts').where({ trial_id: journeyTrialId }).first('status')).toEqual({ status: 'interim_review' });
    } finally {
      await context.close();
    }
  }, 120_000);

  /** The interim data cut the statistician freezes; the committee reviews it. */
  let cutId: string;

  it('when the statistician freezes a data cut at the interim, then the cut page shows the frozen analysis', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    try {
      await signInThroughPages(page, stack.url, DEMO.statistician);
      await page.goto(`${stack.url}/trials/${journeyTrialId}`);
      await page.getByRole('navigation', { name: 'Trial pages' }).getByRole('link', { name: 'Data cuts' }).click();
      await page.getByRole('button', { name: 'Freeze a data cut' }).click();
      await page.waitForURL(/\/data-cuts\/[0-9a-f-]{36}$/);
      cutId = /\/data-cuts\/([0-9a-f-]{36})$/.exec(page.url())![1];
      await settle(page);
      await screenshot(page, 'journey-9-data-cut');
      expect(await seriousAccessibilityProblems(page)).toEqual([]);
      expect(await wordingProblems(page, 'journey-data-cut')).toEqual([]);
      expect(pageErrors).toEqual([]);
      expect(await stack.db('data_cuts').where({ id: cutId }).first('kind')).toEqual({ kind: 'interim' });
    } finally {
      await context.close();
    }
  }, 120_000);

  it('when the monitor reviews the cut and signs "continue", entering the password for it at the identity provider, then the signed recommendation is recorded with the statement shown', async () => {
    expect(cutId).toBeDefined();
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    try {
      await signInThroughPages(page, stack.url, DEMO.monitor);
      await page.goto(`${stack.url}/trials/${journeyTrialId}/data-cuts/${cutId}/review`);
      const form = page.getByRole('form', { name: 'Sign a recommendation' });
      const meaning = form.getByRole('blockquote', { name: 'Meaning of the signature' });
      expect(await meaning.innerText()).toContain('I recommend (your choice) for E2E-201');
      await form.getByLabel('Continue to stage 2').check();
      await form.getByLabel('Rationale').fill('Four responders among thirteen: the futility rule is not met. Continue to stage 2 as planned.');
      const shown = (await meaning.innerText()).trim();
      expect(shown).toContain('I recommend "Continue to stage 2" for E2E-201 cohort MAIN on data cut 1');
      await form.getByRole('note').filter({ hasText: 'Your signature records the committee’s judgement' }).waitFor();
      await settle(page);
      expect(await seriousAccessibilityProblems(page)).toEqual([]);
      expect(await wordingProblems(page, 'journey-committee-review')).toEqual([]);
      await form.getByRole('button', { name: 'Enter your password and sign' }).click();
      await page.waitForURL(/\/interaction\//);
      await confirmIdentity(page, stack.url, DEMO.monitor);
      const back = page.getByRole('form', { name: 'Sign a recommendation' });
      await back.getByText('You entered your password for this signature').waitFor();
      expect(await back.getByLabel('Rationale').inputValue()).toMatch(/^Four responders among thirteen/);
      expect((await back.getByRole('blockquote', { name: 'Meaning of the signature' }).innerText()).trim()).toBe(shown);
      await back.getByRole('button', { name: 'Sign the recommendation' }).click();
      await back.waitFor({ state: 'detached' });
      await settle(page);
      await screenshot(page, 'journey-10-committee-review');
      expect(pageErrors).toEqual([]);
      const recommendation = await stack.db('recommendations').where({ data_cut_id: cutId }).first();
      expect(recommendation).toMatchObject({ decision: 'continue' });
      expect(await stack.db('signatures').where({ id: recommendation.signature_id }).first()).toMatchObject({ meaning: shown, signer_name: 'Mona Monitor' });
    } finally {
      await context.close();
    }
  }, 120_000);

  it('when the statistician applies the decision, then accrual resumes for stage 2', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    try {
      await signInThroughPages(page, stack.url, DEMO.statistician);
      await page.goto(`${stack.url}/trials/${journeyTrialId}/data-cuts/${cutId}/review`);
      const form = page.getByRole('form', { name: 'Apply the decision' });
      await form.getByRole('note').filter({ hasText: 'Apply only what the data monitoring committee recommended' }).waitFor();
      await form.getByLabel('Decision').selectOption('resume_stage_2');
      await form.getByLabel('Reason').fill('The committee recommends continuing; stage 2 opens as the protocol plans.');
      await form.getByRole('button', { name: 'Apply the decision' }).click();
      await eventually(async () => (await stack.db('cohorts').where({ trial_id: journeyTrialId }).first('status')).status === 'enrolling_stage_2', 20_000);
      await settle(page);
      await screenshot(page, 'journey-11-decision');
      expect(pageErrors).toEqual([]);
    } finally {
      await context.close();
    }
  }, 120_000);

  it('when the sponsor signs in, then Portfolio and the Trial overview show the figures the decision released, under the cut’s date, and Accrual shows the trial', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const pageErrors = watchConsole(page);
    try {
      await signInThroughPages(page, stack.url, DEMO.sponsor);
      await settle(page);
      await page.getByRole('main').getByText('E2E-201').first().waitFor();
      await page.getByRole('main').getByText(/naive, as of the data cut of \d{1,2} [A-Z][a-z]+ \d{4}/).first().waitFor();
      await screenshot(page, 'journey-12-portfolio');
      await page.goto(`${stack.url}/trials/${journeyTrialId}`);
      await page.getByRole('heading', { name: /^Released figures, as of the data cut of / }).waitFor();
      expect(await page.getByText('Live response figures reach sponsors only where the locked design allows it', { exact: false }).count()).toBe(1);
      await screenshot(page, 'journey-12b-overview');
      expect(await seriousAccessibilityProblems(page)).toEqual([]);
      await page.getByRole('navigation', { name: 'Trial pages' }).getByRole('link', { name: 'Accrual' }).click();
      await settle(page);
      await screenshot(page, 'journey-13-accrual');
      expect(await seriousAccessibilityProblems(page)).toEqual([]);
      expect(await wordingProblems(page, 'journey-accrual')).toEqual([]);
      expect(pageErrors).toEqual([]);
    } finally {
      await context.close();
    }
  }, 120_000);

  it('when the journey is over, then no mail the catcher received and no line of the cut’s report carries a raw code, and the report is set in Inter', async () => {
    expect(cutId).toBeDefined();
    const mails = await eventually(() => {
      const caught = stack.catcher.messages.filter((m) => m.subject.includes('E2E-201'));
      return caught.some((m) => /recommendation was signed/.test(m.subject)) && caught.some((m) => /resume accrual for stage 2/i.test(m.subject)) ? caught : undefined;
    }, 20_000);
    expect(mails.flatMap((m) => rawCodesIn(`${m.subject}\n${m.text}`).map((found) => `${m.subject}: ${found}`))).toEqual([]);
    const signed = mails.find((m) => /recommendation was signed/.test(m.subject));
    expect(signed?.text).toContain('A signed recommendation is not yet a decision');

    const statistician = await stack.signIn(DEMO.statistician);
    const report = await statistician.get(`/api/data-cuts/${cutId}/report.pdf`).buffer(true).parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => done(null, Buffer.concat(chunks)));
    });
    expect(report.status).toBe(200);
    const pages = await pdfPages(report.body as Buffer);
    expect(rawCodesIn(pages.join('\n'))).toEqual([]);
    expect(namedFonts(report.body as Buffer).every((name) => /^[A-Z]{6}\+Inter-/.test(name))).toBe(true);
    expect(pages[0].replace(/\s+/g, ' ')).toContain('Decision support only');
  }, 60_000);
});

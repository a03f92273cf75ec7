import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import type { Session } from '../support/sign-in.js';
import { arrangeCohort, freezeCutDirectly, outcomes } from '../support/data-cut-factories.js';
import { enrolPatientsDirectly } from '../support/patient-factories.js';
import {
  adjustPValues,
  binomialTest,
  cohortVerdict,
  heterogeneity,
  operatingCharacteristics,
  posteriorProbability,
  predictiveProbability,
  proportionInterval,
} from '../../server/stats/index.js';
import { fig } from '../../server/data-cuts/report/pdf.js';
import { pdfPages } from '../support/pdf-text.js';

let stack: Stack;
let sam: Session;
let mona: Session;

beforeAll(async () => {
  stack = await startStack();
  sam = await stack.signIn(DEMO.statistician);
  mona = await stack.signIn(DEMO.monitor);
});
afterAll(async () => stack?.close());

/** The report's bytes as a session downloads them. */
function downloadReport(session: Session, cutId: string) {
  return session.get(`/api/data-cuts/${cutId}/report.pdf`).buffer(true).parse((res, done) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => done(null, Buffer.concat(chunks)));
  });
}

/** A cohort whose interim cut has 3 responders among the first 13 and patients 14–15 enrolled at risk (1 responder). */
async function atRiskTrial(): Promise<{ trial: TrialFixture; cohortId: string }> {
  const trial = await createTrial(stack.db);
  const { cohortId } = await arrangeCohort(stack.db, trial, { design: { interimAccrual: 'continue_at_risk' }, patients: { SA: [...outcomes(3, 10), ...outcomes(1, 1)] } });
  return { trial, cohortId };
}

async function stage1Trial(): Promise<{ trial: TrialFixture; cohortId: string }> {
  const trial = await createTrial(stack.db);
  // Simon optimal 3/13, 12/43 (p0 0.20, p1 0.40): 4 responders among 13 pass stage 1.
  const { cohortId } = await arrangeCohort(stack.db, trial, { patients: { SA: outcomes(3, 5), SB: outcomes(1, 4) } });
  return { trial, cohortId };
}

describe('freezing a data cut', () => {
  it('when the statistician freezes an interim cut, then it has an id, a content hash and the open counts at the cut', async () => {
    const { trial, cohortId } = await stage1Trial();
    await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SA, count: 2 });
    const response = await sam.post(`/api/trials/${trial.trialId}/data-cuts`, { cohortId, kind: 'interim' });
    expect(response.status).toBe(201);
    expect(response.body.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(response.body.contentHash).toMatch(/^[0-9a-f]{64}$/);
    expect(response.body.dataCut.counts).toEqual({ patients: 15, pending: 2, unattested: 13, flagged: 0, notEvaluable: 0 });
    const copies = await stack.db('data_cut_patients').where({ data_cut_id: response.body.id }).count({ n: '*' }).first();
    expect(Number(copies?.n)).toBe(15);
    const audit = await stack.db('audit_log').where({ entity_type: 'data_cut', entity_id: response.body.id, action: 'frozen' }).first();
    expect(audit?.after.contentHash).toBe(response.body.contentHash);
  });

  it('when the kind is missing or the cohort belongs elsewhere, then 400 and nothing is written', async () => {
    const { trial } = await stage1Trial();
    const other = await createTrial(stack.db);
    expect((await sam.post(`/api/trials/${trial.trialId}/data-cuts`, {})).status).toBe(400);
    const foreign = await sam.post(`/api/trials/${trial.trialId}/data-cuts`, { cohortId: other.cohortIds[0], kind: 'interim' });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields.cohortId).toBeTruthy();
    expect(await stack.db('data_cuts').where({ trial_id: trial.trialId }).first()).toBeUndefined();
  });

  it('when the monitor lists the cuts, then each shows its counts and how many members signed; the sponsor and coordinator get 403', async () => {
    const { trial } = await stage1Trial();
    await freezeCutDirectly(stack.db, trial);
    const list = await mona.get(`/api/trials/${trial.trialId}/data-cuts`);
    expect(list.status).toBe(200);
    expect(list.body.dataCuts).toEqual([expect.objectContaining({ seq: 1, kind: 'interim', recommendationCount: 0 })]);
    expect(list.body.committeeSize).toBe(1);
    for (const email of [DEMO.sponsor, DEMO.coordinator]) {
      const other = await stack.signIn(email);
      expect((await other.get(`/api/trials/${trial.trialId}/data-cuts`)).status).toBe(403);
      expect((await other.post(`/api/trials/${trial.trialId}/data-cuts`, { kind: 'interim' })).status).toBe(403);
    }
  });
});

describe('a frozen cut does not move', () => {
  it('when rows are added to a frozen cut after the transaction that made it, then the database refuses them', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const row = await stack.db('data_cut_patients').where({ data_cut_id: cut.id }).first();
    await expect(stack.db('data_cut_patients').insert({ ...row, patient_id: '00000000-0000-4000-8000-00000000beef', study_id: 'SA-999', enrolment_seq: 999 })).rejects.toThrow(/is frozen: its rows are written only when it is made/);
    const event = { data_cut_id: cut.id, adverse_event_id: '00000000-0000-4000-8000-00000000cafe' };
    await expect(stack.db('data_cut_adverse_events').insert(event)).rejects.toThrow(/is frozen/);
    await expect(stack.db('data_cuts').where({ id: cut.id }).update({ made_in_transaction: stack.db.raw('pg_current_xact_id()') })).rejects.toThrow(/cannot change/);
    expect((await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis.integrity.intact).toBe(true);
  });

  it('when a frozen row is changed behind the append-only triggers, then the signed report re-reads the content and says it no longer matches', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    expect((await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis.integrity.intact).toBe(true);
    await stack.db.transaction(async (trx) => {
      await trx.raw('alter table data_cut_patients disable trigger data_cut_patients_append_only');
      await trx('data_cut_patients').where({ data_cut_id: cut.id, outcome: 'non_responder' }).limit(1).update({ outcome: 'responder' });
      await trx.raw('alter table data_cut_patients enable trigger data_cut_patients_append_only');
    });
    const report = await downloadReport(sam, cut.id);
    expect(report.status).toBe(200);
    const text = (await pdfPages(report.body as Buffer)).join(' ').replace(/\s+/g, ' ');
    expect(text).toMatch(/Snapshot intact when this report was made: NO/);
    // And the page's next read after the report re-verified says the same.
    expect((await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis.integrity.intact).toBe(false);
  });

  it('when a patient is corrected after the cut, then the cut’s analysis, hash and numbers are unchanged', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const before = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis;
    const patient = await stack.db('patients').where({ cohort_id: cohortId, site_id: trial.siteIds.SA, outcome: 'non_responder' }).first();
    const cora = await stack.signIn(DEMO.coordinator);
    const corrected = await cora.patch(`/api/trials/${trial.trialId}/patients/${patient.id}`, {
      version: patient.version,
      outcome: 'responder',
      bestOverallResponse: 'CR',
      responseAssessedOn: patient.response_assessed_on,
      evaluable: true,
      reason: 'Source verification: the scan read as CR.',
    });
    expect(corrected.status, JSON.stringify(corrected.body)).toBe(200);
    const after = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis;
    expect(after.integrity).toEqual({ contentHash: cut.contentHash, recomputedHash: cut.contentHash, intact: true });
    expect(after.cohorts).toEqual(before.cohorts);
    expect(after.cohorts[0].responseRate.responders).toBe(4);
    const second = await freezeCutDirectly(stack.db, trial, { cohortId });
    expect(second.contentHash).not.toBe(cut.contentHash);
  });

  it('when anyone tries to change or delete the frozen copy, then the database refuses', async () => {
    const { trial } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial);
    await expect(stack.db('data_cut_patients').where({ data_cut_id: cut.id }).update({ outcome: 'responder' })).rejects.toThrow(/append-only/);
    await expect(stack.db('data_cut_patients').where({ data_cut_id: cut.id }).delete()).rejects.toThrow(/append-only/);
    await expect(stack.db('data_cuts').where({ id: cut.id }).update({ content_hash: 'x' })).rejects.toThrow(/frozen/);
    await expect(stack.db('data_cuts').where({ id: cut.id }).delete()).rejects.toThrow(/not allowed/);
  });
});

describe('the analysis of a cut', () => {
  it('when stage 1 is complete, then every figure is the statistics engine’s on the cut’s counts', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const { analysis } = (await mona.get(`/api/data-cuts/${cut.id}/analysis`)).body;
    const c = analysis.cohorts[0];
    expect(c.counts).toMatchObject({ enrolled: 13, decided: 13, responders: 4 });
    expect(c.responseRate.clopperPearson).toEqual(proportionInterval(4, 13, { method: 'clopper-pearson' }));
    expect(c.responseRate.wilson).toEqual(proportionInterval(4, 13, { method: 'wilson' }));
    expect(c.responseRate.jeffreys).toEqual(proportionInterval(4, 13, { method: 'jeffreys' }));
    expect(c.exactTest.pValue).toBe(binomialTest(4, 13, 0.2, { alternative: 'greater' }).pValue);
    expect(c.rule).toMatchObject(cohortVerdict({ r1: 3, n1: 13, r: 12, n: 43, p0: 0.2, alpha: 0.05 }, { stage1: c.counts.stage1, stage2: c.counts.stage2 }, 'stage-1'));
    expect(c.rule).toMatchObject({ applied: 'stage1', decision: 'continue', atRisk: 0 });
    const prior = { a: 0.2, b: 0.8 };
    expect(c.bayes.prior).toEqual({ ...prior, source: 'default' });
    expect(c.bayes.posteriorProbability).toBe(posteriorProbability({ x: 4, n: 13, p0: 0.2, prior }));
    expect(c.bayes.predictiveProbability).toBe(predictiveProbability({ x: 4, n: 13, nmax: 43, p0: 0.2, thetaT: 0.9, prior }));
    expect(c.sites.map((s: { siteCode: string }) => s.siteCode)).toEqual(['SA', 'SB']);
    expect(c.sites[0].ci).toEqual(proportionInterval(3, 8));
    const het = heterogeneity([
      [3, 5],
      [1, 4],
    ]);
    expect(c.heterogeneity).toEqual({ ...het, sites: 2 });
    expect(c.inference).toBeNull();
    expect(c.deviation).toBeNull();
    expect(c.boundaries[12]).toEqual({ evaluable: 13, futility: 3, success: 4 });
    expect(c.path.at(-1)).toEqual({ evaluable: 13, responders: 4 });
    expect(analysis.openIssues.filter((i: { issue: string }) => i.issue === 'unattested_outcome')).toHaveLength(13);
    expect(analysis.cautions.join(' ')).toMatch(/Decision support only/);
  });

  it('when responders rest on derived outcomes, then the analysis says how many', async () => {
    const trial = await createTrial(stack.db);
    const { cohortId, patientIds } = await arrangeCohort(stack.db, trial, { patients: { SA: outcomes(3, 2) } });
    await stack.db('patients').whereIn('id', patientIds.slice(0, 2)).update({ derived_responder: true, derived_best_overall_response: 'PR' });
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const { analysis } = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body;
    expect(analysis.cohorts[0].responderSources).toEqual({ derived: 2, entered: 1 });
  });

  it('when stage 1 over-ran at the interim, then stage 1 is still the first n1 patients, the later ones are counted as enrolled at risk and no threshold is adjusted', async () => {
    const trial = await createTrial(stack.db);
    // 16 patients at the interim instead of n1 = 13: 4 responders among the first 13.
    const { cohortId } = await arrangeCohort(stack.db, trial, { patients: { SA: outcomes(4, 12) } });
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const { analysis } = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body;
    const c = analysis.cohorts[0];
    expect(c.counts.stage1).toMatchObject({ counted: 13, responders: 4 });
    expect(c.rule).toMatchObject({ applied: 'stage1', decision: 'continue', atRisk: 3, threshold: { r: 3, n: 13, source: 'planned' } });
    expect(c.rule.atRiskNote).toMatch(/^3 patients counted beyond the first n1 = 13 are stage-2 patients enrolled at risk/);
    expect(c.deviation).toBeNull();
    expect(JSON.stringify(c)).not.toMatch(/r1′|adjusted/i);
  });

  it('when a final cut of a finished two-stage cohort is analysed, then the stage-wise inference sits beside the naive figures with its caution', async () => {
    const trial = await createTrial(stack.db);
    const { cohortId } = await arrangeCohort(stack.db, trial, { patients: { SA: [...outcomes(4, 9), ...outcomes(10, 20)] } });
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId, kind: 'final' });
    const { analysis } = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body;
    const c = analysis.cohorts[0];
    expect(c.inference).toMatchObject({ x1: 4, n1: 13, x2: 10, n2Actual: 30, sensitivity: null });
    expect(c.inference.naiveEstimate).toBeCloseTo(14 / 43, 12);
    expect(c.rule).toMatchObject({ look: 'final', decision: 'promising', threshold: { r: 12, n: 43, source: 'planned' } });
    expect(c.rule.finalTest.pValue).toBe(c.inference.pValue);
    expect(c.deviation).toBeNull();
    expect(c.cautions.join(' ')).toMatch(/naive figures ignore the stopping rule/);
  });

  it('when the trial has several cohorts, then each is tested against its own p0 with Holm and BH adjusted p-values', async () => {
    const trial = await createTrial(stack.db, { cohorts: ['A', 'B', 'C'] });
    await arrangeCohort(stack.db, trial, { cohortIndex: 0, design: { p0: 0.1, p1: 0.3, r1: 1, n1: 10, r: 5, n: 29 }, patients: { SA: outcomes(4, 6) } });
    await arrangeCohort(stack.db, trial, { cohortIndex: 1, design: { p0: 0.2, p1: 0.4 }, patients: { SA: outcomes(2, 11) } });
    await arrangeCohort(stack.db, trial, { cohortIndex: 2, design: { p0: 0.1, p1: 0.3, r1: 1, n1: 10, r: 5, n: 29 }, patients: { SB: outcomes(1, 9) } });
    const cut = await freezeCutDirectly(stack.db, trial);
    const { analysis } = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body;
    const ps = [binomialTest(4, 10, 0.1, { alternative: 'greater' }).pValue, binomialTest(2, 13, 0.2, { alternative: 'greater' }).pValue, binomialTest(1, 10, 0.1, { alternative: 'greater' }).pValue];
    expect(analysis.multiplicity.rows.map((r: { code: string }) => r.code)).toEqual(['A', 'B', 'C']);
    expect(analysis.multiplicity.rows.map((r: { pValue: number }) => r.pValue)).toEqual(ps);
    expect(analysis.multiplicity.rows.map((r: { basis: string }) => r.basis)).toEqual(['exact-binomial', 'exact-binomial', 'exact-binomial']);
    expect(analysis.multiplicity.rows.map((r: { holm: number }) => r.holm)).toEqual(adjustPValues(ps, 'holm'));
    expect(analysis.multiplicity.rows.map((r: { bh: number }) => r.bh)).toEqual(adjustPValues(ps, 'bh'));
    expect(cut.snapshot.cohorts.map((c) => c.design?.p0)).toEqual([0.1, 0.2, 0.1]);
  });
});

describe('the prior of the Bayesian figures', () => {
  it('when the statistician saves a prior, then the analysis uses it; a stale version gets 409; a monitor cannot change it', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const saved = await sam.patch(`/api/data-cuts/${cut.id}/prior`, { a: 1, b: 1, thetaT: 0.95, version: cut.version });
    expect(saved.status).toBe(200);
    expect(saved.body.dataCut.prior).toEqual({ a: 1, b: 1, thetaT: 0.95 });
    const { analysis } = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body;
    expect(analysis.prior.source).toBe('saved');
    expect(analysis.cohorts[0].bayes.posteriorProbability).toBe(posteriorProbability({ x: 4, n: 13, p0: 0.2, prior: { a: 1, b: 1 } }));
    expect(analysis.integrity.intact).toBe(true);
    const stale = await sam.patch(`/api/data-cuts/${cut.id}/prior`, { a: 2, b: 2, thetaT: 0.9, version: cut.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current.prior).toEqual({ a: 1, b: 1, thetaT: 0.95 });
    expect((await mona.patch(`/api/data-cuts/${cut.id}/prior`, { a: 2, b: 2, thetaT: 0.9, version: 2 })).status).toBe(403);
    const half = await sam.patch(`/api/data-cuts/${cut.id}/prior`, { a: 2, b: null, thetaT: 0.9, version: 2 });
    expect(half.status).toBe(400);
  });

  it('when a prior is tried in the query, then only that answer uses it', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const tried = (await mona.get(`/api/data-cuts/${cut.id}/analysis?a=0.5&b=0.5&thetaT=0.8`)).body.analysis;
    expect(tried.cohorts[0].bayes.prior).toEqual({ a: 0.5, b: 0.5, source: 'request' });
    expect(tried.cohorts[0].bayes.thetaT).toBe(0.8);
    expect((await mona.get(`/api/data-cuts/${cut.id}/analysis?a=-1&b=1`)).status).toBe(400);
    expect((await mona.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis.prior.source).toBe('default');
  });
});

describe('the report', () => {
  it('when the report is downloaded twice, then the bytes are the same, the hash is stored and its figures are the engine’s', async () => {
    const { trial, cohortId } = await stage1Trial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const first = await downloadReport(mona, cut.id);
    expect(first.status).toBe(200);
    expect(first.headers['content-type']).toBe('application/pdf');
    const bytes = first.body as Buffer;
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    const hash = createHash('sha256').update(bytes).digest('hex');
    expect(first.headers['x-report-sha256']).toBe(hash);
    const second = await downloadReport(sam, cut.id);
    expect(createHash('sha256').update(second.body as Buffer).digest('hex')).toBe(hash);
    expect((await stack.db('data_cut_reports').where({ data_cut_id: cut.id })).map((r) => r.sha256)).toEqual([hash]);

    const text = (await pdfPages(bytes)).join('\n');
    const cp = proportionInterval(4, 13);
    expect(text).toContain(fig.ci(cp));
    expect(text).toContain(fig.ci(proportionInterval(4, 13, { method: 'wilson' })));
    expect(text).toContain(fig.ci(proportionInterval(4, 13, { method: 'jeffreys' })));
    expect(text).toContain(fig.p(binomialTest(4, 13, 0.2, { alternative: 'greater' }).pValue));
    expect(text).toContain(fig.dec(posteriorProbability({ x: 4, n: 13, p0: 0.2, prior: { a: 0.2, b: 0.8 } }), 4));
    expect(text).toContain(cut.contentHash);
    expect(text).toMatch(/Decision support only/);
    expect(text).toMatch(/Futility boundary/);
  });

  it('when a cut has patients enrolled at risk, then the report says how many and states how verdicts are reached', async () => {
    const { trial, cohortId } = await atRiskTrial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const text = (await pdfPages((await downloadReport(sam, cut.id)).body as Buffer)).join(' ').replace(/\s+/g, ' ');
    expect(text).toMatch(/The futility rule is met: stage 1 ended with 3 responders among its 13 patients/);
    expect(text).toMatch(/2 patients counted beyond the first n1 = 13 are stage-2 patients enrolled at risk/);
    expect(text).toMatch(/How verdicts are reached/);
    expect(text).toMatch(/1\. Stage 1 is the first n1 counting patients in enrolment order/);
    expect(text).not.toMatch(/Adjusted thresholds/);
  });
});

describe('exports', () => {
  it('when the cut is exported, then formula-like cells are neutralised and the response dataset carries the CDISC names', async () => {
    const trial = await createTrial(stack.db);
    const { cohortId } = await arrangeCohort(stack.db, trial, {
      patients: { SA: [{ outcome: 'responder', studyId: '=HYPERLINK("http://x")' }, { outcome: 'non_responder', evaluable: false, notEvaluableReason: '+cmd|calc' }, {}] },
    });
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const patients = await sam.get(`/api/data-cuts/${cut.id}/export.csv`);
    expect(patients.status).toBe(200);
    expect(patients.headers['content-type']).toMatch(/text\/csv/);
    expect(patients.text).toContain(`"'=HYPERLINK(""http://x"")"`);
    expect(patients.text).toContain("'+cmd|calc");
    expect(patients.text).not.toMatch(/(^|,)[=+@]/m);

    const adrs = await mona.get(`/api/data-cuts/${cut.id}/adrs.csv`);
    expect(adrs.status).toBe(200);
    const [header, ...rows] = adrs.text.trim().split('\r\n');
    expect(header.split(',')).toEqual(expect.arrayContaining(['STUDYID', 'USUBJID', 'SITEID', 'PARAMCD', 'PARAM', 'AVALC', 'AVAL', 'ADT', 'ANL01FL']));
    expect(rows).toHaveLength(6);
    const columns = header.split(',');
    const resp = rows.map((r) => r.split(',')).filter((r) => r[columns.indexOf('PARAMCD')] === 'RESP');
    expect(resp.map((r) => r[columns.indexOf('AVALC')])).toEqual(['Y', 'N', '']);
    expect(resp.map((r) => r[columns.indexOf('ANL01FL')])).toEqual(['Y', 'Y', '']);
    expect(adrs.text).not.toMatch(/(^|,)[=+@]/m);
    const same = await sam.get(`/api/data-cuts/${cut.id}/export.csv?dataset=adrs`);
    expect(same.text).toBe(adrs.text);
  });

  it('when a cut has patients enrolled at risk, then the exports mark them in stage 2 and leave them out of the primary analysis flag', async () => {
    const { trial, cohortId } = await atRiskTrial();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const [header, ...rows] = (await sam.get(`/api/data-cuts/${cut.id}/export.csv`)).text.trim().split('\r\n');
    const columns = header.split(',');
    const cells = rows.map((r) => r.split(','));
    expect(cells.map((r) => r[columns.indexOf('stage')])).toEqual([...Array(13).fill('1'), '2', '2']);
    expect(cells.map((r) => r[columns.indexOf('enrolled_at_risk')])).toEqual([...Array(13).fill('false'), 'true', 'true']);
    const adrs = (await sam.get(`/api/data-cuts/${cut.id}/adrs.csv`)).text.trim().split('\r\n');
    const adrsColumns = adrs[0].split(',');
    const resp = adrs.slice(1).map((r) => r.split(',')).filter((r) => r[adrsColumns.indexOf('PARAMCD')] === 'RESP');
    expect(resp.map((r) => r[adrsColumns.indexOf('ANL01FL')])).toEqual([...Array(13).fill('Y'), '', '']);
  });
});

describe('a single-stage design', () => {
  it('when a final cut has fewer patients than n, then the rule and the deviation use the attained size and its exact threshold', async () => {
    const trial = await createTrial(stack.db);
    const { cohortId } = await arrangeCohort(stack.db, trial, { design: { r1: null, n1: null, r: 9, n: 35 }, patients: { SA: outcomes(8, 22) } });
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId, kind: 'final' });
    const c = (await sam.get(`/api/data-cuts/${cut.id}/analysis`)).body.analysis.cohorts[0];
    // The smallest r with P(X > r | 30, 0.2) ≤ 0.05, from the exact binomial tail.
    const r = [...Array(30).keys()].find((k) => binomialTest(k + 1, 30, 0.2, { alternative: 'greater' }).pValue <= 0.05) as number;
    expect(c.deviation).toMatchObject({ plannedN: 35, attainedN: 30, attainedN1: null, applied: { r1: null, r } });
    expect(c.deviation.applied.characteristics.typeIError).toBe(operatingCharacteristics({ r, n: 30 }, [0.2])[0].probPromising);
    expect(c.deviation.applied.characteristics.typeIError).toBeLessThanOrEqual(0.05);
    expect(c.rule).toMatchObject({ applied: 'final', look: 'final', threshold: { r, n: 30, source: 'attained' } });
    expect(c.rule.message).not.toMatch(/remain/);
    expect(c.inference).toBeNull();
  });
});

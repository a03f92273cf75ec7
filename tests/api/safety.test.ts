/**
 * Safety over HTTP: the two stateless calculations (Bryant & Day 1995, Biometrics 51:1372–1383;
 * Ivanova, Qaqish & Schell 2005, Biometrics 61:540–545), a design locked with a safety rule, the
 * live safety state (its SQL counts against the patient-by-patient derivation), and the rule
 * enforced: crossing the boundary or the Bryant–Day stage-1 toxicity limit pauses accrual in the
 * same transaction and mails the statisticians and the committee; accrual resumes only through a
 * committee recommendation and the statistician's decision, or the cohort stops for safety.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, eventually, type Stack } from '../support/stack.js';
import { DEMO, addMember, createTrial, type TrialFixture } from '../support/factories.js';
import { daysFromToday, shiftDate } from '../support/assessment-factories.js';
import { enrolPatientsDirectly, lockDesignDirectly } from '../support/patient-factories.js';
import { lockBody } from '../support/design-factories.js';
import { addEventsDirectly, lockSafetyDesignDirectly, type DirectEvent } from '../support/safety-factories.js';
import type { Session } from '../support/sign-in.js';
import { bryantDayCharacteristics, proportionInterval, toxicityBoundary } from '../../server/stats/index.js';
import { safetyCounts } from '../../server/safety/safety.repository.js';
import { countToxicities, deriveToxicity } from '../../server/safety/toxicity.js';

let stack: Stack;
let cora: Session; // coordinator at SA
let sam: Session; // statistician
let mona: Session; // monitor
let ada: Session; // admin
let spencer: Session; // sponsor
let ivan: Session; // investigator at SB

beforeAll(async () => {
  stack = await startStack();
  [cora, sam, mona, ada, spencer, ivan] = await Promise.all(
    [DEMO.coordinator, DEMO.statistician, DEMO.monitor, DEMO.admin, DEMO.sponsor, DEMO.investigator].map((email) => stack.signIn(email)),
  );
}, 120_000);
afterAll(async () => stack?.close());

const PAPER = { pR0: 0.3, pR1: 0.5, toxAcceptable: 0.2, toxUnacceptable: 0.4, alphaR: 0.15, alphaT: 0.15, beta: 0.15, nmax: 45 };

describe('the stateless safety calculations', () => {
  let trial: TrialFixture;
  beforeAll(async () => {
    trial = await createTrial(stack.db);
  });
  const post = (session: Session, path: string, body: unknown) => session.post(`/api/trials/${trial.trialId}/${path}`, body);

  it('when the statistician asks for the Bryant–Day designs of the worked example, then both come back in exactly the agreed shape', async () => {
    const res = await post(sam, 'safety-designs', PAPER);
    expect(res.status).toBe(200);
    expect(Object.keys(res.body).sort()).toEqual(['minimax', 'optimal']);
    for (const design of [res.body.optimal, res.body.minimax]) {
      expect(Object.keys(design).sort()).toEqual(['alphaR', 'alphaT', 'expectedN', 'n', 'n1', 'power', 'r', 'r1', 't', 't1']);
      expect(Object.keys(design.expectedN).sort()).toEqual(['highToxicity', 'poorResponse']);
      expect(design.alphaR).toBeLessThanOrEqual(0.15);
      expect(design.alphaT).toBeLessThanOrEqual(0.15);
      expect(design.power).toBeGreaterThanOrEqual(0.85);
    }
    // Bryant & Day (1995), worked example: n1 19, n 33, response cut-offs 5 and 12; the toxicity
    // cut-offs 7 and 10 as the statistics engine's test confirms them against an open implementation.
    expect(res.body.optimal).toMatchObject({ n1: 19, r1: 5, t1: 7, n: 33, r: 12, t: 10 });
  });

  it('when a setting is out of range, missing or inconsistent, then 400 names the field', async () => {
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ ...PAPER, pR1: 0.25 }, 'pR1'],
      [{ ...PAPER, toxUnacceptable: 0.1 }, 'toxUnacceptable'],
      [{ ...PAPER, alphaT: 1.5 }, 'alphaT'],
      [{ ...PAPER, beta: undefined }, 'beta'],
      [{ ...PAPER, nmax: 12.5 }, 'nmax'],
    ];
    for (const [body, field] of cases) {
      const res = await post(sam, 'safety-designs', body);
      expect(res.status, field).toBe(400);
      expect(Object.keys(res.body.error.fields), field).toContain(field);
    }
  });

  it('when the search would take too long, then it is refused with the limit; settings no design can meet are refused on nmax', async () => {
    const tooBig = await post(sam, 'safety-designs', { ...PAPER, nmax: 151 });
    expect(tooBig.status).toBe(400);
    expect(tooBig.body.error.fields.nmax).toMatch(/at most 150/);
    const none = await post(sam, 'safety-designs', { ...PAPER, nmax: 12 });
    expect(none.status).toBe(400);
    expect(none.body.error.fields.nmax).toMatch(/No Bryant–Day design with at most 12 patients/);
  });

  it('when the statistician asks for a toxicity boundary, then its bounds, nominal level and crossing probability match the engine, null where no stop is possible', async () => {
    const res = await post(sam, 'toxicity-boundary', { n: 43, theta: 0.25, alpha: 0.1 });
    expect(res.status).toBe(200);
    expect(Object.keys(res.body).sort()).toEqual(['bounds', 'crossingProbability', 'nominalLevel']);
    expect(res.body).toEqual(toxicityBoundary({ n: 43, theta: 0.25, alpha: 0.1 }));
    expect(res.body.bounds).toHaveLength(43);
    expect(res.body.bounds[0]).toBeNull();
    expect(res.body.crossingProbability).toBeLessThanOrEqual(0.1);
  });

  it('when the boundary settings are wrong or too large, then 400 names the field (and the limit)', async () => {
    const tooBig = await post(sam, 'toxicity-boundary', { n: 501, theta: 0.25, alpha: 0.1 });
    expect(tooBig.status).toBe(400);
    expect(tooBig.body.error.fields.n).toMatch(/at most 500/);
    expect((await post(sam, 'toxicity-boundary', { n: 43, theta: 0, alpha: 0.1 })).body.error.fields.theta).toBeDefined();
    expect((await post(sam, 'toxicity-boundary', { n: 43, theta: 0.25 })).body.error.fields.alpha).toBeDefined();
    const impossible = await post(sam, 'toxicity-boundary', { n: 3, theta: 0.5, alpha: 0.01 });
    expect(impossible.status).toBe(400);
    expect(impossible.body.error.fields.alpha).toMatch(/No boundary over 3 patients/);
  });

  it('when anyone but the statistician asks, then 403', async () => {
    for (const session of [cora, mona, ada, spencer]) {
      expect((await post(session, 'safety-designs', PAPER)).status).toBe(403);
      expect((await post(session, 'toxicity-boundary', { n: 43, theta: 0.25, alpha: 0.1 })).status).toBe(403);
    }
  });

  it('when the characteristics of the chosen designs are asked for, then the grid and the association effect agree with the engine', async () => {
    const rule = { n1: 19, r1: 5, t1: 7, n: 33, r: 12, t: 10 };
    const grid = await post(sam, 'safety-designs/characteristics', { ...rule, pR0: 0.3, pR1: 0.5, toxAcceptable: 0.2, toxUnacceptable: 0.4 });
    expect(grid.status).toBe(200);
    const i = grid.body.toxicityRates.indexOf(0.2);
    const j = grid.body.responseRates.indexOf(0.5);
    expect(grid.body.probPromising[i][j]).toBeCloseTo(bryantDayCharacteristics(rule, { pR: 0.5, pT: 0.2 }).probPromising, 12);
    const independent = grid.body.association.find((a: { oddsRatio: number }) => a.oddsRatio === 1);
    expect(independent.power).toBeCloseTo(0.8542211642482678, 10);
    expect((await post(sam, 'safety-designs/characteristics', { ...rule, n1: 40, pR0: 0.3, pR1: 0.5, toxAcceptable: 0.2, toxUnacceptable: 0.4 })).status).toBe(400);
    const curve = await post(sam, 'toxicity-boundary/characteristics', { n: 43, theta: 0.25, alpha: 0.1 });
    expect(curve.body.curve.find((p: { p: number }) => p.p === 0.25).probStop).toBeCloseTo(curve.body.crossingProbability, 12);
  });
});

describe('a design locked with a safety rule', () => {
  it('when the statistician locks a response design with a continuous boundary, then the signed version carries the definition and the boundary over its n', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    const missing = await sam.post(`/api/trials/${trial.trialId}/cohorts/${cohortId}/design`, lockBody({ safetyRule: 'toxicity_boundary', toxMinGrade: 3, toxWindowDays: 28 }));
    expect(missing.status).toBe(400);
    expect(Object.keys(missing.body.error.fields).sort()).toEqual(['toxAlpha', 'toxTheta']);
    await sam.confirmToSign('design', cohortId);
    const res = await sam.post(
      `/api/trials/${trial.trialId}/cohorts/${cohortId}/design`,
      lockBody({ safetyRule: 'toxicity_boundary', toxMinGrade: 3, toxWindowDays: 28, toxTheta: 0.25, toxAlpha: 0.1 }),
    );
    expect(res.status).toBe(201);
    expect(res.body.design).toMatchObject({ n: 43, safetyRule: 'toxicity_boundary', toxicity: { minGrade: 3, windowDays: 28 }, bryantDay: null });
    expect(res.body.design.boundary).toEqual({ theta: 0.25, alpha: 0.1, ...toxicityBoundary({ n: 43, theta: 0.25, alpha: 0.1 }) });
    const audit = await stack.db('audit_log').where({ entity_type: 'design', entity_id: res.body.design.id }).first();
    expect(audit.after).toMatchObject({ safetyRule: 'toxicity_boundary', boundary: { theta: 0.25, alpha: 0.1 } });
    const read = await mona.get(`/api/trials/${trial.trialId}/designs`);
    expect(read.body.cohorts[0].currentBoundaryCurve.length).toBeGreaterThan(50);
  });

  it('when the statistician locks a Bryant–Day design, then its response and toxicity cut-offs are the search’s, and only optimal or minimax within the search’s nmax may be chosen', async () => {
    const trial = await createTrial(stack.db);
    const path = `/api/trials/${trial.trialId}/cohorts/${trial.cohortIds[0]}/design`;
    const body = { p0: 0.3, p1: 0.5, alpha: 0.15, beta: 0.15, nmax: 45, safetyRule: 'bryant_day', toxAcceptable: 0.2, toxUnacceptable: 0.4, alphaT: 0.15, toxMinGrade: 3, toxWindowDays: 28 };
    const single = await sam.post(path, lockBody({ ...body, selection: 'single_stage' }));
    expect(single.body.error.fields.selection, single.text).toBe('A Bryant–Day design is the optimal or the minimax one.');
    expect((await sam.post(path, lockBody({ ...body, nmax: 160 }))).body.error.fields.nmax).toMatch(/at most 150/);
    await sam.confirmToSign('design', trial.cohortIds[0]);
    const res = await sam.post(path, lockBody({ ...body, selection: 'optimal' }));
    expect(res.status).toBe(201);
    expect(res.body.design).toMatchObject({ selection: 'optimal', r1: 5, n1: 19, r: 12, n: 33, safetyRule: 'bryant_day', bryantDay: { t1: 7, t: 10, toxAcceptable: 0.2, toxUnacceptable: 0.4, alphaT: 0.15 } });
    expect(res.body.design.typeIError).toBeLessThanOrEqual(0.15);
    expect(res.body.design.bryantDay.attainedAlphaT).toBeLessThanOrEqual(0.15);
    expect(res.body.design.pet0).toBeCloseTo(bryantDayCharacteristics({ n1: 19, r1: 5, t1: 7, n: 33, r: 12, t: 10 }, { pR: 0.3, pT: 0.2 }).probEarlyStop, 12);
  });
});

/** A trial whose cohort has the boundary for n 43, θ 0.25, α 0.10 (b_3 = 3, b_4 = b_5 = 4) and patients enrolled long enough ago that their 28-day windows have closed. */
async function cohortNearBoundary(patients: number, toxicEvents: number) {
  const trial = await createTrial(stack.db);
  const cohortId = trial.cohortIds[0];
  await lockSafetyDesignDirectly(stack.db, { trialId: trial.trialId, cohortId }, { rule: 'toxicity_boundary', theta: 0.25, alpha: 0.1 });
  const enrolled = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SA, count: patients, firstEnrolledOn: daysFromToday(-70) });
  for (const p of enrolled.slice(0, toxicEvents)) await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: p.id, events: [{ onsetOn: daysFromToday(-65) }] });
  return { trial, cohortId, patients: enrolled };
}

const TOXIC_EVENT = (onsetOn: string) => ({ onsetOn, term: 'Hepatotoxicity', grade: 3, attribution: 'probable', serious: true, outcome: 'recovering' });
const cohortRow = (cohortId: string) => stack.db('cohorts').where({ id: cohortId }).first();

describe('the live safety state', () => {
  it('when the statistician or a committee member reads it, then the counts, the exact interval and the distance to the boundary are there; other roles get the rule and the pause without figures', async () => {
    const { trial } = await cohortNearBoundary(3, 2);
    const res = await sam.get(`/api/trials/${trial.trialId}/safety`);
    expect(res.status).toBe(200);
    const [cohort] = res.body.cohorts;
    expect(cohort.counts).toMatchObject({ enrolled: 3, toxic: 2, notToxic: 1, notAssessable: 0 });
    expect(cohort.rate).toMatchObject({ toxicities: 2, assessable: 3, estimate: 2 / 3, method: 'clopper-pearson' });
    // Clopper & Pearson (1934) interval through the engine.
    expect(cohort.rate.ci).toEqual(proportionInterval(2, 3, { method: 'clopper-pearson', confLevel: 0.95 }));
    expect(cohort.state).toMatchObject({ rule: 'toxicity_boundary', crossed: false, bound: 3, toNextStop: 2 });
    expect(cohort.sentences).toContain('2 more toxicities in a row among the next assessable patients would reach it.');
    expect((await mona.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].counts).toMatchObject({ toxic: 2 });
    for (const session of [cora, ivan, ada, spencer]) {
      const hidden = (await session.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0];
      for (const key of ['counts', 'rate', 'state', 'sentences']) expect(hidden).not.toHaveProperty(key);
      expect(hidden.efficacyHidden).toEqual(expect.any(String));
      // The reason speaks of the figures this panel withholds.
      expect(hidden.efficacyHidden).toMatch(/safety figures/);
      expect(hidden.efficacyHidden).not.toMatch(/response figures/);
      expect(hidden.lockedRule).toMatchObject({ safetyRule: 'toxicity_boundary' });
      expect(hidden.definition).toMatch(/^A toxicity is an adverse event/);
    }
  });

  it('when patients and events of every kind are counted in SQL, then the counts equal the patient-by-patient derivation', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    await lockSafetyDesignDirectly(stack.db, { trialId: trial.trialId, cohortId, n1: 13 }, { rule: 'toxicity_boundary', theta: 0.3, alpha: 0.1, minGrade: 3, windowDays: 21 });
    const grades = [null, 1, 2, 3, 4, 5];
    const attributions = [null, 'unrelated', 'unlikely', 'possible', 'probable', 'definite'] as const;
    let seed = 17;
    const next = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    const patients = await enrolPatientsDirectly(stack.db, {
      trialId: trial.trialId,
      cohortId,
      siteId: trial.siteIds.SA,
      patients: Array.from({ length: 40 }, (_, i) => ({ enrolledOn: daysFromToday(-5 - i * 2) })),
    });
    const eventsOf = new Map<string, DirectEvent[]>();
    for (const p of patients) {
      const enrolledOn = (await stack.db('patients').where({ id: p.id }).first('enrolled_on')).enrolled_on as string;
      const events: DirectEvent[] = Array.from({ length: Math.floor(next() * 3) }, () => {
        const grade = grades[Math.floor(next() * grades.length)];
        const onset = shiftDate(enrolledOn, Math.floor(next() * 30));
        return { onsetOn: onset > daysFromToday(0) ? daysFromToday(0) : onset, grade, attribution: attributions[Math.floor(next() * attributions.length)], outcome: grade === 5 ? 'fatal' : 'recovering' };
      });
      eventsOf.set(p.id, events);
      await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: p.id, events });
    }
    const today = daysFromToday(0);
    const sql = (await safetyCounts(stack.db, [{ cohortId, minGrade: 3, windowDays: 21 }], today)).get(cohortId);
    const rows = await stack.db('patients').where({ cohort_id: cohortId }).select('id', 'stage', 'enrolled_on');
    const reference = countToxicities(
      rows.map((row) => ({
        stage: row.stage,
        derivation: deriveToxicity({
          enrolledOn: row.enrolled_on,
          events: (eventsOf.get(row.id) ?? []).map((e) => ({ onsetOn: e.onsetOn as string, term: 'x', grade: e.grade ?? null, attribution: e.attribution ?? null })),
          definition: { minGrade: 3, windowDays: 21 },
          today,
        }),
      })),
    );
    expect(sql).toEqual(reference);
    expect(reference.toxic).toBeGreaterThan(0);
    expect(reference.notToxic).toBeGreaterThan(0);
    expect(reference.notAssessable).toBeGreaterThan(0);
  });
});

describe('crossing the rule pauses accrual', () => {
  it('when a recorded event reaches the boundary, then accrual pauses in that write, the statisticians and the committee are mailed, and enrolment is refused', async () => {
    const { trial, cohortId, patients } = await cohortNearBoundary(3, 2);
    const res = await cora.post(`/api/trials/${trial.trialId}/patients/${patients[2].id}/adverse-events`, TOXIC_EVENT(daysFromToday(-60)));
    expect(res.status).toBe(201);
    expect(res.body.safety).toEqual({ paused: true });
    expect((await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].state).toMatchObject({ crossed: true, toxicities: 3, assessable: 3, bound: 3 });
    const cohort = await cohortRow(cohortId);
    expect(cohort).toMatchObject({ status: 'enrolling_stage_1', safety_pause_reason: 'The continuous toxicity boundary of the locked design was reached.', safety_pause_toxicities: 3 });
    const audits = await stack.db('audit_log').where({ entity_id: cohortId }).whereIn('entity_type', ['cohort', 'safety_rule']).orderBy('id');
    expect(audits.map((a) => [a.entity_type, a.action])).toEqual([
      ['cohort', 'accrual_paused_for_safety'],
      ['safety_rule', 'crossed'],
    ]);
    expect(audits[1].reason).toBe('3 toxicities among 3 assessable patients: at or above the boundary b = 3.');

    const mail = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject === `${trial.code} MAIN: safety rule crossed — accrual paused`);
      return got.length >= 2 && got;
    });
    expect(mail.flatMap((m) => m.to).sort()).toEqual([DEMO.monitor, DEMO.statistician].sort());
    expect(mail[0].text).toContain('3 toxicities among 3 assessable patients: at or above the boundary b = 3.');
    expect(mail[0].text).toContain('Decision support only');

    const refused = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: 'SA-099', siteId: trial.siteIds.SA, enrolledOn: daysFromToday(-1) });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/^Accrual paused for a safety review of cohort MAIN/);
    // Everyone reads the pause; its reason carries no figures.
    const asSponsor = await spencer.get(`/api/trials/${trial.trialId}`);
    expect(asSponsor.body.trial.cohorts[0].safetyPause).toEqual({ since: expect.any(String), reason: 'The continuous toxicity boundary of the locked design was reached.' });
    const live = (await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0];
    expect(live.safetyPause).not.toBeNull();
    expect(live.state.crossed).toBe(true);
  });

  it('when the stage-1 toxicities of a Bryant–Day design exceed t1, then accrual pauses', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    await lockSafetyDesignDirectly(stack.db, { trialId: trial.trialId, cohortId }, { rule: 'bryant_day', t1: 1, t: 5 });
    const patients = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SA, count: 4, firstEnrolledOn: daysFromToday(-70) });
    await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: patients[0].id, events: [{ onsetOn: daysFromToday(-65) }] });
    const below = (await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].state;
    expect(below).toMatchObject({ rule: 'bryant_day', stage1Toxicities: 1, t1: 1, crossed: false, toStage1Limit: 1 });
    const res = await cora.post(`/api/trials/${trial.trialId}/patients/${patients[1].id}/adverse-events`, TOXIC_EVENT(daysFromToday(-60)));
    expect(res.body.safety).toEqual({ paused: true });
    expect((await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].state).toMatchObject({ stage1Toxicities: 2, crossed: true });
    expect((await cohortRow(cohortId)).safety_pause_reason).toBe('The stage-1 toxicity limit of the locked Bryant–Day design was crossed.');
  });

  it('when an amendment adds a safety rule the recorded events already cross, then signing it pauses accrual', async () => {
    const trial = await createTrial(stack.db);
    const cohortId = trial.cohortIds[0];
    await lockDesignDirectly(stack.db, { trialId: trial.trialId, cohortId });
    const patients = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SA, count: 3, firstEnrolledOn: daysFromToday(-70) });
    for (const p of patients) await addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: p.id, events: [{ onsetOn: daysFromToday(-65) }] });
    await sam.confirmToSign('amendment', cohortId);
    const amended = await sam.post(
      `/api/trials/${trial.trialId}/cohorts/${cohortId}/design/amendments`,
      lockBody({ reason: 'Protocol amendment 2 adds toxicity monitoring', safetyRule: 'toxicity_boundary', toxMinGrade: 3, toxWindowDays: 28, toxTheta: 0.25, toxAlpha: 0.1 }),
    );
    expect(amended.status).toBe(201);
    expect((await cohortRow(cohortId)).safety_paused_at).not.toBeNull();
  });
});

describe('after a safety pause', () => {
  const freeze = async (trial: TrialFixture, cohortId: string) => {
    const res = await sam.post(`/api/trials/${trial.trialId}/data-cuts`, { cohortId, kind: 'interim' });
    expect(res.status).toBe(201);
    return res.body.dataCut.id as string;
  };
  /** A member's signed recommendation on the cut's first analysis version, with the password entered for it. */
  const recommend = async (member: Session, cutId: string, decision: string, rationale: string) => {
    await member.confirmToSign('recommendation', cutId);
    return member.post(`/api/data-cuts/${cutId}/recommendations`, { decision, rationale, analysisVersion: 1 });
  };
  const resume = (cutId: string, session = sam) => session.post(`/api/data-cuts/${cutId}/decision`, { action: 'resume_accrual', reason: 'The committee reviewed the events; the protocol’s dose modification applies.' });

  it('when the committee recommends resuming on a cut since the pause and the statistician applies it, then accrual resumes and sites are told; a later toxicity pauses again', async () => {
    const { trial, cohortId, patients } = await cohortNearBoundary(3, 2);
    const earlyCut = await freeze(trial, cohortId);
    await cora.post(`/api/trials/${trial.trialId}/patients/${patients[2].id}/adverse-events`, TOXIC_EVENT(daysFromToday(-60)));
    expect((await cohortRow(cohortId)).safety_paused_at).not.toBeNull();

    await recommend(mona, earlyCut, 'resume_accrual', 'Signed on the cut before the pause.');
    const tooEarly = await resume(earlyCut);
    expect(tooEarly.status).toBe(409);
    expect(tooEarly.body.error.message).toMatch(/frozen before accrual paused/);

    const cutId = await freeze(trial, cohortId);
    await addMember(stack.db, trial.trialId, { email: 'mika.monitor@tessaly.test', role: 'monitor' });
    const mika = await stack.signIn('mika.monitor@tessaly.test');
    expect((await recommend(mika, cutId, 'continue', 'A recommendation that is not to resume.')).status).toBe(201);
    const withoutResume = await resume(cutId);
    expect(withoutResume.status).toBe(409);
    expect(withoutResume.body.error.message).toMatch(/committee recommendation to resume/);

    const signed = await recommend(mona, cutId, 'resume_accrual', 'Three reversible grade 3 events; continue with the dose modification.');
    expect(signed.status).toBe(201);
    expect((await resume(cutId, ada)).status).toBe(403);
    const applied = await resume(cutId);
    expect(applied.status).toBe(201);
    expect(applied.body.decision).toMatchObject({ action: 'resume_accrual', fromStatus: 'enrolling_stage_1', toStatus: 'enrolling_stage_1' });
    expect(await cohortRow(cohortId)).toMatchObject({ safety_paused_at: null, safety_reviewed_toxicities: 3 });
    expect(
      (await stack.db('audit_log').where({ entity_type: 'cohort', entity_id: cohortId }).orderBy('id', 'desc').first()).action,
    ).toBe('accrual_resumed_after_safety_review');

    const enrolled = await cora.post(`/api/trials/${trial.trialId}/patients`, { studyId: 'SA-050', siteId: trial.siteIds.SA, enrolledOn: daysFromToday(-62) });
    expect(enrolled.status).toBe(201);
    const told = await eventually(() => {
      const got = stack.catcher.messages.filter((m) => m.subject === `${trial.code} MAIN: resume accrual after the safety review`);
      return got.length >= 3 && got;
    });
    expect(told.flatMap((m) => m.to).sort()).toEqual([DEMO.coordinator, DEMO.investigator, DEMO.sponsor].sort());

    const again = await cora.post(`/api/trials/${trial.trialId}/patients/${enrolled.body.patient.id}/adverse-events`, TOXIC_EVENT(daysFromToday(-61)));
    expect(again.body.safety).toEqual({ paused: true });
    expect((await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].state).toMatchObject({ toxicities: 4 });
  });

  it('when more toxicities arrive after the pause, then a resume on the earlier review is refused; stopping for safety ends the pause and the cohort', async () => {
    const { trial, cohortId, patients } = await cohortNearBoundary(3, 2);
    // A fourth patient, enrolled recently: not assessable until an event or the end of the window.
    const [recent] = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SA, patients: [{ enrolledOn: daysFromToday(-10) }] });
    await cora.post(`/api/trials/${trial.trialId}/patients/${patients[2].id}/adverse-events`, TOXIC_EVENT(daysFromToday(-60)));
    const cutId = await freeze(trial, cohortId);
    const fourth = await cora.post(`/api/trials/${trial.trialId}/patients/${recent.id}/adverse-events`, TOXIC_EVENT(daysFromToday(-5)));
    expect(fourth.body.safety).toEqual({ paused: false });
    expect((await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].state).toMatchObject({ toxicities: 4, assessable: 4, crossed: true });
    await recommend(mona, cutId, 'resume_accrual', 'Reviewed before the fourth event.');
    const refused = await resume(cutId);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/More toxicities have been recorded since accrual paused/);

    const stopCut = await freeze(trial, cohortId);
    await addMember(stack.db, trial.trialId, { email: 'mika.monitor@tessaly.test', role: 'monitor' });
    const mika = await stack.signIn('mika.monitor@tessaly.test');
    expect((await recommend(mika, stopCut, 'stop_safety', 'Four grade 3 hepatotoxicities among four patients.')).status).toBe(201);
    const stopped = await sam.post(`/api/data-cuts/${stopCut}/decision`, { action: 'stop', stopCategory: 'safety', reason: 'Unacceptable toxicity: the boundary was reached.' });
    expect(stopped.status).toBe(201);
    expect(await cohortRow(cohortId)).toMatchObject({ status: 'stopped', stop_category: 'safety', safety_paused_at: null });
  });
});

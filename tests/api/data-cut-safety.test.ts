/**
 * Safety in a data cut over HTTP: the cut freezes adverse events (in its content hash), its
 * analysis carries the safety section computed from the frozen copy (events by grade and
 * attribution, toxicities against the locked definition, the exact interval, the rule's state),
 * the PDF prints it, the adverse-events dataset carries CDISC SDTM AE names through the shared
 * CSV writer, and a release shows the cut's safety figures to sponsors under the cut's date.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { DEMO, createTrial, type TrialFixture } from '../support/factories.js';
import { daysFromToday } from '../support/assessment-factories.js';
import { enrolPatientsDirectly } from '../support/patient-factories.js';
import { addEventsDirectly, lockSafetyDesignDirectly } from '../support/safety-factories.js';
import { freezeCutDirectly, releaseCutDirectly } from '../support/data-cut-factories.js';
import { pdfPages } from '../support/pdf-text.js';
import type { Session } from '../support/sign-in.js';
import { proportionInterval } from '../../server/stats/index.js';
import { contentHash } from '../../server/signatures/signatures.js';
import { cutContent } from '../../server/data-cuts/data-cuts.service.js';
import { readCutPatients } from '../../server/data-cuts/cut-patients.repository.js';
import { readCutAdverseEvents } from '../../server/data-cuts/cut-adverse-events.repository.js';
import { AE_COLUMNS } from '../../server/data-cuts/exports.js';
import { fig } from '../../server/data-cuts/report/pdf.js';

let stack: Stack;
let sam: Session;
let mona: Session;
let spencer: Session;

beforeAll(async () => {
  stack = await startStack();
  [sam, mona, spencer] = await Promise.all([DEMO.statistician, DEMO.monitor, DEMO.sponsor].map((email) => stack.signIn(email)));
}, 120_000);
afterAll(async () => stack?.close());

/**
 * A cohort with the boundary for n 43, θ 0.25, α 0.10 and five patients whose 28-day windows have
 * closed: two toxicities (grade 3 probable, grade 4 definite and serious), one grade 4 unrelated
 * event, one grade 1 possible event whose term looks like a formula, and one event still awaiting
 * its grade.
 */
async function cohortWithEvents(): Promise<{ trial: TrialFixture; cohortId: string; eventIds: string[] }> {
  const trial = await createTrial(stack.db);
  const cohortId = trial.cohortIds[0];
  await lockSafetyDesignDirectly(stack.db, { trialId: trial.trialId, cohortId }, { rule: 'toxicity_boundary', theta: 0.25, alpha: 0.1 });
  const patients = await enrolPatientsDirectly(stack.db, { trialId: trial.trialId, cohortId, siteId: trial.siteIds.SA, count: 5, firstEnrolledOn: daysFromToday(-70) });
  const onset = daysFromToday(-60);
  const add = (index: number, event: Parameters<typeof addEventsDirectly>[1]['events'][number]) =>
    addEventsDirectly(stack.db, { trialId: trial.trialId, patientId: patients[index].id, events: [{ onsetOn: onset, ...event }] });
  const eventIds = [
    ...(await add(0, { term: 'Neutropenia', grade: 3, attribution: 'probable' })),
    ...(await add(1, { term: 'Sepsis', grade: 4, attribution: 'definite', serious: true })),
    ...(await add(2, { term: 'Fall', grade: 4, attribution: 'unrelated' })),
    ...(await add(3, { term: '=HYPERLINK("http://x")', grade: 1, attribution: 'possible', outcome: 'recovered' })),
    ...(await add(4, { term: 'Creatinine increased', grade: null, attribution: null })),
  ];
  return { trial, cohortId, eventIds };
}

describe('a data cut with adverse events', () => {
  it('when a cut is frozen and read, then its safety section comes from the frozen events, later corrections do not move it, and the hash covers the events', async () => {
    const { trial, cohortId, eventIds } = await cohortWithEvents();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const res = await mona.get(`/api/data-cuts/${cut.id}/analysis`);
    expect(res.status).toBe(200);
    const [safety] = res.body.analysis.safety;
    expect(safety).toMatchObject({ code: 'MAIN', eventsFrozen: true, safetyRule: 'toxicity_boundary', definition: { minGrade: 3, windowDays: 28 } });
    expect(safety.counts).toMatchObject({ enrolled: 5, toxic: 2, notToxic: 2, notAssessable: 1, awaitingAssessment: 1 });
    expect(safety.events).toMatchObject({ total: 5, serious: 1, patients: 5 });
    const grade4 = safety.events.byGrade.find((row: { grade: number | null }) => row.grade === 4);
    expect(grade4).toMatchObject({ total: 2, serious: 1, byAttribution: { unrelated: 1, definite: 1, possible: 0 } });
    expect(safety.events.byGrade.find((row: { grade: number | null }) => row.grade === null)).toMatchObject({ total: 1, byAttribution: { not_assessed: 1 } });
    // Clopper & Pearson (1934) exact interval through the statistics engine.
    expect(safety.toxicityRate).toMatchObject({ toxicities: 2, assessable: 4, estimate: 0.5, method: 'clopper-pearson' });
    expect(safety.toxicityRate.ci).toEqual(proportionInterval(2, 4, { method: 'clopper-pearson', confLevel: 0.95 }));
    // The live state and the cut agree at the cut.
    const live = (await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0];
    expect(safety.state).toEqual(live.state);
    expect(safety.sentences).toEqual(expect.arrayContaining(live.sentences));

    // A correction after the cut: the live state moves, the cut does not, and its hash still matches.
    await stack.db('adverse_events').where({ id: eventIds[2] }).update({ attribution: 'probable', version: 2 });
    expect((await sam.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts[0].counts.toxic).toBe(3);
    const again = await mona.get(`/api/data-cuts/${cut.id}/analysis`);
    expect(again.body.analysis.safety[0].counts.toxic).toBe(2);
    expect(again.body.analysis.integrity.intact).toBe(true);

    // The frozen events are append-only, and the hash covers them: a changed grade gives another hash.
    await expect(stack.db('data_cut_adverse_events').where({ data_cut_id: cut.id }).update({ grade: 1 })).rejects.toThrow();
    const patients = await readCutPatients(stack.db, cut.id);
    const events = await readCutAdverseEvents(stack.db, cut.id);
    expect(events).toHaveLength(5);
    expect(contentHash(cutContent(cut, patients, events))).toBe(cut.contentHash);
    const altered = events.map((e, i) => (i === 0 ? { ...e, grade: 2 } : e));
    expect(contentHash(cutContent(cut, patients, altered))).not.toBe(cut.contentHash);
  });

  it('when the cut is exported, then the adverse-events dataset carries the SDTM AE names, neutralised cells and the toxicity flag; an unknown dataset is a 400', async () => {
    const { trial, cohortId } = await cohortWithEvents();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const res = await sam.get(`/api/data-cuts/${cut.id}/ae.csv`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const lines = res.text.trim().split(/\r?\n/);
    expect(lines[0]).toBe(AE_COLUMNS.join(','));
    expect(lines).toHaveLength(6);
    expect(res.text).toContain(`"'=HYPERLINK(""http://x"")"`);
    expect(res.text).not.toMatch(/(^|,)[=+@]/m);
    const sepsis = lines.find((line) => line.includes('Sepsis')) ?? '';
    expect(sepsis).toContain(',4,DEFINITELY RELATED,Y,RECOVERING/RESOLVING,SA,MAIN,Y,');
    expect(sepsis).toMatch(new RegExp(`^${trial.code},AE,${trial.code}-SA-\\d{3},1,Sepsis,`));
    expect(lines.filter((line) => /,Y,\d{4}-\d{2}-\d{2}$/.test(line))).toHaveLength(2);
    expect(lines.find((line) => line.includes('Creatinine'))).toMatch(/,Creatinine increased,\d{4}-\d{2}-\d{2},,,N,RECOVERING\/RESOLVING,SA,MAIN,N,/);
    expect((await sam.get(`/api/data-cuts/${cut.id}/export.csv?dataset=ae`)).text).toBe(res.text);
    const bad = await sam.get(`/api/data-cuts/${cut.id}/export.csv?dataset=everything`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.dataset).toMatch(/patients, adrs, ae/);
  });

  it('when the report is printed, then it has the safety section with the events by grade and the exact interval', async () => {
    const { trial, cohortId } = await cohortWithEvents();
    const cut = await freezeCutDirectly(stack.db, trial, { cohortId });
    const res = await mona.get(`/api/data-cuts/${cut.id}/report.pdf`).buffer(true).parse((response, done) => {
      const chunks: Buffer[] = [];
      response.on('data', (c: Buffer) => chunks.push(c));
      response.on('end', () => done(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    const text = (await pdfPages(res.body as Buffer)).join('\n');
    expect(text).toContain('Safety — cohort MAIN');
    expect(text).toContain('4 Life-threatening');
    expect(text).toContain(fig.ci(proportionInterval(2, 4, { method: 'clopper-pearson', confLevel: 0.95 })));
    expect(text).toMatch(/5 adverse events in 5 patients, 1 serious/);
  });

  it('when a committee decision releases the cut, then the sponsor reads its safety figures under the cut’s date and no live figure', async () => {
    const { trial, cohortId } = await cohortWithEvents();
    await releaseCutDirectly(stack.db, trial, { cohortId });
    await addEventsDirectly(stack.db, {
      trialId: trial.trialId,
      patientId: (await stack.db('patients').where({ cohort_id: cohortId }).orderBy('enrolment_seq').first('id')).id,
      events: [{ onsetOn: daysFromToday(-59), term: 'Rash', grade: 3, attribution: 'definite' }],
    });
    const [cohort] = (await spencer.get(`/api/trials/${trial.trialId}/safety`)).body.cohorts;
    for (const key of ['counts', 'rate', 'state', 'sentences']) expect(cohort).not.toHaveProperty(key);
    expect(cohort.released).toMatchObject({ counts: { toxic: 2, notToxic: 2 }, toxicityRate: { toxicities: 2, assessable: 4 }, state: { rule: 'toxicity_boundary' } });
    expect(cohort.released.label).toMatch(/data cut/i);
  });
});

/**
 * CSV exports of a data cut's frozen patients: the patients-and-outcomes listing, a response
 * dataset whose columns follow the CDISC ADaM basic data structure (one row per subject and
 * parameter), and the adverse events under the CDISC SDTM AE domain's variable names. Every text
 * cell goes through the shared formula-injection guard. Stages follow the one definition (the first
 * n1 counting patients are stage 1), and a stage-2 patient enrolled at risk, whom the cohort's
 * verdict leaves out, is marked as such (`stagesAtCut`, the analysis' own verdict).
 */
import { countsToward, effectiveOutcome } from '../evaluation/index.js';
import { toCsv, type CsvCell } from '../csv/neutralise.js';
import type { CutPatient, DataCut } from './data-cuts.repository.js';
import { stagesAtCut } from './analysis.js';
import type { CutAdverseEvent } from './cut-adverse-events.repository.js';

export function patientsCsv(cut: DataCut, patients: CutPatient[]): string {
  const header = [
    'data_cut',
    'study_id',
    'site',
    'cohort',
    'stage',
    'enrolled_at_risk',
    'enrolment_seq',
    'enrolled_on',
    'outcome',
    'best_overall_response',
    'response_assessed_on',
    'evaluable',
    'not_evaluable_reason',
    'attested',
    'derived_best_overall_response',
    'derived_responder',
    'outcome_flag',
    'patient_version',
    'assessments',
  ];
  const marks = stagesAtCut(cut, patients);
  const rows: CsvCell[][] = patients.map((p) => [
    cut.seq,
    p.studyId,
    p.siteCode,
    p.cohortCode,
    marks.get(p.patientId)?.stage ?? p.stage,
    marks.get(p.patientId)?.atRisk ?? false,
    p.enrolmentSeq,
    p.enrolledOn,
    p.outcome,
    p.bestOverallResponse,
    p.responseAssessedOn,
    p.evaluable,
    p.notEvaluableReason,
    p.attested,
    p.derivedBestOverallResponse,
    p.derivedResponder,
    p.outcomeFlag,
    p.patientVersion,
    p.assessments.map((a) => `${a.assessedOn} ${a.response}`).join('; '),
  ]);
  return toCsv(header, rows);
}

/** Numeric codes for the best overall response (AVAL), in RECIST 1.1 order (common practice). */
const BOR_CODE: Record<string, number> = { CR: 1, PR: 2, SD: 3, PD: 4, NE: 5 };

export const ADRS_COLUMNS = [
  'STUDYID',
  'USUBJID',
  'SUBJID',
  'SITEID',
  'COHORT',
  'ENRLDT',
  'EVALFL',
  'PARAMCD',
  'PARAM',
  'PARCAT1',
  'AVALC',
  'AVAL',
  'ADT',
  'ANL01FL',
  'DCUTDT',
] as const;

/**
 * ADRS-style response dataset: per subject a BOR record (best overall response) and a RESP record
 * (objective response, CR or PR, under the protocol's analysis population). ANL01FL marks the
 * records that enter the primary analysis: counted under the population, with a decided outcome, and
 * not a stage-2 patient enrolled at risk whom the verdict leaves out.
 */
export function adrsCsv(cut: DataCut, patients: CutPatient[]): string {
  const trialCode = cut.snapshot.trial.code;
  const populations = new Map(cut.snapshot.cohorts.map((c) => [c.id, c.design?.analysisPopulation ?? 'all_enrolled']));
  const cutDate = cut.cutAt.slice(0, 10);
  const marks = stagesAtCut(cut, patients);
  const rows: CsvCell[][] = [];
  for (const p of patients) {
    const population = populations.get(p.cohortId) ?? 'all_enrolled';
    const countable = { id: p.patientId, enrolmentSeq: p.enrolmentSeq, outcome: p.outcome, evaluable: p.evaluable };
    const analysed = countsToward(countable, population) && !marks.get(p.patientId)?.atRisk;
    const outcome = effectiveOutcome(countable, population);
    const subject = [trialCode, `${trialCode}-${p.studyId}`, p.studyId, p.siteCode, p.cohortCode, p.enrolledOn, p.evaluable ? 'Y' : 'N'];
    const bor = p.bestOverallResponse;
    rows.push([
      ...subject,
      'BOR',
      'Best Overall Response (RECIST 1.1)',
      'TUMOUR RESPONSE',
      bor,
      bor ? BOR_CODE[bor] : null,
      p.responseAssessedOn,
      analysed && p.outcome !== 'pending' ? 'Y' : null,
      cutDate,
    ]);
    rows.push([
      ...subject,
      'RESP',
      'Objective Response (CR or PR)',
      'TUMOUR RESPONSE',
      outcome === 'pending' ? null : outcome === 'responder' ? 'Y' : 'N',
      outcome === 'pending' ? null : outcome === 'responder' ? 1 : 0,
      p.responseAssessedOn,
      analysed && outcome !== 'pending' ? 'Y' : null,
      cutDate,
    ]);
  }
  return toCsv([...ADRS_COLUMNS], rows);
}

/**
 * Adverse-events dataset with the variable names of the CDISC SDTM AE domain (one row per event).
 * AETOXGR is the CTCAE v5.0 grade; AESER is Y/N; AEOUT uses the CDISC controlled terms for the
 * outcome; AEREL's terms are sponsor-defined in SDTM, so ours are the attribution in capitals.
 * AETOXFL (Y on the event by which the patient counts as a toxicity in the cut's safety analysis:
 * the first, by onset, that meets the protocol's definition) and DCUTDT are our own additions
 * beside the standard variables.
 */
export const AE_COLUMNS = ['STUDYID', 'DOMAIN', 'USUBJID', 'AESEQ', 'AETERM', 'AESTDTC', 'AETOXGR', 'AEREL', 'AESER', 'AEOUT', 'SITEID', 'COHORT', 'AETOXFL', 'DCUTDT'] as const;

const AEOUT: Record<CutAdverseEvent['outcome'], string> = {
  recovered: 'RECOVERED/RESOLVED',
  recovering: 'RECOVERING/RESOLVING',
  not_recovered: 'NOT RECOVERED/NOT RESOLVED',
  recovered_with_sequelae: 'RECOVERED/RESOLVED WITH SEQUELAE',
  fatal: 'FATAL',
  unknown: 'UNKNOWN',
};

const AEREL: Record<NonNullable<CutAdverseEvent['attribution']>, string> = {
  unrelated: 'NOT RELATED',
  unlikely: 'UNLIKELY RELATED',
  possible: 'POSSIBLY RELATED',
  probable: 'PROBABLY RELATED',
  definite: 'DEFINITELY RELATED',
};

export function adverseEventsCsv(cut: DataCut, patients: CutPatient[], events: CutAdverseEvent[], toxicEventIds: ReadonlySet<string>): string {
  const trialCode = cut.snapshot.trial.code;
  const cohortOf = new Map(patients.map((p) => [p.patientId, p.cohortCode]));
  const cutDate = cut.cutAt.slice(0, 10);
  const seqOf = new Map<string, number>();
  const rows: CsvCell[][] = events.map((e) => {
    const seq = (seqOf.get(e.patientId) ?? 0) + 1;
    seqOf.set(e.patientId, seq);
    return [
      trialCode,
      'AE',
      `${trialCode}-${e.studyId}`,
      seq,
      e.term,
      e.onsetOn,
      e.grade,
      e.attribution ? AEREL[e.attribution] : null,
      e.serious ? 'Y' : 'N',
      AEOUT[e.outcome],
      e.siteCode,
      cohortOf.get(e.patientId) ?? null,
      toxicEventIds.has(e.eventId) ? 'Y' : 'N',
      cutDate,
    ];
  });
  return toCsv([...AE_COLUMNS], rows);
}

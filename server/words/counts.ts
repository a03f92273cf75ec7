/**
 * Counts and the names of the denominators. One name each, everywhere: "counted" patients are those
 * the analysis population counts, "decided" the counted ones whose outcome is known (the denominator
 * of every rate, test and rule), "pending" the counted ones still without an outcome; "evaluable"
 * names only the evaluability flag of a patient.
 */

/** "1 patient", "3 patients": a count with its noun (the plural given where it is not just an added s). */
export const plural = (count: number, word: string, many = `${word}s`) => `${count} ${count === 1 ? word : many}`;

/** The column and axis names of the counts. */
export const COUNT_LABELS = {
  enrolled: 'Enrolled',
  counted: 'Counted',
  decided: 'Decided',
  pending: 'Pending',
  responders: 'Responders',
  notEvaluable: 'Not evaluable',
  atRisk: 'Enrolled at risk',
} as const;

/** The glossary: what each word means here, in the order a reader meets them. */
export const GLOSSARY: ReadonlyArray<{ term: string; meaning: string }> = [
  { term: 'Enrolled', meaning: 'Every patient enrolled in the cohort, whatever their outcome or evaluability.' },
  {
    term: 'Evaluable',
    meaning:
      'A flag on a patient: whether the patient can be assessed for response under the protocol. A patient who is not evaluable has a reason recorded. The word names only this flag, never a count.',
  },
  {
    term: 'Counted',
    meaning:
      'The patients the analysis population counts. All enrolled: every patient counts, and one who is not evaluable counts as a non-responder. Evaluable: only evaluable patients count; the others are replaced.',
  },
  {
    term: 'Decided',
    meaning:
      'Counted patients whose outcome is known: responders and non-responders. The response rate, the exact test and the stopping rules all use the decided patients as their denominator.',
  },
  { term: 'Pending', meaning: 'Counted patients whose outcome is not recorded yet. They are left out of the figures until it is.' },
  { term: 'Responder', meaning: 'A decided patient whose best overall response is CR or PR (RECIST 1.1).' },
  {
    term: 'Stage 1',
    meaning: 'The first n1 counted patients in enrolment order. The futility rule looks at their responders: r1 or fewer stops the cohort for futility.',
  },
  {
    term: 'At risk',
    meaning:
      'Patients enrolled beyond n1 before the interim decision, where the protocol lets accrual continue. They belong to stage 2 and are enrolled at risk: if stage 1 stops for futility, their outcomes are not part of the test.',
  },
  { term: 'Passes stage 1', meaning: 'More than r1 responders among the stage-1 patients: the cohort may go on to stage 2. It says nothing yet about the final result.' },
  { term: 'Promising', meaning: 'At the final analysis, more than r responders among the counted patients: the treatment is worth a larger trial.' },
  { term: 'Settled early', meaning: 'A rule is settled before its last patient once the remaining patients can no longer change the result.' },
  { term: 'Data cut', meaning: 'A frozen copy of the trial’s patients and outcomes at one moment, hashed so an analysis and a signature always point at exactly the data they saw.' },
  { term: 'Committee member', meaning: 'A member of the data monitoring committee: reads frozen data cuts and signs the committee’s recommendation.' },
];

/**
 * Payloads for timepoint assessments, shared by the server's routes and the client's forms (so
 * keep this file free of server-only imports). Enrolment is known only once the patient is loaded,
 * so the schemas are built for a patient's enrolment date when there is one.
 */
import { format, isValid, parseISO } from 'date-fns';
import { number, object, string } from 'yup';
import { latestToday } from '../patients/patients.schema.js';
import { RESPONSE_LABELS } from '../words/index.js';

// Kept for the client, which imports these from here; they live in patients.schema.ts and server/words/.
export { latestToday, RESPONSE_LABELS };

export const TIMEPOINT_RESPONSES = ['CR', 'PR', 'SD', 'PD', 'NE'] as const;
export const NOTES_MAX = 2000;
export const REASON_MAX = 500;

const realDate = (value: string | undefined) => !value || (isValid(parseISO(value)) && format(parseISO(value), 'yyyy-MM-dd') === value);

function dateField(enrolledOn?: string) {
  let field = string()
    .trim()
    .matches(/^\d{4}-\d{2}-\d{2}$/, 'Use a date like 2026-03-03.')
    .test('real-date', 'This is not a real calendar date.', realDate)
    .test('not-future', 'The assessment date cannot be in the future.', (value) => !value || value <= latestToday());
  if (enrolledOn) {
    field = field.test(
      'after-enrolment',
      `The assessment date cannot be before enrolment (${enrolledOn}).`,
      (value) => !value || !realDate(value) || value >= enrolledOn,
    );
  }
  return field;
}

const response = () => string().oneOf([...TIMEPOINT_RESPONSES], 'Choose CR, PR, SD, PD or NE.');
const notes = () => string().trim().max(NOTES_MAX, `Notes can be at most ${NOTES_MAX} characters.`).nullable();

export function assessmentSchema(enrolledOn?: string) {
  return object({
    date: dateField(enrolledOn).required('Enter the assessment date.'),
    response: response().required('Choose the overall timepoint response.'),
    notes: notes().optional(),
  });
}

const version = () => number().typeError('The version must be a number.').integer().min(1).required('The version you edited is missing.');
const reason = () =>
  string().trim().required('Give the reason for the correction.').max(REASON_MAX, `The reason can be at most ${REASON_MAX} characters.`);

export function assessmentCorrectionSchema(enrolledOn?: string) {
  return object({
    date: dateField(enrolledOn).optional(),
    response: response().optional(),
    notes: notes().optional(),
    version: version(),
    reason: reason(),
  });
}

export const assessmentRemovalSchema = object({ version: version(), reason: reason() });

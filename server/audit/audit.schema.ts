/** The Audit trail page's filters, validated on the server and used by the client's filter form. */
import * as yup from 'yup';

const optionalText = (max: number) =>
  yup
    .string()
    .trim()
    .max(max, `At most ${max} characters.`)
    .transform((value: string) => (value === '' ? undefined : value))
    .optional();

const day = () =>
  yup
    .string()
    .transform((value: string) => (value === '' ? undefined : value))
    .matches(/^\d{4}-\d{2}-\d{2}$/, 'Use a date (YYYY-MM-DD).')
    .optional();

export const auditQuerySchema = yup.object({
  entityType: optionalText(40),
  entityId: optionalText(100),
  /** Part of the actor's e-mail address. */
  actor: optionalText(254),
  from: day(),
  to: day().test('after-from', 'The end date is before the start date.', function (value) {
    const { from } = this.parent as { from?: string };
    return !value || !from || value >= from;
  }),
  limit: yup.number().typeError('Page size must be a number.').integer().min(1).max(200, 'At most 200 entries a page.').default(50),
  offset: yup.number().typeError('Offset must be a number.').integer().min(0).max(1_000_000_000, 'Offset must be at most 1,000,000,000.').default(0),
});
export type AuditQuery = yup.InferType<typeof auditQuerySchema>;

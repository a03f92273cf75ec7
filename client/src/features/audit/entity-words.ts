/** How the audit trail names the kinds of record it tracks. */
const WORDS: Record<string, string> = {
  trial: 'Trial',
  cohort: 'Cohort',
  site: 'Site',
  membership: 'Membership',
  user: 'Person',
  design: 'Design',
  patient: 'Patient',
  assessment: 'Assessment',
  data_cut: 'Data cut',
  recommendation: 'Committee recommendation',
};

export const entityWords = (type: string) => WORDS[type] ?? type.replace(/_/g, ' ');

export const actionWords = (action: string) => action.replace(/_/g, ' ');

/**
 * The safety section of a data cut as the committee reviews it: per cohort the adverse events by
 * CTCAE grade and attribution, the toxicities against the locked definition with the exact
 * interval, where the cohort stood against its rule and, for a Bryant–Day design, the joint verdict
 * — all from the cut's frozen copy, worded by the server's words module.
 */
import { Figure, Panel } from '../../components/ui';
import { percent } from '../../lib/format';
import { ATTRIBUTION_WORDS, CTCAE_SOURCE, GRADE_WORDS, SAFETY_RULE_WORDS } from '../../../../server/words';
import { Table } from './analysis-view';
import type { Analysis } from './types';

type CohortSafety = Analysis['safety'][number];

const ATTRIBUTIONS = Object.keys(ATTRIBUTION_WORDS) as Array<keyof typeof ATTRIBUTION_WORDS>;

function CohortSafetySection({ safety }: { safety: CohortSafety }) {
  const { events, counts, toxicityRate } = safety;
  return (
    <section aria-label={`Safety — cohort ${safety.code}`}>
      <Panel title={`Safety — cohort ${safety.code}`}>
        <div className="grid gap-3">
          <p className="text-xs text-ink-500">{SAFETY_RULE_WORDS[safety.safetyRule]}</p>
          {counts && (
            <div className="flex flex-wrap gap-6">
              <Figure label="Toxicities" value={`${counts.toxic} / ${counts.toxic + counts.notToxic}`} hint={`assessable at the cut · ${counts.notAssessable} not yet`} />
              <Figure
                label="Toxicity rate"
                value={toxicityRate ? percent(toxicityRate.estimate) : '—'}
                hint={toxicityRate ? `${Math.round(toxicityRate.confLevel * 100)}% exact CI ${percent(toxicityRate.ci[0])} – ${percent(toxicityRate.ci[1])}` : 'No assessable patient at the cut'}
              />
              <Figure label="Adverse events" value={events.total} hint={`${events.serious} serious · ${events.patients} patients`} />
            </div>
          )}
          <ul className="list-disc pl-5 text-sm text-ink-700">
            {safety.sentences.map((sentence) => (
              <li key={sentence}>{sentence}</li>
            ))}
          </ul>
          {safety.eventsFrozen && events.total > 0 && (
            <>
              <Table
                caption="Adverse events by grade and attribution"
                head={['Grade', ...ATTRIBUTIONS.map((a) => ATTRIBUTION_WORDS[a]), 'Not assessed', 'All', 'Serious']}
                rows={events.byGrade.map((row) => [
                  row.grade === null ? 'Not graded yet' : `${row.grade} ${GRADE_WORDS[row.grade]}`,
                  ...ATTRIBUTIONS.map((a) => row.byAttribution[a]),
                  row.byAttribution.not_assessed,
                  row.total,
                  row.serious,
                ])}
              />
              <p className="text-xs text-ink-500">Grades: {CTCAE_SOURCE}.</p>
            </>
          )}
          {safety.toxicPatients.length > 0 && <p className="text-sm text-ink-700">Patients counted as toxicities: {safety.toxicPatients.join(', ')}.</p>}
          </div>
      </Panel>
    </section>
  );
}

export function SafetySection({ analysis }: { analysis: Analysis }) {
  return (
    <>
      {analysis.safety.map((safety) => (
        <CohortSafetySection key={safety.cohortId} safety={safety} />
      ))}
    </>
  );
}

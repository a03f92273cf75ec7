import { getDaysInMonth, parseISO } from 'date-fns';
import { Panel, StatusTag } from '../../components/ui';
import { day } from '../../lib/format';
import type { CohortAccrual, TargetProjection } from './get-accrual';
import { GLYPHS } from '../../../../server/words';

function TargetRow({ target }: { target: TargetProjection }) {
  return (
    <tr className="border-b border-ink-100 align-top last:border-0">
      <th scope="row" className="py-2 pr-4 text-left font-semibold tabular-nums">
        {target.target} = {target.size}
      </th>
      <td className="py-2 pr-4 tabular-nums">{target.counted}</td>
      {target.reached ? (
        <td colSpan={2} className="py-2 pr-4">
          <span aria-hidden>{GLYPHS.done} </span>Reached
        </td>
      ) : (
        <>
          <td className="py-2 pr-4 font-semibold tabular-nums">{target.expected ? day(target.expected) : 'Cannot project'}</td>
          <td className="py-2 pr-4 tabular-nums">
            {target.earliest ? `${day(target.earliest)} – ${target.latest ? day(target.latest) : 'no latest date'}` : '—'}
          </td>
        </>
      )}
      <td className="py-2 text-xs text-ink-500">{target.reached ? '' : target.note}</td>
    </tr>
  );
}

/** When each cohort is expected to reach n1 and n, with the window and the range the dates rest on. */
export function ProjectionsPanel({ cohorts }: { cohorts: CohortAccrual[] }) {
  return (
    <Panel title="Projections">
      <div className="grid gap-5">
        {cohorts.map((cohort) => (
          <section key={cohort.cohortId} aria-label={`Projections for cohort ${cohort.code}`}>
            {cohorts.length > 1 && (
              <h3 className="mb-1 flex items-center gap-2 text-sm font-semibold">
                <span className="font-mono text-brass-700">{cohort.code}</span> {cohort.name} <StatusTag status={cohort.status} />
              </h3>
            )}
            {cohort.projections.window && (
              <p className="text-xs text-ink-500">
                Rate window: {cohort.projections.window.enrolled} counting patients from {day(cohort.projections.window.from)} to {day(cohort.projections.window.to)} (
                {cohort.projections.window.days} days). Range: slowest and fastest of{' '}
                {cohort.projections.months.length > 0
                  ? cohort.projections.months.map((m) => `${m.month}: ${m.enrolled}${m.daysOpen < getDaysInMonth(parseISO(`${m.month}-01`)) ? ` in ${m.daysOpen} days open` : ''}`).join(', ')
                  : 'no month before this one yet'}
                .
              </p>
            )}
            {cohort.projections.targets.length > 0 && (
              <table className="mt-2 w-full text-sm" aria-label={`Projected dates for cohort ${cohort.code}`}>
                <thead>
                  <tr className="border-b border-ink-200 text-left text-xs tracking-wide text-ink-500 uppercase">
                    <th className="py-2 pr-4">Target</th>
                    <th className="py-2 pr-4">Counted</th>
                    <th className="py-2 pr-4">Expected</th>
                    <th className="py-2 pr-4">Range</th>
                    <th className="py-2">Basis</th>
                  </tr>
                </thead>
                <tbody>
                  {cohort.projections.targets.map((t) => (
                    <TargetRow key={t.target} target={t} />
                  ))}
                </tbody>
              </table>
            )}
            {cohort.projections.notes.map((note) => (
              <p key={note} className="mt-1 text-xs text-ink-600">
                <span aria-hidden>{GLYPHS.note} </span>
                {note}
              </p>
            ))}
          </section>
        ))}
      </div>
    </Panel>
  );
}

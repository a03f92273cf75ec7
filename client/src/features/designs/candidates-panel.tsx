/** The candidate designs: a sortable table, the charts of them all, and two of them compared side by side. */
import { lazy, Suspense, useMemo } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { Button, Loading } from '../../components/ui';
import { decimal } from '../../lib/format';
import { DataTable } from '../../components/data-table';
import { candidateList, ruleText, SELECTION_LABELS, type CandidateDesign, type DesignCandidates } from './types';
import { GLYPHS } from '../../../../server/words';

const DesignCharts = lazy(() => import('./design-charts'));

const column = createColumnHelper<CandidateDesign>();

function qRange(c: CandidateDesign) {
  return c.qFrom === null || c.qTo === null ? '—' : `${c.qFrom.toFixed(2)}–${c.qTo.toFixed(2)}`;
}

function labelOf(c: CandidateDesign) {
  return c.selection === 'admissible' ? `${SELECTION_LABELS.admissible} ${c.admissibleIndex}` : SELECTION_LABELS[c.selection];
}

type Props = {
  candidates: DesignCandidates;
  compare: string[];
  onToggleCompare: (key: string) => void;
  /** Absent when the user may not sign or the cohort can no longer change. */
  onChoose?: (candidate: CandidateDesign) => void;
  chooseLabel: string;
};

export function CandidatesPanel({ candidates, compare, onToggleCompare, onChoose, chooseLabel }: Props) {
  const list = useMemo(() => candidateList(candidates), [candidates]);
  const { p0, p1 } = candidates.settings;
  const columns = [
    column.accessor((c) => labelOf(c), {
      id: 'design',
      header: 'Design',
      cell: (info) => <span className="font-semibold">{info.getValue()}</span>,
    }),
    column.accessor((c) => c.n1 ?? 0, { id: 'stage1', header: 'Stage 1 r1/n1', cell: (info) => (info.row.original.n1 === null ? '—' : `${info.row.original.r1}/${info.row.original.n1}`) }),
    column.accessor('n', { header: 'Total r/n', cell: (info) => `${info.row.original.r}/${info.getValue()}` }),
    column.accessor('en0', { header: 'EN0', cell: (info) => decimal(info.getValue(), 1) }),
    column.accessor('pet0', { header: 'PET0', cell: (info) => decimal(info.getValue(), 2) }),
    column.accessor('typeIError', { header: 'Type I error', cell: (info) => decimal(info.getValue(), 4) }),
    column.accessor('power', { header: 'Power', cell: (info) => decimal(info.getValue(), 4) }),
    column.accessor((c) => c.qFrom ?? -1, { id: 'q', header: 'q range', cell: (info) => qRange(info.row.original) }),
    column.display({
      id: 'compare',
      header: 'Compare',
      cell: (info) => {
        const c = info.row.original;
        return (
          <label className="inline-flex items-center gap-1 text-xs">
            <input type="checkbox" checked={compare.includes(c.key)} onChange={() => onToggleCompare(c.key)} className="h-4 w-4 accent-ink-900" />
            <span className="sr-only">Compare {labelOf(c)}</span>
          </label>
        );
      },
    }),
    ...(onChoose
      ? [
          column.display({
            id: 'choose',
            header: '',
            cell: (info) => (
              <Button variant="secondary" onClick={() => onChoose(info.row.original)} aria-label={`${chooseLabel}: ${labelOf(info.row.original)} ${ruleText(info.row.original)}`}>
                {chooseLabel}
              </Button>
            ),
          }),
        ]
      : []),
  ];
  const compared = compare.map((key) => list.find((c) => c.key === key)).filter((c): c is CandidateDesign => !!c);
  return (
    <div className="grid gap-5">
      {candidates.singleStageNote && (
        <p className="text-sm text-ink-600">
          <span aria-hidden>{GLYPHS.note} </span>
          No single-stage design: {candidates.singleStageNote}
        </p>
      )}
      <DataTable data={list} columns={columns} label="Candidate designs" filterLabel="Filter designs" pageSize={10} empty="Nothing matches the filter." />
      <p className="text-xs text-ink-500">
        Reject the null hypothesis (declare the treatment promising) when more than r of n patients respond; stop after stage 1 when r1 or
        fewer of n1 respond. Admissible designs minimise q·n + (1 − q)·EN0 over their q range; the ones equal to the optimal or minimax
        design are not repeated.
      </p>
      <Suspense fallback={<Loading label="Loading charts" />}>
        <DesignCharts series={list.map((c) => ({ label: `${labelOf(c)} ${ruleText(c)}`, curve: c.curve }))} p0={p0} p1={p1} />
      </Suspense>
      <section aria-label="Two designs compared" className="border-t border-ink-100 pt-4">
        <h3 className="mb-2 text-sm font-semibold tracking-wide text-ink-900 uppercase">Compare two designs</h3>
        {compared.length < 2 ? (
          <p className="text-sm text-ink-500">Tick “Compare” on two designs to see their charts side by side.</p>
        ) : (
          <div className="grid gap-3">
            <table className="text-sm tabular-nums">
              <caption className="sr-only">Figures of the two compared designs</caption>
              <thead>
                <tr className="text-left text-xs text-ink-500 uppercase">
                  <th scope="col" className="pr-4">Design</th>
                  <th scope="col" className="pr-4">Rule</th>
                  <th scope="col" className="pr-4">EN0</th>
                  <th scope="col" className="pr-4">PET0</th>
                  <th scope="col" className="pr-4">Type I error</th>
                  <th scope="col">Power</th>
                </tr>
              </thead>
              <tbody>
                {compared.map((c) => (
                  <tr key={c.key}>
                    <th scope="row" className="pr-4 text-left">{labelOf(c)}</th>
                    <td className="pr-4">{ruleText(c)}</td>
                    <td className="pr-4">{decimal(c.en0, 1)}</td>
                    <td className="pr-4">{decimal(c.pet0, 2)}</td>
                    <td className="pr-4">{decimal(c.typeIError, 4)}</td>
                    <td>{decimal(c.power, 4)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <Suspense fallback={<Loading label="Loading charts" />}>
              <DesignCharts series={compared.map((c) => ({ label: `${labelOf(c)} ${ruleText(c)}`, curve: c.curve }))} p0={p0} p1={p1} />
            </Suspense>
          </div>
        )}
      </section>
    </div>
  );
}

/**
 * Safety's part of Needs attention, per site (site staff see their own): events still without a
 * grade or an attribution, serious events not attested, toxicity windows closing within days.
 */
import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { createColumnHelper } from '@tanstack/react-table';
import { ErrorNotice, Figure, Loading, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { api } from '../../lib/api';
import { day } from '../../lib/format';
import { SAFETY_ATTENTION_WORDS } from '../../../../server/words';
import { safetyKeys } from './query-keys';
import type { SafetyAttentionItem, SafetyAttentionKind, SafetyAttentionSite } from './types';

type SafetyAttention = { sites: SafetyAttentionSite[]; today: string; withinDays: number };

const safetyAttentionQuery = (trialId: string) =>
  queryOptions({ queryKey: safetyKeys.attention(trialId), queryFn: () => api<SafetyAttention>(`/api/trials/${trialId}/safety/needs-attention`) });

const column = createColumnHelper<SafetyAttentionItem>();
const KINDS = Object.keys(SAFETY_ATTENTION_WORDS) as SafetyAttentionKind[];

function KindTag({ kind }: { kind: SafetyAttentionKind }) {
  const { glyph, label } = SAFETY_ATTENTION_WORDS[kind];
  return (
    <span className="inline-flex items-center gap-1 rounded-sm border border-ink-300 px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap text-ink-900">
      <span aria-hidden>{glyph}</span>
      {label}
    </span>
  );
}

export function SafetyAttention({ trialId }: { trialId: string }) {
  const { data, isPending, error } = useQuery(safetyAttentionQuery(trialId));
  const columns = useMemo(
    () => [
      column.accessor('studyId', {
        header: 'Patient',
        cell: (c) => (
          <Link to={`/trials/${trialId}/patients/${c.row.original.patientId}`} className="font-mono font-semibold text-ink-900 underline-offset-2 hover:underline">
            {c.getValue()}
          </Link>
        ),
      }),
      column.accessor((item) => SAFETY_ATTENTION_WORDS[item.kind].label, { id: 'kind', header: 'What', cell: (c) => <KindTag kind={c.row.original.kind} /> }),
      column.accessor('message', { header: 'Details' }),
      column.accessor('date', { header: 'Date', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue())}</span> }),
    ],
    [trialId],
  );
  if (isPending) return <Loading label="Looking for adverse events that need attention" />;
  if (error) return <ErrorNotice error={error} title="Safety’s list could not be loaded" />;
  const all = data.sites.flatMap((s) => s.items);
  return (
    <section aria-label="Adverse events that need attention" className="grid gap-4">
      <h2 className="text-base font-semibold text-ink-900">Adverse events</h2>
      <div className="flex flex-wrap gap-6">
        {KINDS.map((kind) => (
          <Figure key={kind} label={SAFETY_ATTENTION_WORDS[kind].label} value={all.filter((i) => i.kind === kind).length} hint={kind === 'toxicity-window-closing' ? `within ${data.withinDays} days` : undefined} />
        ))}
      </div>
      {data.sites.map((site) => (
        <Panel key={site.siteId} title={`${site.siteCode} · ${site.siteName} — adverse events`} actions={<span className="text-xs text-ink-500 tabular-nums">{site.items.length} to check</span>}>
          <DataTable data={site.items} columns={columns} label={`Adverse events needing attention at ${site.siteCode}`} filterLabel="Filter" empty="No adverse event needs attention at this site." />
        </Panel>
      ))}
    </section>
  );
}

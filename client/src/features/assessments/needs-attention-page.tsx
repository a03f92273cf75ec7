/**
 * Needs attention: per site, what in the assessments wants a look — responses waiting past their
 * confirmation window, SD before the minimum, assessments dated before enrolment, gaps longer
 * than the schedule, entered outcomes that disagree with the derivation — and safety's part (adverse
 * events without grade or attribution, serious events not attested, toxicity windows closing). Site
 * roles see their sites, and import assessments from a CSV file here.
 */
import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper } from '@tanstack/react-table';
import { Cautions, EmptyState, ErrorNotice, Figure, Loading, PageHeader, Panel } from '../../components/ui';
import { DataTable } from '../../components/data-table';
import { day } from '../../lib/format';
import { hasAnyRole } from '../../lib/roles';
import { useTrialContext } from '../trials';
import { SafetyAttention } from '../safety';
import { ImportPanel } from './import-panel';
import { useNeedsAttention, type NeedsAttentionItem } from './get-needs-attention';
import { ATTENTION_WORDS, Tag } from './words';
import { DECISION_SUPPORT_ONLY, INTERIM_DATA } from '../../../../server/words';
import type { AttentionKind } from './types';

const column = createColumnHelper<NeedsAttentionItem>();
const KINDS = Object.keys(ATTENTION_WORDS) as AttentionKind[];

export function NeedsAttentionPage() {
  const trial = useTrialContext();
  const { data, isPending, error } = useNeedsAttention(trial.id);
  const [kind, setKind] = useState<AttentionKind | ''>('');
  const columns = useMemo(
    () => [
      column.accessor('studyId', {
        header: 'Patient',
        cell: (c) => (
          <Link to={`/trials/${trial.id}/patients/${c.row.original.patientId}`} className="font-mono font-semibold text-ink-900 underline-offset-2 hover:underline">
            {c.getValue()}
          </Link>
        ),
      }),
      column.accessor((item) => ATTENTION_WORDS[item.kind].label, { id: 'kind', header: 'What', cell: (c) => <Tag {...ATTENTION_WORDS[c.row.original.kind]} /> }),
      column.accessor('message', { header: 'Details' }),
      column.accessor((item) => item.date ?? '', { id: 'date', header: 'Date', cell: (c) => <span className="whitespace-nowrap tabular-nums">{day(c.getValue() || null)}</span> }),
    ],
    [trial.id],
  );

  if (isPending) return <Loading label="Looking for what needs attention" />;
  if (error) return <ErrorNotice error={error} title="The list could not be loaded" />;
  const all = data.sites.flatMap((s) => s.items);
  const counts = KINDS.map((k) => ({ kind: k, count: all.filter((i) => i.kind === k).length }));

  return (
    <div className="grid gap-4">
      <PageHeader title="Needs attention" subtitle={`Assessments and outcomes to check, by site, as of ${day(data.today)}.`} />
      <div className="flex flex-wrap gap-6">
        {counts.map(({ kind: k, count }) => (
          <Figure key={k} label={ATTENTION_WORDS[k].label} value={count} />
        ))}
      </div>
      <div className="flex items-center gap-2">
        <label htmlFor="attention-kind" className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
          Show
        </label>
        <select
          id="attention-kind"
          value={kind}
          onChange={(event) => setKind(event.target.value as AttentionKind | '')}
          className="rounded-sm border border-ink-300 bg-white px-2 py-1 text-sm"
        >
          <option value="">Everything</option>
          {KINDS.map((k) => (
            <option key={k} value={k}>
              {ATTENTION_WORDS[k].label}
            </option>
          ))}
        </select>
      </div>
      {data.sites.length === 0 && <EmptyState>No site of this trial is visible to you.</EmptyState>}
      {data.sites.map((site) => {
        const items = kind ? site.items.filter((i) => i.kind === kind) : site.items;
        return (
          <Panel key={site.siteId} title={`${site.siteCode} · ${site.siteName}`} actions={<span className="text-xs text-ink-500 tabular-nums">{items.length} to check</span>}>
            <DataTable data={items} columns={columns} label={`Needs attention at ${site.siteCode}`} filterLabel="Filter" empty="Nothing needs attention at this site." />
          </Panel>
        );
      })}
      <SafetyAttention trialId={trial.id} />
      {hasAnyRole(trial.myRoles, ['coordinator', 'investigator']) && <ImportPanel trialId={trial.id} />}
      <Cautions items={[INTERIM_DATA, DECISION_SUPPORT_ONLY]} />
    </div>
  );
}

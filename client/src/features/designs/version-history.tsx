/** Every signed version of a cohort's design, newest first, with who signed it, what it meant and when. */
import { createColumnHelper } from '@tanstack/react-table';
import { dateTime, decimal } from '../../lib/format';
import { DataTable } from '../../components/data-table';
import { designLabel, ruleText, type DesignVersion } from './types';
import { GLYPHS, SAFETY_RULE_WORDS } from '../../../../server/words';

const column = createColumnHelper<DesignVersion>();

const columns = [
  column.accessor('version', { header: 'Version', cell: (info) => <span className="font-semibold">v{info.getValue()}</span> }),
  column.accessor((v) => `${designLabel(v)} ${ruleText(v)}`, { id: 'design', header: 'Design' }),
  column.accessor((v) => SAFETY_RULE_WORDS[v.safetyRule], { id: 'safety', header: 'Safety rule' }),
  column.accessor((v) => `${v.p0} / ${v.p1}`, { id: 'rates', header: 'p0 / p1' }),
  column.accessor((v) => `${v.alpha} / ${v.beta}`, { id: 'errors', header: () => <span className="normal-case">α / β</span> }),
  column.accessor('typeIError', { header: 'Type I error', cell: (info) => decimal(info.getValue(), 4) }),
  column.accessor('power', { header: 'Power', cell: (info) => decimal(info.getValue(), 4) }),
  column.accessor((v) => v.amendmentReason ?? (v.version === 1 ? 'First lock' : '—'), { id: 'reason', header: 'Reason' }),
  column.accessor((v) => v.signature?.signerName ?? v.signature?.signerEmail ?? '—', {
    id: 'signer',
    header: 'Signed by',
    cell: (info) => (
      <span title={info.row.original.signature?.signerEmail}>
        <span aria-hidden>{GLYPHS.done} </span>
        {info.getValue()}
      </span>
    ),
  }),
  column.accessor((v) => v.signature?.meaning ?? '', { id: 'meaning', header: 'Meaning', cell: (info) => <span className="text-xs">{info.getValue()}</span> }),
  column.accessor((v) => v.signature?.signedAt ?? v.createdAt, { id: 'signedAt', header: 'Signed', cell: (info) => dateTime(info.getValue()) }),
  column.accessor((v) => v.signature?.authenticatedAt ?? '', { id: 'authAt', header: 'Password entered', cell: (info) => dateTime(info.getValue() || null) }),
];

export function VersionHistory({ versions }: { versions: DesignVersion[] }) {
  return <DataTable data={versions} columns={columns} label="Design versions" filterLabel="Filter versions" pageSize={10} empty="Nothing matches the filter." />;
}

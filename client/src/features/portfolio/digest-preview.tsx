import { useState } from 'react';
import { Button, ErrorNotice, Panel, Spinner } from '../../components/ui';
import { useDigestPreview } from './get-digest-preview';

/** Development only: shows this week's sponsor digest as it would be sent, from the Portfolio. */
export function DigestPreviewPanel() {
  const [open, setOpen] = useState(false);
  const { data, isFetching, error } = useDigestPreview(open);
  return (
    <Panel
      title="Weekly digest preview"
      actions={
        <Button variant="secondary" aria-expanded={open} onClick={() => setOpen(!open)}>
          {open ? 'Hide' : 'Show this week’s digest'}
        </Button>
      }
    >
      <p className="text-xs text-ink-500">
        Development only. Sponsors receive this e-mail every Monday; sent copies appear in the Outbox.
      </p>
      {open &&
        (isFetching ? (
          <Spinner label="Rendering the digest" />
        ) : error ? (
          <ErrorNotice error={error} />
        ) : data ? (
          <div className="mt-3">
            <p className="text-sm font-semibold">{data.subject}</p>
            <p className="text-xs text-ink-500">to {data.to}</p>
            <pre className="mt-2 max-h-96 overflow-auto bg-ink-50 p-3 text-xs whitespace-pre-wrap">{data.text}</pre>
          </div>
        ) : (
          <p className="mt-3 text-sm">You sponsor no trial, so no digest is sent to you.</p>
        ))}
    </Panel>
  );
}

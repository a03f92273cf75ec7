import { useState } from 'react';
import { EmptyState, ErrorNotice, Loading, PageHeader, Panel } from '../../components/ui';
import { dateTime } from '../../lib/format';
import { useOutbox } from './get-outbox';
import { GLYPHS } from '../../../../server/words';

/** Development only: what the local mail catcher received, and what is still waiting to be sent. */
export function OutboxPage() {
  const { data, isPending, error } = useOutbox();
  const [openId, setOpenId] = useState<number | null>(null);
  return (
    <div>
      <PageHeader title="Outbox" subtitle="Development mailbox: messages the local mail catcher received. Refreshes every few seconds." />
      {isPending ? (
        <Loading />
      ) : error ? (
        <ErrorNotice error={error} />
      ) : (
        <div className="grid gap-4">
          {data.queued.length > 0 && (
            <Panel title={`Waiting to be sent (${data.queued.length})`}>
              <ul className="space-y-1 text-sm">
                {data.queued.map((m) => (
                  <li key={m.id}>
                    <span aria-hidden>{GLYPHS.pending} </span>
                    {m.subject} → {m.to} · attempts {m.attempts}
                    {m.lastError && <span className="text-alert-600"> · last error: {m.lastError}</span>}
                  </li>
                ))}
              </ul>
            </Panel>
          )}
          <Panel title={`Received (${data.received.length})`} actions={<span className="text-xs text-ink-500">catcher {data.catcher}</span>}>
            {data.received.length === 0 ? (
              <EmptyState>No messages yet.</EmptyState>
            ) : (
              <ul className="divide-y divide-ink-100">
                {data.received.map((m) => (
                  <li key={m.id} className="py-2">
                    <button
                      type="button"
                      className="w-full text-left"
                      aria-expanded={openId === m.id}
                      onClick={() => setOpenId(openId === m.id ? null : m.id)}
                    >
                      <span className="font-semibold">{m.subject}</span>
                      <span className="block text-xs text-ink-500">
                        to {m.to.join(', ')} · {dateTime(m.receivedAt)}
                      </span>
                    </button>
                    {openId === m.id && <pre className="mt-2 bg-ink-50 p-3 text-xs whitespace-pre-wrap">{m.text}</pre>}
                  </li>
                ))}
              </ul>
            )}
          </Panel>
        </div>
      )}
    </div>
  );
}

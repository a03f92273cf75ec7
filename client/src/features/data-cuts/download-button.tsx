/** Downloads a file the server builds on request (the report, the exports), with progress while it is made. */
import { useState } from 'react';
import { Button, Spinner } from '../../components/ui';
import { GLYPHS } from '../../../../server/words';

export function DownloadButton({ href, filename, label, busyLabel }: { href: string; filename: string; label: string; busyLabel: string }) {
  const [busy, setBusy] = useState(false);
  const [failed, setFailed] = useState<string | null>(null);
  async function download() {
    setBusy(true);
    setFailed(null);
    try {
      const response = await fetch(href, { credentials: 'same-origin' });
      if (!response.ok) throw new Error(`The server answered ${response.status}.`);
      const url = URL.createObjectURL(await response.blob());
      const link = document.createElement('a');
      link.href = url;
      link.download = filename;
      link.click();
      URL.revokeObjectURL(url);
    } catch (error) {
      setFailed((error as Error).message);
    } finally {
      setBusy(false);
    }
  }
  return (
    <span className="inline-flex items-center gap-2">
      <Button variant="secondary" onClick={download} disabled={busy}>
        <span aria-hidden>{GLYPHS.download}</span> {label}
      </Button>
      {busy && <Spinner label={busyLabel} />}
      {failed && (
        <span role="alert" className="text-xs text-alert-600">
          <span aria-hidden>{GLYPHS.warning} </span>
          {failed}
        </span>
      )}
    </span>
  );
}

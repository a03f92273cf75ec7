/** The labelled file picker every CSV import shows; it hands the chosen file (or null) to the caller. */
export function CsvFileInput({ id, onChange }: { id: string; onChange: (file: File | null) => void }) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-xs font-semibold tracking-wide text-ink-700 uppercase">
        CSV file
      </label>
      <input id={id} type="file" accept=".csv,text/csv" onChange={(event) => onChange(event.target.files?.[0] ?? null)} className="text-sm" />
    </div>
  );
}

/**
 * A continuous toxicity boundary read as ranges: for the assessable patients k from … to, the
 * cohort stops once the toxicities among them reach b. Ranges before the first possible stop are
 * left out.
 */
import { decimal } from '../../lib/format';
import type { ToxicityOperatingPoint } from './types';

export function boundRanges(bounds: Array<number | null>): Array<{ from: number; to: number; bound: number }> {
  const ranges: Array<{ from: number; to: number; bound: number }> = [];
  bounds.forEach((bound, index) => {
    if (bound === null) return;
    const k = index + 1;
    const last = ranges[ranges.length - 1];
    if (last && last.bound === bound && last.to === k - 1) last.to = k;
    else ranges.push({ from: k, to: k, bound });
  });
  return ranges;
}

export function BoundaryTable({ bounds }: { bounds: Array<number | null> }) {
  const ranges = boundRanges(bounds);
  return (
    <table className="text-sm tabular-nums">
      <caption className="mb-1 text-left text-xs text-ink-500">The cohort stops once the toxicities among the first k assessable patients reach b.</caption>
      <tbody>
        <tr>
          <th scope="row" className="pr-3 text-left text-xs font-medium text-ink-500 uppercase">
            k
          </th>
          {ranges.map((r) => (
            <td key={r.from} className="border-l border-ink-100 px-2 text-center">
              {r.from === r.to ? r.from : `${r.from}–${r.to}`}
            </td>
          ))}
        </tr>
        <tr>
          <th scope="row" className="pr-3 text-left text-xs font-medium text-ink-500 uppercase">
            b
          </th>
          {ranges.map((r) => (
            <td key={r.from} className="border-l border-ink-100 px-2 text-center font-semibold">
              {r.bound}
            </td>
          ))}
        </tr>
      </tbody>
    </table>
  );
}

/** The boundary's operating characteristics at a few true toxicity rates. */
export function BoundaryCharacteristicsTable({ curve, rates }: { curve: ToxicityOperatingPoint[]; rates: number[] }) {
  const rows = rates.map((p) => curve.find((point) => Math.abs(point.p - p) < 1e-9)).filter((point): point is ToxicityOperatingPoint => point !== undefined);
  return (
    <table className="text-sm tabular-nums">
      <caption className="sr-only">Operating characteristics of the toxicity boundary</caption>
      <thead>
        <tr className="text-left text-xs text-ink-500 uppercase">
          <th scope="col" className="pr-4">True toxicity rate</th>
          <th scope="col" className="pr-4">P(stop)</th>
          <th scope="col" className="pr-4">Expected treated</th>
          <th scope="col">Expected toxicities</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((point) => (
          <tr key={point.p}>
            <td className="pr-4">{decimal(point.p, 2)}</td>
            <td className="pr-4">{decimal(point.probStop, 3)}</td>
            <td className="pr-4">{decimal(point.expectedTreated, 1)}</td>
            <td>{decimal(point.expectedToxicities, 1)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** θ and a few rates above it, on the chart's grid. */
export const characteristicRates = (theta: number) => [...new Set([theta, ...[0.05, 0.1, 0.15, 0.2, 0.3].map((d) => Math.round((theta + d) * 100) / 100)])].filter((p) => p <= 1);

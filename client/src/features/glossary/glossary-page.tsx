/**
 * The glossary: what the words that carry the figures mean here ("counted", "decided", "evaluable",
 * "at risk" …) and what each glyph stands for. Both lists come from the words module, so the page
 * cannot drift from what the other pages, the mail and the report say.
 */
import { PageHeader, Panel } from '../../components/ui';
import { GLOSSARY, GLYPH_MEANINGS, GLYPHS, type GlyphMeaning } from '../../../../server/words';

const SIGNS = Object.keys(GLYPHS) as GlyphMeaning[];

export function GlossaryPage() {
  return (
    <div className="grid gap-4">
      <PageHeader title="Glossary" subtitle="The words and signs Orrery uses, with one meaning each, on every page, mail and report." />
      <Panel title="Words">
        <dl className="grid gap-3 text-sm sm:grid-cols-[max-content_1fr] sm:gap-x-6">
          {GLOSSARY.map(({ term, meaning }) => (
            <div key={term} className="contents">
              <dt className="font-semibold text-ink-950">{term}</dt>
              <dd className="text-ink-700">{meaning}</dd>
            </div>
          ))}
        </dl>
      </Panel>
      <Panel title="Signs">
        <p className="mb-3 text-sm text-ink-600">A sign always stands beside its word; it never replaces it, and it never means two things.</p>
        <ul aria-label="Signs and what they mean" className="grid gap-1 text-sm sm:grid-cols-2">
          {SIGNS.map((meaning) => (
            <li key={meaning} data-glyph={meaning} className="flex items-baseline gap-3">
              <span aria-hidden className="glyph inline-block w-6 text-center text-lg text-ink-950">
                {GLYPHS[meaning]}
              </span>
              <span className="text-ink-700">{GLYPH_MEANINGS[meaning]}</span>
            </li>
          ))}
        </ul>
      </Panel>
    </div>
  );
}

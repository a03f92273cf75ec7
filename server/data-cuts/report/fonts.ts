/**
 * The report's fonts: the shipped Inter (the static files of the inter-ui package, the same Inter
 * the client draws with), so α, β, ≤, θ and every glyph of the words module print as themselves.
 * pdfkit subsets and embeds TrueType, and its subsetter cannot read WOFF2 outlines, so each file is
 * unpacked to TrueType once per process. A character Inter lacks would print as an empty box:
 * `printable` puts a plain "?" in its place instead.
 */
import { readFile } from 'node:fs/promises';
import { createRequire } from 'node:module';
import type * as Fontkit from 'fontkit';

const require = createRequire(import.meta.url);

/** The shipped files, regular and semibold. */
export const INTER_FILES = {
  regular: require.resolve('inter-ui/web/Inter-Regular.woff2'),
  semibold: require.resolve('inter-ui/web/Inter-SemiBold.woff2'),
} as const;

export type ReportFonts = {
  regular: Buffer;
  semibold: Buffer;
  /** The text with every character Inter cannot draw replaced by "?". */
  printable: (text: string) => string;
};

// The unpacker and the font reader load with the first report, not with every server process.
async function unpack(file: string): Promise<Buffer> {
  const { default: decompress } = await import('wawoff2/decompress.js');
  return Buffer.from(await decompress(await readFile(file)));
}

async function load(): Promise<ReportFonts> {
  // One after the other: the unpacker answers with a view of its own memory, which its next call may reuse before the first is copied out.
  const regular = await unpack(INTER_FILES.regular);
  const semibold = await unpack(INTER_FILES.semibold);
  const fontkit = await import('fontkit');
  const font = fontkit.create(regular) as Fontkit.Font;
  const drawable = (char: string) => char === '\n' || font.hasGlyphForCodePoint(char.codePointAt(0) as number);
  return { regular, semibold, printable: (text) => Array.from(text, (char) => (drawable(char) ? char : '?')).join('') };
}

let loading: Promise<ReportFonts> | null = null;

/** The fonts, unpacked on first use; a failed unpacking is retried on the next report. */
export function reportFonts(): Promise<ReportFonts> {
  loading ??= load().catch((error: unknown) => {
    loading = null;
    throw error;
  });
  return loading;
}

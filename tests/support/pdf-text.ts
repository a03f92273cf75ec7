/**
 * What a PDF shows, page by page, read with PDF.js (the text a reader's viewer would copy), and the
 * fonts it embeds. The report embeds subset TrueType fonts, so its text is glyph ids in the content
 * streams; PDF.js maps them back through each font's ToUnicode table.
 */
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/** The text of each page, in reading order, one string per page. */
export async function pdfPages(pdf: Buffer): Promise<string[]> {
  const document = await getDocument({ data: new Uint8Array(pdf), useSystemFonts: false, isEvalSupported: false }).promise;
  try {
    const pages: string[] = [];
    for (let number = 1; number <= document.numPages; number++) {
      const content = await (await document.getPage(number)).getTextContent();
      pages.push(content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? '\n' : '') : '')).join(''));
    }
    return pages;
  } finally {
    await document.destroy();
  }
}

/** The names of the fonts the PDF embeds (a subset tag, "+", the font's PostScript name). */
export function embeddedFonts(pdf: Buffer): string[] {
  const raw = pdf.toString('latin1');
  if (!raw.includes('/FontFile2')) return [];
  return [...new Set([...raw.matchAll(/\/BaseFont \/([A-Z]{6}\+[^\s/]+)/g)].map((m) => m[1]))];
}

/** Every font the PDF names, embedded or not. */
export function namedFonts(pdf: Buffer): string[] {
  return [...new Set([...pdf.toString('latin1').matchAll(/\/BaseFont \/([^\s/]+)/g)].map((m) => m[1]))];
}

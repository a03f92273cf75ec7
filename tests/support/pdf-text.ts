import { inflateSync } from 'node:zlib';

/** The text a PDF shows, from its Flate-compressed content streams (pdfkit writes text as hex strings). */
export function pdfText(pdf: Buffer): string {
  const raw = pdf.toString('latin1');
  const pieces: string[] = [];
  for (const match of raw.matchAll(/stream\r?\n/g)) {
    const start = (match.index ?? 0) + match[0].length;
    const end = raw.indexOf('endstream', start);
    let content: string;
    try {
      content = inflateSync(pdf.subarray(start, end)).toString('latin1');
    } catch {
      continue;
    }
    for (const tj of content.matchAll(/\[(.*?)\]\s*TJ/g)) {
      pieces.push([...tj[1].matchAll(/<([0-9a-fA-F]*)>/g)].map((h) => Buffer.from(h[1], 'hex').toString('latin1')).join(''));
    }
    pieces.push('\n');
  }
  return pieces.join(' ');
}

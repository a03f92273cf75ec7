/**
 * Receiving a CSV upload for an import: the multipart handling (one file, in memory, capped) and
 * the checks every import makes before it reads a row — a CSV file, within the size, text without
 * NUL bytes, UTF-8, exactly the expected columns, and not too many rows.
 */
import multer from 'multer';
import type { Request, RequestHandler, Response } from 'express';
import { parse } from 'csv-parse/sync';
import { AppError, InputError } from '../http/errors.js';

export type UploadedFile = { buffer: Buffer; originalname: string; mimetype: string };

export type CsvSpec<C extends string> = {
  /** Every column the template has; rows come back keyed by all of them ('' where a column is absent). */
  columns: readonly C[];
  /** The columns a file must have; all of them when not given. */
  required?: readonly C[];
  maxBytes: number;
  maxRows: number;
};

/** Multer for one CSV file in the field "file", with its own refusals in words a coordinator can act on. */
export function csvUpload(maxBytes: number): RequestHandler {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: 1, fields: 10, parts: 12 } });
  return (req, res, next) => {
    upload.single('file')(req, res, (error: unknown) => {
      if (!error) return next();
      const code = (error as { code?: string }).code;
      if (code === 'LIMIT_FILE_SIZE') return next(new AppError(413, 'too_large', 'The file is larger than 1 MB. Split it into smaller files and import them one by one.'));
      if (code === 'LIMIT_UNEXPECTED_FILE' || code === 'LIMIT_FILE_COUNT') return next(new InputError('Send one CSV file in the field "file".', { file: 'Send one file, in the field "file".' }));
      next(new InputError(`The upload could not be read: ${(error as Error).message}.`, { file: (error as Error).message }));
    });
  };
}

/** Checks the upload is a CSV text file with the template's columns and returns its rows keyed by column; 400 (413 when too large) with the reason otherwise. */
export function readUploadedCsv<C extends string>(file: UploadedFile | undefined, spec: CsvSpec<C>): Array<Record<C, string>> {
  const { columns, required = columns, maxBytes, maxRows } = spec;
  if (!file) throw new InputError('Attach a CSV file in the field "file".', { file: 'No file was sent.' });
  const isCsv = /\.csv$/i.test(file.originalname) || file.mimetype === 'text/csv';
  if (!isCsv) throw new InputError('Only CSV files can be imported (a .csv file of type text/csv).', { file: `"${file.originalname}" is not a CSV file.` });
  if (file.buffer.length > maxBytes) throw new AppError(413, 'too_large', 'The file is larger than 1 MB. Split it into smaller files.');
  if (file.buffer.includes(0)) throw new InputError('The file is binary, not CSV text.', { file: 'The file contains NUL bytes: save it as CSV (UTF-8) from your spreadsheet.' });
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(file.buffer);
  } catch {
    throw new InputError('The file is not UTF-8 text.', { file: 'Save the file as CSV (UTF-8) from your spreadsheet and try again.' });
  }
  let records: string[][];
  try {
    records = parse(text, { bom: true, skip_empty_lines: true, trim: true, relax_column_count: false });
  } catch (error) {
    throw new InputError(`The file is not valid CSV: ${(error as Error).message}`, { file: (error as Error).message });
  }
  if (records.length === 0) throw new InputError('The file is empty.', { file: 'The file has no header row.' });
  const header = records[0].map((h) => h.trim().toLowerCase());
  const missing = required.filter((c) => !header.includes(c));
  const unknown = header.filter((h) => !(columns as readonly string[]).includes(h));
  const repeated = header.filter((h, i) => header.indexOf(h) !== i);
  if (missing.length || unknown.length || repeated.length) {
    const parts = [
      missing.length ? `missing: ${missing.join(', ')}` : '',
      unknown.length ? `not recognised: ${unknown.join(', ')}` : '',
      repeated.length ? `repeated: ${[...new Set(repeated)].join(', ')}` : '',
    ].filter(Boolean);
    throw new InputError(`The columns do not match the template (${parts.join('; ')}).`, { columns: parts.join('; ') });
  }
  const rows = records.slice(1);
  if (rows.length === 0) throw new InputError('The file has a header but no rows.', { file: 'No rows to import.' });
  if (rows.length > maxRows) {
    throw new InputError(`The file has ${rows.length} rows; at most ${maxRows} can be imported at once.`, { file: `Split the file into parts of at most ${maxRows} rows.` });
  }
  return rows.map((cells) => Object.fromEntries(columns.map((c) => [c, header.includes(c) ? (cells[header.indexOf(c)] ?? '') : ''])) as Record<C, string>);
}

/** `?dryRun=1` (or true/yes): check every row and write nothing. */
export function isDryRun(req: Request): boolean {
  const value = req.query.dryRun;
  return typeof value === 'string' && ['1', 'true', 'yes'].includes(value);
}

/** Sends a CSV download (its cells already neutralised by `toCsv`). */
export function sendCsv(res: Response, filename: string, body: string) {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${filename}"`);
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.send(body);
}

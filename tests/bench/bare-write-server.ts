/**
 * The write floor behind HTTP, run as its own process (write-floor.ts starts it): Express with a JSON
 * body parser and a pg pool of 20, and for each request the audited outcome write of write-floor.ts,
 * with no session, access check, validation or re-derivation. `PATCH /transaction/:patientId`
 * writes it as a transaction, `PATCH /statement/:patientId` as one statement, and
 * `PATCH /grouped/:patientId` by group commit: the requests that arrive while a transaction is in
 * flight are written together in the next one (one update, one audit statement).
 */
import express from 'express';
import pg from 'pg';
import { AUDIT_MANY, ONE_STATEMENT, UPDATE_MANY, writeInTransaction } from './write-floor.js';

const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 20 });
const actor = String(process.env.ACTOR_USER_ID);
const app = express();
app.use(express.json());
app.get('/api/health', (_req, res) => {
  res.json({ ok: true });
});
app.patch('/statement/:id', async (req, res, next) => {
  try {
    const { rowCount } = await pool.query({ name: 'floor_one', text: ONE_STATEMENT, values: [req.params.id, actor] });
    res.json({ written: rowCount, reason: req.body.reason });
  } catch (error) {
    next(error);
  }
});
app.patch('/transaction/:id', async (req, res, next) => {
  const client = await pool.connect();
  try {
    res.json({ written: await writeInTransaction(client, req.params.id, actor), reason: req.body.reason });
  } catch (error) {
    next(error);
  } finally {
    client.release();
  }
});
// Group commit: the requests that arrive while a transaction is in flight wait, then are written together in the next.
type Waiting = { patientId: string; done: (error: unknown, row?: { id: string; trial_id: string; outcome: string }) => void };
let waiting: Waiting[] = [];
let writing = false;
async function writeWaiting(): Promise<void> {
  if (writing) return;
  writing = true;
  while (waiting.length > 0) {
    const batch = waiting;
    waiting = [];
    const client = await pool.connect();
    try {
      await client.query('begin');
      const { rows } = await client.query({ name: 'floor_update_many', text: UPDATE_MANY, values: [batch.map((w) => w.patientId)] });
      await client.query({ name: 'floor_audit_many', text: AUDIT_MANY, values: [actor, rows.map((r) => r.id), rows.map((r) => r.trial_id), rows.map((r) => r.outcome)] });
      await client.query('commit');
      const byId = new Map(rows.map((r) => [r.id, r]));
      for (const w of batch) w.done(null, byId.get(w.patientId));
    } catch (error) {
      await client.query('rollback').catch(() => undefined);
      for (const w of batch) w.done(error);
    } finally {
      client.release();
    }
  }
  writing = false;
}
app.patch('/grouped/:id', (req, res, next) => {
  waiting.push({ patientId: req.params.id, done: (error, row) => (error ? next(error) : res.json({ written: row, reason: req.body.reason })) });
  void writeWaiting();
});
const server = app.listen(Number(process.env.PORT), '127.0.0.1');
process.once('SIGTERM', () => {
  server.close();
  server.closeAllConnections();
  void pool.end();
});

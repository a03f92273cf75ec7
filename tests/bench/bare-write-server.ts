/**
 * The write floor behind HTTP, run as its own process (write-floor.ts starts it): Express with a JSON
 * body parser and a pg pool of 20, and for each request the audited outcome write of write-floor.ts,
 * with no session, access check, validation or re-derivation. `PATCH /transaction/:patientId`
 * writes it as a transaction, `PATCH /statement/:patientId` as one statement.
 */
import express from 'express';
import pg from 'pg';
import { AUDIT, ONE_STATEMENT, UPDATE } from './write-floor.js';

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
    await client.query('begin');
    const { rows } = await client.query({ name: 'floor_update', text: UPDATE, values: [req.params.id] });
    await client.query({ name: 'floor_audit', text: AUDIT, values: [actor, rows[0].trial_id, rows[0].id, rows[0].outcome] });
    await client.query('commit');
    res.json({ written: rows[0], reason: req.body.reason });
  } catch (error) {
    await client.query('rollback').catch(() => undefined);
    next(error);
  } finally {
    client.release();
  }
});
const server = app.listen(Number(process.env.PORT), '127.0.0.1');
process.once('SIGTERM', () => {
  server.close();
  server.closeAllConnections();
  void pool.end();
});

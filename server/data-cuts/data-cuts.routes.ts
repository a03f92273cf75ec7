/**
 * Data cuts, their analysis, the committee's signed recommendations, the applied decision, the
 * report and the exports. Statisticians freeze and analyse cuts and apply decisions (admins may
 * apply too); committee members (monitors) read cuts and sign recommendations. Coordinators,
 * investigators and sponsors are kept out of every route here.
 */
import { createHash } from 'node:crypto';
import { number, object } from 'yup';
import type { Request, Response } from 'express';
import type { Db } from '../db/knex.js';
import { requireTrialAccess, requireUser, type RouteSpec } from '../http/routes.js';
import { parseBody } from '../http/validate.js';
import { requireFreshAuthentication } from '../signatures/signatures.js';
import { readCutPatients, setReportHash, trialOfCut } from './data-cuts.repository.js';
import { createDataCutSchema, decisionSchema, priorSchema, recommendationSchema } from './data-cuts.schema.js';
import {
  analyseDataCut,
  applyDecision,
  cutDetail,
  freezeDataCut,
  listCuts,
  recommend,
  recommendations,
  savePrior,
} from './data-cuts.service.js';
import { renderCutReport } from './report/pdf.js';
import { adrsCsv, patientsCsv } from './exports.js';

const READERS = ['statistician', 'monitor'] as const;
const cutAccess = (roles: readonly ('statistician' | 'monitor' | 'admin')[]) =>
  ({ kind: 'trial', roles, trialOf: async (db, params) => trialOfCut(db, params.cutId) }) as const satisfies RouteSpec['access'];

const cutId = (req: Request) => String(req.params.cutId);

/** A prior tried out for one answer, from the query string. */
const priorQuerySchema = object({
  a: number().typeError('a must be a number.').positive('a must be above 0.').optional(),
  b: number().typeError('b must be a number.').positive('b must be above 0.').optional(),
  thetaT: number().typeError('thetaT must be a number.').moreThan(0).lessThan(1).optional(),
}).test('pair', 'Give both a and b, or neither.', (v) => (v.a === undefined) === (v.b === undefined));

function csvName(code: string, seq: number, what: string) {
  return `${code}-data-cut-${seq}-${what}.csv`.replace(/[^A-Za-z0-9._-]/g, '_');
}

export const dataCutsRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/data-cuts',
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await listCuts(db, requireTrialAccess(req).trialId));
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/data-cuts',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(createDataCutSchema, req.body);
      const user = requireUser(req);
      const cut = await freezeDataCut(db, { ...input, trialId: requireTrialAccess(req).trialId }, user);
      res.status(201).json({ dataCut: cut, id: cut.id, contentHash: cut.contentHash });
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      res.json(await cutDetail(db, cutId(req)));
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/analysis',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const query = await priorQuerySchema.validate(req.query, { abortEarly: false, stripUnknown: true });
      res.json({ analysis: await analyseDataCut(db, cutId(req), query) });
    },
  },
  {
    method: 'patch',
    path: '/api/data-cuts/:cutId/prior',
    access: cutAccess(['statistician']),
    handler: async (req, res, { db }) => {
      const input = await parseBody(priorSchema, req.body);
      res.json({ dataCut: await savePrior(db, cutId(req), input, requireUser(req)) });
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/recommendations',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      res.json(await recommendations(db, cutId(req)));
    },
  },
  {
    method: 'post',
    path: '/api/data-cuts/:cutId/recommendations',
    access: cutAccess(['monitor']),
    handler: async (req, res, { db, config, mail }) => {
      const input = await parseBody(recommendationSchema, req.body);
      const user = requireUser(req);
      const signed = await recommend(db, cutId(req), input, user, () => requireFreshAuthentication(req, config));
      mail.kick();
      res.status(201).json({ recommendation: signed, ...(await recommendations(db, cutId(req))) });
    },
  },
  {
    method: 'post',
    path: '/api/data-cuts/:cutId/decision',
    access: cutAccess(['statistician', 'admin']),
    handler: async (req, res, { db, mail }) => {
      const input = await parseBody(decisionSchema, req.body);
      const result = await applyDecision(db, cutId(req), input, requireUser(req));
      mail.kick();
      res.status(201).json(result);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/report.pdf',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const detail = await cutDetail(db, cutId(req));
      const analysis = await analyseDataCut(db, detail.dataCut.id);
      const pdf = await renderCutReport({ cut: detail.dataCut, analysis, ...detail });
      const hash = createHash('sha256').update(pdf).digest('hex');
      await setReportHash(db, detail.dataCut.id, hash);
      res
        .status(200)
        .set({
          'Content-Type': 'application/pdf',
          'Content-Disposition': `attachment; filename="${detail.dataCut.snapshot.trial.code}-data-cut-${detail.dataCut.seq}.pdf"`,
          'X-Report-Sha256': hash,
        })
        .send(pdf);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/export.csv',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const dataset = req.query.dataset === 'adrs' ? 'adrs' : 'patients';
      await sendCsv(db, cutId(req), dataset, res);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/adrs.csv',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      await sendCsv(db, cutId(req), 'adrs', res);
    },
  },
];

async function sendCsv(db: Db, id: string, dataset: 'patients' | 'adrs', res: Response) {
  const { dataCut } = await cutDetail(db, id);
  const patients = await readCutPatients(db, id);
  const csv = dataset === 'adrs' ? adrsCsv(dataCut, patients) : patientsCsv(dataCut, patients);
  res
    .status(200)
    .set({
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="${csvName(dataCut.snapshot.trial.code, dataCut.seq, dataset)}"`,
    })
    .send(csv);
}

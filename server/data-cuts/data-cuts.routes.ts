/**
 * Data cuts, their analysis, the committee's signed recommendations, the applied decision, the
 * report and the exports. Statisticians freeze and analyse cuts and apply decisions (theirs
 * alone); committee members (monitors) read cuts and sign recommendations. Who reads a cut is the
 * visibility rule's `FROZEN_CUT_READERS` (server/auth/visibility.ts): coordinators, investigators
 * and sponsors are kept out of every route here, and see a released cut's figures only as the
 * evaluation and the Portfolio project them.
 */
import { number, object } from 'yup';
import type { Request } from 'express';
import { sendCsv } from '../csv/upload.js';
import { actorOf, signingSessionOf, type RouteSpec } from '../http/routes.js';
import type { Role } from '../auth/access.js';
import { FROZEN_CUT_READERS } from '../auth/visibility.js';
import { parseBody, parseQuery } from '../http/validate.js';
import { sendJson } from '../http/send-json.js';
import { createDataCutSchema, cutExportQuerySchema, decisionSchema, priorSchema, recommendationSchema } from './data-cuts.schema.js';
import {
  analyseDataCut,
  applyDecision,
  cutDetail,
  cutExport,
  cutReport,
  freezeDataCut,
  listCuts,
  recommend,
  recommendations,
  savePrior,
  trialOfCut,
} from './data-cuts.service.js';

const READERS = FROZEN_CUT_READERS;
const cutAccess = (roles: readonly Role[]) =>
  ({ kind: 'trial', roles, trialOf: async (db, params) => trialOfCut(db, params.cutId) }) as const satisfies RouteSpec['access'];

const cutId = (req: Request) => String(req.params.cutId);

/** A prior tried out for one answer, from the query string. */
const priorQuerySchema = object({
  a: number().typeError('a must be a number.').positive('a must be above 0.').optional(),
  b: number().typeError('b must be a number.').positive('b must be above 0.').optional(),
  thetaT: number().typeError('thetaT must be a number.').moreThan(0).lessThan(1).optional(),
}).test('pair', 'Give both a and b, or neither.', (v) => (v.a === undefined) === (v.b === undefined));

export const dataCutsRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/trials/:trialId/data-cuts',
    access: { kind: 'trial', roles: READERS },
    handler: async (req, res, { db }) => {
      res.json(await listCuts(db, actorOf(req)));
    },
  },
  {
    method: 'post',
    path: '/api/trials/:trialId/data-cuts',
    access: { kind: 'trial', roles: ['statistician'] },
    handler: async (req, res, { db }) => {
      const input = await parseBody(createDataCutSchema, req.body);
      const { user, access } = actorOf(req);
      const cut = await freezeDataCut(db, { ...input, trialId: access.trialId }, user);
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
      const query = await parseQuery(priorQuerySchema, req.query);
      sendJson(res, await analyseDataCut(db, cutId(req), query), 'analysis');
    },
  },
  {
    method: 'patch',
    path: '/api/data-cuts/:cutId/prior',
    access: cutAccess(['statistician']),
    handler: async (req, res, { db }) => {
      const input = await parseBody(priorSchema, req.body);
      res.json({ dataCut: await savePrior(db, cutId(req), input, actorOf(req).user) });
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
    handler: async (req, res, { db, mail }) => {
      const input = await parseBody(recommendationSchema, req.body);
      const signed = await recommend(db, cutId(req), input, actorOf(req).user, signingSessionOf(req));
      mail.kick();
      res.status(201).json({ recommendation: signed, ...(await recommendations(db, cutId(req))) });
    },
  },
  {
    method: 'post',
    path: '/api/data-cuts/:cutId/decision',
    access: cutAccess(['statistician']),
    handler: async (req, res, { db, mail }) => {
      const input = await parseBody(decisionSchema, req.body);
      const result = await applyDecision(db, cutId(req), input, actorOf(req));
      mail.kick();
      res.status(201).json(result);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/report.pdf',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const { pdf, hash, version, filename } = await cutReport(db, cutId(req), actorOf(req).user);
      res
        .status(200)
        .set({ 'Content-Type': 'application/pdf', 'Content-Disposition': `attachment; filename="${filename}"`, 'X-Report-Sha256': hash, 'X-Report-Version': String(version) })
        .send(pdf);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/export.csv',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const { dataset } = await parseQuery(cutExportQuerySchema, req.query);
      const { filename, csv } = await cutExport(db, cutId(req), dataset);
      sendCsv(res, filename, csv);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/adrs.csv',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const { filename, csv } = await cutExport(db, cutId(req), 'adrs');
      sendCsv(res, filename, csv);
    },
  },
  {
    method: 'get',
    path: '/api/data-cuts/:cutId/ae.csv',
    access: cutAccess(READERS),
    handler: async (req, res, { db }) => {
      const { filename, csv } = await cutExport(db, cutId(req), 'ae');
      sendCsv(res, filename, csv);
    },
  },
];

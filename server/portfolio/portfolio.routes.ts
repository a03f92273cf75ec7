/** The Portfolio (every trial the user belongs to) and, in development, a preview of the weekly digest. */
import { firstReadOf, requireUser, type RouteSpec } from '../http/routes.js';
import { parseQuery } from '../http/validate.js';
import { sendJson } from '../http/send-json.js';
import { toDay } from '../accrual/index.js';
import { portfolioFilterSchema } from './portfolio.schema.js';
import { portfolioFor } from './portfolio.service.js';
import { digestFor } from './digest.service.js';

export const portfolioRoutes: RouteSpec[] = [
  {
    method: 'get',
    path: '/api/portfolio',
    access: { kind: 'signed-in' },
    confirmsSession: true,
    handler: async (req, res, { db }) => {
      const user = requireUser(req);
      const filter = await parseQuery(portfolioFilterSchema, req.query);
      sendJson(res, await portfolioFor(db, user, filter, toDay(new Date()), firstReadOf(req, db)), 'portfolio');
    },
  },
  {
    method: 'get',
    path: '/api/dev/digest-preview',
    access: { kind: 'signed-in' },
    devOnly: true,
    handler: async (req, res, { db }) => {
      res.json({ preview: await digestFor(db, requireUser(req), new Date()) });
    },
  },
];
